import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { deltaFromSI, deltaToSI, fromSI, SI_UNIT, toSI, UNITS, unitInfo } from '../../src/calc';
import { expectCalcError, expectClose } from './helpers';

const SEA_LEVEL = { barometricPa: 101_325 };

describe('toSI and fromSI: exact unit definitions', () => {
  // source: NIST SP 811 (2008), appendix B.8 and B.9; exact factors
  it.each([
    [1, 'psia', 6894.757293168361],
    [1, 'bara', 100_000],
    [1, 'kPaa', 1000],
    [1, 'MPaa', 1_000_000],
    [1, 'kgcm2a', 98_066.5],
    [1, 'in', 0.0254],
    [1, 'mil', 0.0000254],
    [1, 'mm', 0.001],
    [1, 'kW', 1000],
    [1, 'hp', 745.6998715822702],
    [1, 'ft3/min', 0.028316846592 / 60],
    [3600, 'm3/h', 1],
  ])('should convert %d %s to %d SI', (value, unit, expected) => {
    expect(toSI(value, unit)).toBeCloseTo(expected, 12);
  });

  // source: definitions of the Celsius, Fahrenheit and Rankine scales (NIST SP 811, B.9)
  it('should convert temperatures exactly: 45 °C = 318.15 K = 113 °F = 572.67 °R', () => {
    const kelvin = toSI(45, 'degC');
    expect(kelvin).toBeCloseTo(318.15, 12);
    expect(fromSI(kelvin, 'degF')).toBeCloseTo(113, 10);
    expect(fromSI(kelvin, 'degR')).toBeCloseTo(572.67, 10);
    expect(toSI(32, 'degF')).toBeCloseTo(273.15, 12);
    expect(toSI(-40, 'degF')).toBeCloseTo(toSI(-40, 'degC'), 12);
  });

  // source: definition of the standard atmosphere, 101.325 kPa = 14.695 95 psi
  it('should make 0 psig at one standard atmosphere equal 101 325 Pa', () => {
    expect(toSI(0, 'psig', SEA_LEVEL)).toBe(101_325);
    expectClose(fromSI(101_325, 'psia'), 14.69595, 1e-6);
  });
});

describe('gauge to absolute: worked examples of the engineering reference (computed from the definitions above)', () => {
  it('U1: 250 psig at sea level is 264.7 psia = 1825 kPa a = 18.25 bara', () => {
    const pa = toSI(250, 'psig', { barometricPa: toSI(14.696, 'psia') });
    expectClose(fromSI(pa, 'psia'), 264.7);
    expectClose(fromSI(pa, 'kPaa'), 1825);
    expectClose(fromSI(pa, 'bara'), 18.25);
    expectClose(fromSI(pa, 'MPaa'), 1.825);
  });

  it('U2: 35.0 barg at 84.56 kPa barometric is 35.85 bara', () => {
    expectClose(fromSI(toSI(35, 'barg', { barometricPa: 84_560 }), 'bara'), 35.85);
  });

  it('U3: 12.0 kg/cm² g at 89.88 kPa barometric is 1267 kPa a = 183.7 psia', () => {
    const pa = toSI(12, 'kgcm2g', { barometricPa: 89_880 });
    expectClose(fromSI(pa, 'kPaa'), 1267);
    expectClose(fromSI(pa, 'psia'), 183.7);
  });

  it('U4: 100 psig with a 12.23 psia barometer is 112.2 psia', () => {
    expectClose(fromSI(toSI(100, 'psig', { barometricPa: toSI(12.23, 'psia') }), 'psia'), 112.2);
  });

  it('U7: 1000 hp = 745.7 kW and 500 kW = 670.5 hp', () => {
    expectClose(fromSI(toSI(1000, 'hp'), 'kW'), 745.7);
    expectClose(fromSI(toSI(500, 'kW'), 'hp'), 670.5);
  });

  it('should give gauge readings back relative to the same barometer', () => {
    const options = { barometricPa: 95_461 };
    expectClose(fromSI(toSI(42.5, 'barg', options), 'barg', options), 42.5, 1e-12);
  });
});

