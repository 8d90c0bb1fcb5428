import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { barometricPressure, fromSI } from '../../src/calc';
import { expectCalcError } from './helpers';

describe('barometricPressure', () => {
  // source: U.S. Standard Atmosphere 1976, table I (geometric altitude): pressures to five significant figures
  it.each([
    [0, 101_325],
    [500, 95_461],
    [1000, 89_876],
    [1500, 84_559],
    [2000, 79_501],
    [2500, 74_691],
    [3000, 70_121],
  ])('should give the published pressure at %d m within 1 Pa', (elevationM, expectedPa) => {
    expect(Math.abs(barometricPressure(elevationM) - expectedPa)).toBeLessThanOrEqual(1);
  });

  // source: ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 3: p[psia] = 14.696·(1 − 6.8754e-6·Z[ft])^5.2559
  it('should agree with the ASHRAE inch-pound form within 0.002 psi from 0 to 10 000 ft', () => {
    for (let feet = 0; feet <= 10_000; feet += 500) {
      const ashrae = 14.696 * (1 - 6.8754e-6 * feet) ** 5.2559;
      const ours = fromSI(barometricPressure(feet * 0.3048), 'psia');
      expect(Math.abs(ours - ashrae), `${feet} ft`).toBeLessThanOrEqual(0.002);
    }
  });

  it('should accept the tool range −500 m to 5000 m and refuse outside it', () => {
    expect(barometricPressure(-500)).toBeGreaterThan(101_325);
    expect(barometricPressure(5000)).toBeGreaterThan(50_000);
    expectCalcError(() => barometricPressure(-501), 'E_ELEVATION_RANGE', 'elevationM');
    expectCalcError(() => barometricPressure(5000.1), 'E_ELEVATION_RANGE', 'elevationM');
    expectCalcError(() => barometricPressure(Number.NaN), 'E_NOT_FINITE', 'elevationM');
  });

  it('should fall steadily with elevation (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: -500, max: 4999, noNaN: true }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        (z, dz) => barometricPressure(z + dz) < barometricPressure(z),
      ),
    );
  });
});
