import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { REVERSAL_CRITERION_DEFAULT, type RodLoadInput, rodLoad } from '../../src/calc';
import { expectCalcError, expectClose } from './helpers';

/** Worked example R1 of the engineering reference (same cylinder as V1; results derived there from the formulas). */
const R1: RodLoadInput = {
  boreM: 0.25,
  rodM: 0.06,
  strokeM: 0.14,
  connectingRodM: 0.35,
  speedRpm: 900,
  suctionPressurePa: 20e5,
  dischargePressurePa: 50e5,
  distancePiecePressurePa: 101_325,
  headClearance: 0.16,
  crankClearance: 0.19,
  headActive: true,
  crankActive: true,
  exponent: 1.28,
  reciprocatingMassKg: 110,
};

const areaHead = (Math.PI / 4) * 0.25 ** 2;
const areaCrank = (Math.PI / 4) * (0.25 ** 2 - 0.06 ** 2);

describe('rodLoad: worked example R1 (derived from the cited formulas; loads to 0.2 %, angles to 0.5°)', () => {
  const result = rodLoad(R1);

  it('should give the gas-only static extremes 152.6 kN compression and 133.4 kN tension', () => {
    expectClose(result.gas.compressionN / 1000, 152.6, 2e-3);
    expectClose(result.gas.tensionN / 1000, 133.4, 2e-3);
  });

  it('should equal the static formula exactly (gauge pressures against the distance piece)', () => {
    const pdg = 50e5 - 101_325;
    const psg = 20e5 - 101_325;
    expect(result.gas.compressionN).toBeCloseTo(pdg * areaHead - psg * areaCrank, 6);
    expect(result.gas.tensionN).toBeCloseTo(pdg * areaCrank - psg * areaHead, 6);
  });

  it('should put the valve events at 44.40°, 286.2°, 96.72° and 238.0°', () => {
    expect(result.valveEventsDeg.headSuction).toBeCloseTo(44.4, 1);
    expect(result.valveEventsDeg.headDischarge).toBeCloseTo(286.2, 1);
    expect(result.valveEventsDeg.crankDischarge).toBeCloseTo(96.72, 1);
    expect(result.valveEventsDeg.crankSuction).toBeCloseTo(238.0, 1);
  });

  it('should peak at 145.3 kN compression at 286.2° and 111.8 kN tension at 96.72°', () => {
    expectClose(result.combined.compressionN / 1000, 145.3, 2e-3);
    expectClose(result.combined.tensionN / 1000, 111.8, 2e-3);
    expect(Math.abs(result.combined.compressionAtDeg - 286.2)).toBeLessThanOrEqual(0.5);
    expect(Math.abs(result.combined.tensionAtDeg - 96.72)).toBeLessThanOrEqual(0.5);
  });

  it('should reverse for 188.8° of tension at 0.7699 of the compression peak, and pass', () => {
    expect(Math.abs(result.reversal.degrees - 188.8)).toBeLessThanOrEqual(0.5);
    expectClose(result.reversal.fraction, 0.7699, 2e-3);
    expect(result.reversal.meetsCriterion).toBe(true);
    expect(result.status).toBe('ok');
  });

  it('should match the spot values at 0°, 30°, 90°, 180°, 240°, 270° and 300°', () => {
    const spots: Array<[number, number, number, number]> = [
      [0, 152.6, -82.08, 70.55],
      [30, 45.07, -66.21, -21.14],
      [90, -107.0, 13.96, -93.02],
      [180, -133.4, 54.72, -78.69],
      [240, 34.34, 41.04, 75.38],
      [270, 91.06, 13.96, 105.0],
      [300, 152.6, -27.36, 125.3],
    ];
    for (const [deg, gas, inertia, combined] of spots) {
      const index = result.curve.crankDeg.indexOf(deg);
      expectClose((result.curve.gasN[index] as number) / 1000, gas, 2e-3);
      expectClose((result.curve.inertiaN[index] as number) / 1000, inertia, 2e-3);
      expectClose((result.curve.combinedN[index] as number) / 1000, combined, 2e-3);
    }
  });

  it('should return a 1° curve whose combined load is gas plus inertia', () => {
    expect(result.curve.crankDeg).toHaveLength(360);
    result.curve.combinedN.forEach((combined, index) => {
      expect(combined).toBeCloseTo((result.curve.gasN[index] as number) + (result.curve.inertiaN[index] as number), 6);
    });
    expect(Math.max(...result.curve.headPressurePa)).toBeCloseTo(50e5, 0);
    expect(Math.min(...result.curve.crankPressurePa)).toBeCloseTo(20e5, 0);
  });
});