describe('temperature differences', () => {
  // source: 1 K = 1 °C = 1.8 °F = 1.8 °R as intervals (NIST SP 811, B.9); no +32 offset
  it('should convert a difference with the factor only', () => {
    expect(deltaToSI(18, 'degF')).toBeCloseTo(10, 12);
    expect(deltaToSI(10, 'degC')).toBe(10);
    expect(deltaFromSI(10, 'degF')).toBeCloseTo(18, 12);
    expect(deltaFromSI(10, 'degR')).toBeCloseTo(18, 12);
  });

  it('should refuse units that are not temperature', () => {
    expectCalcError(() => deltaToSI(1, 'psig'), 'E_UNIT_UNKNOWN', 'unit');
    expectCalcError(() => deltaFromSI(1, 'bar'), 'E_UNIT_UNKNOWN', 'unit');
  });
});

describe('the unit list', () => {
  it('should hold every unit the API names, each with a quantity and a label', () => {
    const required =
      'psig psia barg bara kPag kPaa MPag MPaa kgcm2g kgcm2a degC degF K degR mm in m kW hp m3/h ft3/min';
    const ids = UNITS.map((unit) => unit.id);
    for (const id of required.split(' ')) expect(ids).toContain(id);
    for (const unit of UNITS) {
      expect(unit.label.length).toBeGreaterThan(0);
      expect(Object.keys(SI_UNIT)).toContain(unit.quantity);
    }
    expect(unitInfo('kgcm2g')).toEqual({ id: 'kgcm2g', quantity: 'pressure', label: 'kg/cm² g', gauge: true });
  });

  it('should have an SI unit of factor 1 for every quantity', () => {
    for (const unit of Object.values(SI_UNIT)) expect(toSI(7, unit)).toBe(7);
  });
});

describe('bad input', () => {
  it('should refuse unknown units, naming the accepted ones', () => {
    const error = expectCalcError(() => toSI(1, 'atm'), 'E_UNIT_UNKNOWN', 'unit');
    expect(error.message).toContain('psig');
  });

  it('should need the barometer for gauge units', () => {
    expectCalcError(() => toSI(10, 'psig'), 'E_ABS_NONPOSITIVE', 'barometricPa');
    expectCalcError(() => fromSI(200_000, 'barg'), 'E_ABS_NONPOSITIVE', 'barometricPa');
  });

  it('should refuse a gauge reading below full vacuum', () => {
    const error = expectCalcError(() => toSI(-1.1, 'barg', SEA_LEVEL), 'E_BELOW_VACUUM', 'value');
    expect(error.message).toContain('-1.01325 bar g');
  });

  it('should refuse absolute pressures at or below zero and temperatures at or below 0 K', () => {
    expectCalcError(() => toSI(0, 'psia'), 'E_ABS_NONPOSITIVE', 'value');
    expectCalcError(() => fromSI(-5, 'kPaa'), 'E_ABS_NONPOSITIVE', 'valueSI');
    expectCalcError(() => toSI(-273.15, 'degC'), 'E_TEMP_ABS_ZERO', 'value');
    expectCalcError(() => toSI(-500, 'degF'), 'E_TEMP_ABS_ZERO', 'value');
    expectCalcError(() => fromSI(0, 'degC'), 'E_TEMP_ABS_ZERO', 'valueSI');
  });

  it('should refuse values that are not numbers', () => {
    expectCalcError(() => toSI(Number.NaN, 'mm'), 'E_NOT_FINITE', 'value');
    expectCalcError(() => fromSI(Number.POSITIVE_INFINITY, 'mm'), 'E_NOT_FINITE', 'valueSI');
  });
});

describe('round trips (property)', () => {
  it('should round-trip every unit to 1e-12 relative', () => {
    const units = UNITS.map((unit) => unit.id);
    fc.assert(
      fc.property(
        fc.constantFrom(...units),
        fc.double({ min: 1, max: 1e6, noNaN: true }),
        fc.boolean(),
        fc.double({ min: 50_000, max: 110_000, noNaN: true }),
        (unit, magnitude, negative, barometricPa) => {
          const info = unitInfo(unit);
          // Negative values only where the quantity allows them (gauge pressure above vacuum, lengths, power, flow).
          const canBeNegative = info.quantity !== 'pressure' && info.quantity !== 'temperature';
          const value = negative && canBeNegative ? -magnitude : magnitude;
          const si = toSI(value, unit, { barometricPa });
          const back = fromSI(si, unit, { barometricPa });
          return Math.abs(back - value) <= 1e-12 * Math.max(Math.abs(value), 1);
        },
      ),
      { numRuns: 2000 },
    );
  });
});
