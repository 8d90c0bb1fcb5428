import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { pistonDisplacement, stagePerformance, toSI, volumetricEfficiency } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose } from './helpers';

/** Cylinder V1 of the engineering reference (illustrative inputs; results computed from the cited formulas). */
const V1 = {
  boreM: 0.25,
  rodM: 0.06,
  strokeM: 0.14,
  speedRpm: 900,
  headClearance: 0.16,
  crankClearance: 0.19,
  headActive: true,
  crankActive: true,
  suctionPressurePa: 20e5,
  dischargePressurePa: 50e5,
  suctionTemperatureK: C_TO_K(30),
  k: 1.28,
  zSuction: 0.955,
  zDischarge: 0.935,
  veMethod: 'empirical' as const,
};

describe('pistonDisplacement', () => {
  // source: Rules of Thumb for Mechanical Engineers, "Performance calculations for reciprocating compressors":
  // PD_HE = (π/4)·D²·S·N, PD_CE = (π/4)·(D² − d²)·S·N; V1 gives 371.1 and 349.7 m³/h
  it('V1: 371.1 m³/h head end, 349.7 m³/h crank end, 720.8 m³/h in all', () => {
    const pd = pistonDisplacement({ boreM: 0.25, rodM: 0.06, strokeM: 0.14, speedRpm: 900, ends: 'both' });
    expectClose(pd.headM3s * 3600, 371.1);
    expectClose(pd.crankM3s * 3600, 349.7);
    expectClose(pd.totalM3s * 3600, 720.8);
  });

  it('V2 (US units): 456.3 ft³/min for 8.5 in bore, 2.25 in rod, 6 in stroke, 1200 rpm', () => {
    const pd = pistonDisplacement({
      boreM: toSI(8.5, 'in'),
      rodM: toSI(2.25, 'in'),
      strokeM: toSI(6, 'in'),
      speedRpm: 1200,
      ends: 'both',
    });
    expectClose(pd.totalM3s / toSI(1, 'ft3/min'), 456.3);
  });

  it('should count only the active end, and take a tail rod off the head end', () => {
    const input = { boreM: 0.2, rodM: 0.05, strokeM: 0.1, speedRpm: 600 };
    const both = pistonDisplacement({ ...input, ends: 'both' });
    expect(pistonDisplacement({ ...input, ends: 'head' })).toEqual({
      headM3s: both.headM3s,
      crankM3s: 0,
      totalM3s: both.headM3s,
    });
    expect(pistonDisplacement({ ...input, ends: 'crank' }).totalM3s).toBe(both.crankM3s);
    const tail = pistonDisplacement({ ...input, ends: 'both', tailRodM: 0.05 });
    expect(tail.headM3s).toBeCloseTo(tail.crankM3s, 15);
  });

  it('should refuse a rod as wide as the bore and impossible sizes', () => {
    const good = { boreM: 0.2, rodM: 0.05, strokeM: 0.1, speedRpm: 600, ends: 'both' as const };
    expectCalcError(() => pistonDisplacement({ ...good, rodM: 0.2 }), 'E_GEOMETRY', 'rodM');
    expectCalcError(() => pistonDisplacement({ ...good, tailRodM: 0.25 }), 'E_GEOMETRY', 'tailRodM');
    expectCalcError(() => pistonDisplacement({ ...good, boreM: 0 }), 'E_GEOMETRY', 'boreM');
    expectCalcError(() => pistonDisplacement({ ...good, speedRpm: -1 }), 'E_GEOMETRY', 'speedRpm');
  });
});

describe('volumetricEfficiency', () => {
  // V1 of the engineering reference: theoretical 0.8327 / 0.8013; GPSA form with A = 100: 0.8006 / 0.7680,
  // with A = 96: 0.7606 / 0.7280
  it.each([
    [0.16, 'theoretical', 100, 0.8327],
    [0.19, 'theoretical', 100, 0.8013],
    [0.16, 'empirical', 100, 0.8006],
    [0.19, 'empirical', 100, 0.768],
    [0.16, 'empirical', 96, 0.7606],
    [0.19, 'empirical', 96, 0.728],
  ] as const)('C = %d, %s, A = %d gives %d', (clearanceFraction, method, constant, expected) => {
    const ve = volumetricEfficiency({
      clearanceFraction,
      pressureRatio: 2.5,
      k: 1.28,
      method,
      zSuction: 0.955,
      zDischarge: 0.935,
      constant,
    });
    expectClose(ve, expected);
  });

  it('should be 1 at ratio 1 (theoretical) and refuse an end that cannot deliver', () => {
    expect(volumetricEfficiency({ clearanceFraction: 0.2, pressureRatio: 1, k: 1.3, method: 'theoretical' })).toBe(1);
    const error = expectCalcError(
      () => volumetricEfficiency({ clearanceFraction: 0.16, pressureRatio: 13, k: 1.28, method: 'theoretical' }),
      'E_VE_NONPOSITIVE',
      'pressureRatio',
    );
    expect(error.message).toMatch(/No delivery at this ratio and clearance/);
  });

  it('should refuse VE above 1 and clearances outside 0–2', () => {
    expectCalcError(
      () =>
        volumetricEfficiency({ clearanceFraction: 0, pressureRatio: 1, k: 1.3, method: 'empirical', constant: 105 }),
      'E_VE_GT_1',
      'constant',
    );
    expectCalcError(
      () => volumetricEfficiency({ clearanceFraction: 2.1, pressureRatio: 2, k: 1.3, method: 'theoretical' }),
      'E_CLEARANCE_RANGE',
      'clearanceFraction',
    );
    expectCalcError(
      () => volumetricEfficiency({ clearanceFraction: -0.01, pressureRatio: 2, k: 1.3, method: 'theoretical' }),
      'E_CLEARANCE_RANGE',
      'clearanceFraction',
    );
  });

  it('should fall as the ratio rises (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.01, max: 0.5, noNaN: true }),
        fc.double({ min: 1, max: 4, noNaN: true }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        fc.double({ min: 1.05, max: 1.67, noNaN: true }),
        fc.constantFrom('theoretical' as const, 'empirical' as const),
        (clearanceFraction, ratio, step, k, method) => {
          const ve = (r: number) => {
            try {
              return volumetricEfficiency({ clearanceFraction, pressureRatio: r, k, method });
            } catch {
              return 0; // no delivery
            }
          };
          const before = ve(ratio);
          const after = ve(ratio + step);
          return after < before || (before === 0 && after === 0);
        },
      ),
    );
  });
});

