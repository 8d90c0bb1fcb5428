import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { isentropicPower, powerCurve, type StageInput } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose } from './helpers';

describe('isentropicPower', () => {
  // P1 of the engineering reference: Q 565.7 m³/h at 20 bara, r 2.5, k 1.28, Zs 0.955, Zd 0.935 → 315.5 kW
  it('P1: 315.5 kW', () => {
    const watts = isentropicPower({
      suctionPressurePa: 20e5,
      inletFlowM3s: 565.7 / 3600,
      pressureRatio: 2.5,
      k: 1.28,
      zSuction: 0.955,
      zDischarge: 0.935,
    });
    expectClose(watts / 1000, 315.5);
  });

  // source: ideal-gas isentropic work: at r = 1 no work is done
  it('should be zero at ratio 1 and refuse bad input', () => {
    expect(isentropicPower({ suctionPressurePa: 1e6, inletFlowM3s: 1, pressureRatio: 1, k: 1.3 })).toBe(0);
    expectCalcError(
      () => isentropicPower({ suctionPressurePa: 1e6, inletFlowM3s: 1, pressureRatio: 0.9, k: 1.3 }),
      'E_RATIO_LT_1',
      'pressureRatio',
    );
    expectCalcError(
      () => isentropicPower({ suctionPressurePa: 1e6, inletFlowM3s: -1, pressureRatio: 2, k: 1.3 }),
      'E_VE_NONPOSITIVE',
      'inletFlowM3s',
    );
    expectCalcError(
      () => isentropicPower({ suctionPressurePa: 1e6, inletFlowM3s: 1, pressureRatio: 2, k: 1.3, zSuction: 0 }),
      'E_Z_RANGE',
      'zSuction',
    );
  });
});

/**
 * Cylinder whose total displacement is 720.8 m³/h (V1 geometry), clearance 0.16 both ends, k = 1.28, ideal gas,
 * theoretical VE: the power curve P2 of the engineering reference.
 */
const P2: StageInput = {
  boreM: 0.25,
  rodM: 0.06,
  strokeM: 0.14,
  speedRpm: 900,
  headClearance: 0.16,
  crankClearance: 0.16,
  headActive: true,
  crankActive: true,
  suctionPressurePa: 20e5,
  dischargePressurePa: 50e5,
  suctionTemperatureK: C_TO_K(30),
  k: 1.28,
  veMethod: 'theoretical',
};

describe('powerCurve', () => {
  it('P2: the tabulated points from 30 to 240 bara', () => {
    const table: Array<[number, number]> = [
      [30, 159.7],
      [40, 265.3],
      [50, 338.3],
      [60, 389.2],
      [80, 445.8],
      [100, 461.5],
      [120, 449.2],
      [140, 416.0],
      [160, 366.7],
      [180, 304.5],
      [200, 231.5],
      [220, 149.5],
      [240, 59.64],
    ];
    const curve = powerCurve({ ...P2, dischargePressuresPa: table.map(([bara]) => bara * 1e5) });
    curve.points.forEach((point, index) => {
      const [bara, kw] = table[index] as [number, number];
      expect(point.dischargePressurePa).toBe(bara * 1e5);
      expectClose(point.powerW / 1000, kw);
    });
  });

  it('P2: peak 461.5 kW at r = 5.005 (100.1 bara), no delivery at r₀ = 12.63', () => {
    const curve = powerCurve(P2);
    expectClose(curve.peak.powerW / 1000, 461.5);
    expectClose(curve.peak.pressureRatio, 5.005, 1e-3);
    expectClose(curve.peak.dischargePressurePa / 1e5, 100.1);
    // source: theoretical VE = 0 at r₀ = (1 + 1/C)^k (closed form of the VE formula)
    expectClose(curve.noDeliveryPressurePa / 20e5, (1 + 1 / 0.16) ** 1.28, 1e-9);
    expect(curve.points).toHaveLength(100);
    expect(curve.points[0]?.powerW).toBe(0);
    expect(curve.points[99]?.powerW).toBeCloseTo(0, 6);
  });

  // Peak ratios r* (and r₀) of the engineering reference §7.2 for theoretical VE, found there by golden-section search
  it.each([
    [0.08, 1.28, 9.243, 27.98],
    [0.16, 1.28, 5.005, 12.63],
    [0.3, 1.28, 3.111, 6.533],
    [0.4, 1.28, 2.581, 4.971],
    [0.08, 1.4, 12.11, 38.24],
    [0.16, 1.4, 6.047, 16.01],
    [0.3, 1.4, 3.537, 7.79],
    [0.4, 1.4, 2.867, 5.777],
  ])('C = %d, k = %d: peak at r* = %d, no delivery at r₀ = %d', (clearance, k, peakRatio, stopRatio) => {
    const curve = powerCurve({ ...P2, headClearance: clearance, crankClearance: clearance, k });
    expectClose(curve.peak.pressureRatio, peakRatio, 1e-3);
    expectClose(curve.noDeliveryPressurePa / P2.suctionPressurePa, stopRatio, 1e-3);
  });

  it('should have one peak inside (1, r₀) for one clearance (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.04, max: 0.6, noNaN: true }),
        fc.double({ min: 1.1, max: 1.6, noNaN: true }),
        fc.constantFrom('theoretical' as const, 'empirical' as const),
        (clearance, k, veMethod) => {
          const curve = powerCurve({ ...P2, headClearance: clearance, crankClearance: clearance, k, veMethod });
          const stopRatio = curve.noDeliveryPressurePa / P2.suctionPressurePa;
          const powers = curve.points.map((point) => point.powerW);
          let turns = 0;
          for (let index = 1; index < powers.length - 1; index += 1) {
            const here = powers[index] as number;
            if (here > (powers[index - 1] as number) && here >= (powers[index + 1] as number)) turns += 1;
          }
          return (
            turns === 1 &&
            curve.peak.pressureRatio > 1 &&
            curve.peak.pressureRatio < stopRatio &&
            curve.peak.powerW >= Math.max(...powers) * (1 - 1e-9)
          );
        },
      ),
      { numRuns: 60 },
    );
  });

  it('should report the highest point when the two ends have different clearances (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.04, max: 0.6, noNaN: true }),
        fc.double({ min: 0.04, max: 0.6, noNaN: true }),
        fc.double({ min: 1.1, max: 1.6, noNaN: true }),
        (headClearance, crankClearance, k) => {
          const curve = powerCurve({ ...P2, headClearance, crankClearance, k });
          return curve.points.every((point) => point.powerW <= curve.peak.powerW * (1 + 1e-9));
        },
      ),
      { numRuns: 60 },
    );
  });

  it('should refuse a curve for a cylinder with no clearance and no end working', () => {
    expectCalcError(() => powerCurve({ ...P2, headClearance: 0, crankClearance: 0 }), 'E_CLEARANCE_RANGE', 'clearance');
    expectCalcError(() => powerCurve({ ...P2, headActive: false, crankActive: false }), 'E_GEOMETRY', 'headActive');
  });
});