describe('rodLoad: physics that must hold', () => {
  // source: slider-crank kinematics: inertia force magnitude m·r·ω²·(1 + λ) at 0° and m·r·ω²·(1 − λ) at 180°
  it('should reverse symmetrically under inertia alone, with the (1 − λ)/(1 + λ) fraction', () => {
    const p = 101_325;
    const result = rodLoad({ ...R1, suctionPressurePa: p, dischargePressurePa: p, distancePiecePressurePa: p });
    expect(result.gas.compressionN).toBeCloseTo(0, 6);
    expect(result.gas.tensionN).toBeCloseTo(0, 6);
    const omega = (2 * Math.PI * 900) / 60;
    expectClose(result.combined.tensionN, 110 * 0.07 * omega ** 2 * 1.2, 1e-9);
    expectClose(result.combined.compressionN, 110 * 0.07 * omega ** 2 * 0.8, 1e-9);
    expectClose(result.reversal.fraction, 0.8 / 1.2, 1e-9);
    // Minority direction is compression, centred on 180°: its arc is symmetric about bottom dead centre.
    const index = result.curve.combinedN.findIndex((load) => load > 0);
    const last = result.curve.combinedN.findLastIndex((load) => load > 0);
    expect(index + last).toBeGreaterThanOrEqual(358);
    expect(index + last).toBeLessThanOrEqual(362);
  });

  it('should never reverse single-acting with no inertia, and say so as an alarm', () => {
    const result = rodLoad({ ...R1, crankActive: false, reciprocatingMassKg: 0 });
    expect(result.combined.tensionN).toBe(0);
    expect(result.reversal).toEqual({ degrees: 0, fraction: 0, meetsCriterion: false });
    expect(result.status).toBe('alarm');
    expect(result.message).toMatch(/never reverses/);
  });

  it('should watch at 90 % of a rating and alarm at 100 %', () => {
    const peak = rodLoad(R1).combined.compressionN;
    const gasPeak = rodLoad(R1).gas.compressionN;
    expect(rodLoad({ ...R1, ratedCompressionN: gasPeak / 0.9 + 1 }).status).toBe('ok');
    expect(rodLoad({ ...R1, ratedCompressionN: gasPeak / 0.9 - 1 }).status).toBe('watch');
    expect(rodLoad({ ...R1, ratedCompressionN: gasPeak }).status).toBe('alarm');
    expect(peak).toBeLessThan(gasPeak);
  });

  it('should apply a frame maker’s stricter reversal criterion', () => {
    expect(REVERSAL_CRITERION_DEFAULT).toEqual({ minDegrees: 15, minFraction: 0.03 });
    const strict = rodLoad({ ...R1, reversalCriterion: { minDegrees: 15, minFraction: 0.8 } });
    expect(strict.reversal.meetsCriterion).toBe(false);
    expect(strict.status).toBe('alarm');
    expect(strict.message).toMatch(/Reversal too weak/);
  });

  it('should never lower the peak inertia load when the speed rises (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: 1500, noNaN: true }),
        fc.double({ min: 1, max: 500, noNaN: true }),
        (speed, more) => {
          const p = 101_325;
          const at = (speedRpm: number) => {
            const r = rodLoad({
              ...R1,
              speedRpm,
              suctionPressurePa: p,
              dischargePressurePa: p,
              distancePiecePressurePa: p,
            });
            return Math.max(...r.curve.inertiaN.map(Math.abs));
          };
          return at(speed + more) >= at(speed);
        },
      ),
      { numRuns: 40 },
    );
  });

  it('should reach the static gas extremes whenever both ends deliver (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.05, max: 0.3, noNaN: true }),
        fc.double({ min: 0.05, max: 0.3, noNaN: true }),
        fc.double({ min: 1.2, max: 3, noNaN: true }),
        fc.double({ min: 1.1, max: 1.4, noNaN: true }),
        (headClearance, crankClearance, ratio, exponent) => {
          const ps = 20e5;
          const pd = ps * ratio;
          const r = rodLoad({
            ...R1,
            headClearance,
            crankClearance,
            exponent,
            dischargePressurePa: pd,
            reciprocatingMassKg: 0,
          });
          const pdg = pd - 101_325;
          const psg = ps - 101_325;
          return (
            Math.abs(r.gas.compressionN - (pdg * areaHead - psg * areaCrank)) < 1e-6 * r.gas.compressionN &&
            Math.abs(r.gas.tensionN - (pdg * areaCrank - psg * areaHead)) < 1e-6 * r.gas.tensionN
          );
        },
      ),
      { numRuns: 40 },
    );
  });

  it('should keep reversal figures inside their ranges and consistent with the criterion (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 400, noNaN: true }),
        fc.double({ min: 1, max: 4, noNaN: true }),
        fc.boolean(),
        (mass, ratio, crankActive) => {
          const r = rodLoad({ ...R1, reciprocatingMassKg: mass, dischargePressurePa: 20e5 * ratio, crankActive });
          const { degrees, fraction, meetsCriterion } = r.reversal;
          return (
            degrees >= 0 &&
            degrees < 360 &&
            fraction >= 0 &&
            fraction <= 1 &&
            meetsCriterion === (degrees >= 15 && fraction >= 0.03) &&
            (meetsCriterion || r.status === 'alarm')
          );
        },
      ),
      { numRuns: 40 },
    );
  });
});

describe('rodLoad: bad input', () => {
  it('should refuse impossible geometry and pressures', () => {
    expectCalcError(() => rodLoad({ ...R1, rodM: 0.25 }), 'E_GEOMETRY', 'rodM');
    expectCalcError(() => rodLoad({ ...R1, connectingRodM: 0.07 }), 'E_GEOMETRY', 'connectingRodM');
    expectCalcError(() => rodLoad({ ...R1, speedRpm: 0 }), 'E_GEOMETRY', 'speedRpm');
    expectCalcError(() => rodLoad({ ...R1, reciprocatingMassKg: -1 }), 'E_GEOMETRY', 'reciprocatingMassKg');
    expectCalcError(() => rodLoad({ ...R1, dischargePressurePa: 19e5 }), 'E_RATIO_LT_1', 'dischargePressurePa');
    expectCalcError(() => rodLoad({ ...R1, headClearance: 0 }), 'E_CLEARANCE_RANGE', 'headClearance');
    expectCalcError(() => rodLoad({ ...R1, exponent: 1 }), 'E_K_RANGE', 'exponent');
    expectCalcError(
      () => rodLoad({ ...R1, distancePiecePressurePa: 0 }),
      'E_ABS_NONPOSITIVE',
      'distancePiecePressurePa',
    );
  });
});