describe('stagePerformance', () => {
  // V1 of the engineering reference: Q_in 565.7 m³/h actual → 470.0 kmol/h = 11 110 Sm³/h; power example P1:
  // isentropic 315.5 kW, shaft 390.7 kW with η_c 0.85 and η_m 0.95
  it('V1/P1: capacity, standard flow and power', () => {
    const result = stagePerformance(V1);
    expectClose(result.pressureRatio, 2.5, 1e-12);
    expectClose(result.inletFlowM3s * 3600, 565.7);
    expectClose(result.molarFlowMolS * 3.6, 470.0);
    expectClose(result.standardFlowM3s * 3600, 11_110);
    expectClose(result.isentropicPowerW / 1000, 315.5);
    expectClose(result.shaftPowerW / 1000, 390.7);
    expect(result.head.volumetricEfficiency).toBeCloseTo(0.8006, 4);
    expect(result.crank.volumetricEfficiency).toBeCloseTo(0.768, 4);
    expect(result.massFlowKgS).toBeNull();
    expect(result.delivers).toBe(true);
    expectClose(result.predictedDischargeTemperatureK, C_TO_K(30) * 2.5 ** (0.28 / 1.28), 1e-12);
  });

  // source: GPSA Engineering Data Book, sec. 13 rough check BHP ≈ 22·r·MMSCFD·F (F = 1 for one stage; from memory)
  it('should agree with the rough horsepower rule within 2 %', () => {
    const result = stagePerformance({ ...V1, standardBasis: 'SCF-60F' });
    const mmscfd = (result.standardFlowM3s / 0.028316846592) * (86_400 / 1e6);
    const roughHp = 22 * result.pressureRatio * mmscfd;
    expectClose(result.shaftPowerW / 745.6998715822702, roughHp, 0.02);
  });

  it('V2 (US units): 353.0 ACFM = 1844 SCFM with A = 100', () => {
    const result = stagePerformance({
      boreM: toSI(8.5, 'in'),
      rodM: toSI(2.25, 'in'),
      strokeM: toSI(6, 'in'),
      speedRpm: 1200,
      headClearance: 0.15,
      crankClearance: 0.15,
      headActive: true,
      crankActive: true,
      suctionPressurePa: toSI(65, 'psig', { barometricPa: toSI(14.696, 'psia') }),
      dischargePressurePa: toSI(215, 'psig', { barometricPa: toSI(14.696, 'psia') }),
      suctionTemperatureK: toSI(80, 'degF'),
      k: 1.26,
      veMethod: 'empirical',
      standardBasis: 'SCF-60F',
    });
    expectClose(result.head.volumetricEfficiency, 0.7737);
    expectClose(result.inletFlowM3s / toSI(1, 'ft3/min'), 353.0);
    expectClose(result.standardFlowM3s / toSI(1, 'ft3/min'), 1844);
  });

  it('should give a mass flow from the composition, and half the flow with one end unloaded', () => {
    const gas = {
      methane: 0.9,
      ethane: 0.05,
      propane: 0.02,
      isobutane: 0.005,
      nbutane: 0.005,
      nitrogen: 0.01,
      carbonDioxide: 0.01,
    };
    const { k: _k, ...withoutK } = V1;
    const both = stagePerformance({ ...withoutK, composition: gas });
    expect(both.massFlowKgS).toBeCloseTo(both.molarFlowMolS * 0.018125063, 9);
    const headOnly = stagePerformance({ ...V1, crankActive: false });
    expect(headOnly.crank).toMatchObject({ active: false, delivers: false, inletFlowM3s: 0 });
    expect(headOnly.inletFlowM3s).toBeCloseTo(both.head.inletFlowM3s, 3);
  });

  it('should report an end that no longer delivers instead of a negative flow', () => {
    const result = stagePerformance({ ...V1, veMethod: 'theoretical', dischargePressurePa: 20e5 * 13 });
    expect(result.head.delivers).toBe(false);
    expect(result.head.inletFlowM3s).toBe(0);
    expect(result.crank.delivers).toBe(false);
    expect(result.delivers).toBe(false);
    expect(result.isentropicPowerW).toBe(0);
  });

  it('should refuse efficiencies outside (0.5, 1] and contradictory gas data', () => {
    expectCalcError(
      () => stagePerformance({ ...V1, compressionEfficiency: 0.5 }),
      'E_EFFICIENCY_RANGE',
      'compressionEfficiency',
    );
    expectCalcError(
      () => stagePerformance({ ...V1, mechanicalEfficiency: 1.01 }),
      'E_EFFICIENCY_RANGE',
      'mechanicalEfficiency',
    );
    expectCalcError(() => stagePerformance({ ...V1, composition: { methane: 1 } }), 'E_K_RANGE', 'k');
  });
});
