import { describe, expect, it } from 'vitest';
import { assessBearingTemperature, BEARING_LIMITS_DEFAULT, bearingClearance, toSI } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose } from './helpers';

const AT = '2026-03-01T08:00:00Z';
const EIGHT_HOURS_EARLIER = '2026-03-01T00:00:00Z';

describe('assessBearingTemperature: worked examples §5.4 (judged with common-practice thresholds)', () => {
  it('B1: 84 °C, oil 63 °C, 77 °C eight hours earlier → rise 21 K, +7 K, 0.875 K/h → watch', () => {
    const result = assessBearingTemperature({
      temperatureK: C_TO_K(84),
      oilSupplyK: C_TO_K(63),
      previous: { temperatureK: C_TO_K(77), at: EIGHT_HOURS_EARLIER },
      at: AT,
      limits: {},
    });
    expectClose(result.riseOverOilK ?? 0, 21, 1e-9);
    expectClose(result.riseSincePreviousK ?? 0, 7, 1e-9);
    expectClose(result.rateKPerH ?? 0, 0.875, 1e-9);
    expect(result.status).toBe('watch');
    expect(result.message).toMatch(/since the last round/);
  });

  it('B2: 97 °C with oil at 64 °C → alarm (absolute) with the 33 K rise named too', () => {
    const result = assessBearingTemperature({ temperatureK: C_TO_K(97), oilSupplyK: C_TO_K(64), at: AT, limits: {} });
    expect(result.status).toBe('alarm');
    expect(result.message).toMatch(/alarm 93\.0 °C/);
    expect(result.message).toMatch(/33\.0 K above the oil supply/);
    expect(result.message).toMatch(/site procedure/);
  });

  // source: the 93 °C / 104 °C (200 °F / 220 °F) defaults are placeholders (common practice); OEM values govern
  it('should use 93 °C alarm and 104 °C trip unless the configuration says otherwise', () => {
    expect(BEARING_LIMITS_DEFAULT.alarmK).toBeCloseTo(C_TO_K(93), 9);
    expect(toSI(200, 'degF')).toBeCloseTo(C_TO_K(93.333), 2);
    expect(assessBearingTemperature({ temperatureK: C_TO_K(104), at: AT, limits: {} }).status).toBe('trip');
    expect(assessBearingTemperature({ temperatureK: C_TO_K(103.99), at: AT, limits: {} }).status).toBe('alarm');
    expect(assessBearingTemperature({ temperatureK: C_TO_K(92.99), at: AT, limits: {} }).status).toBe('ok');
    expect(assessBearingTemperature({ temperatureK: C_TO_K(85), at: AT, limits: { alarmK: C_TO_K(85) } }).status).toBe(
      'alarm',
    );
  });
});

describe('assessBearingTemperature: threshold edges', () => {
  const withOil = (riseK: number) =>
    assessBearingTemperature({ temperatureK: C_TO_K(50) + riseK, oilSupplyK: C_TO_K(50), at: AT, limits: {} }).status;
  const sinceLast = (riseK: number, at = AT) =>
    assessBearingTemperature({
      temperatureK: C_TO_K(60) + riseK,
      previous: { temperatureK: C_TO_K(60), at: EIGHT_HOURS_EARLIER },
      at,
      limits: {},
    }).status;
  const peers = (deltaK: number) =>
    assessBearingTemperature({
      temperatureK: C_TO_K(60) + deltaK,
      peersK: [C_TO_K(59), C_TO_K(60), C_TO_K(61)],
      at: AT,
      limits: {},
    }).status;

  it('rise over oil: watch at 30 K, alarm at 40 K', () => {
    expect([withOil(29.99), withOil(30), withOil(39.99), withOil(40)]).toEqual(['ok', 'watch', 'watch', 'alarm']);
  });

  it('rise since the last round: watch at 5 K, alarm at 10 K', () => {
    expect([sinceLast(4.99), sinceLast(5), sinceLast(9.99), sinceLast(10)]).toEqual(['ok', 'watch', 'watch', 'alarm']);
  });

  it('rate: watch at 2 K/h, alarm at 5 K/h (a 4 K rise in 2 h and in 48 min)', () => {
    expect(sinceLast(4, '2026-03-01T02:00:00Z')).toBe('watch');
    expect(sinceLast(4, '2026-03-01T00:48:00Z')).toBe('alarm');
    expect(sinceLast(3.99, '2026-03-01T02:00:00Z')).toBe('ok');
  });

  it('mains against their peers: watch at 8 K, alarm at 15 K', () => {
    expect([peers(7.99), peers(8), peers(14.99), peers(15)]).toEqual(['ok', 'watch', 'watch', 'alarm']);
  });

  it('should flag an oil supply more than 5 K hotter than the bearing', () => {
    const suspect = assessBearingTemperature({
      temperatureK: C_TO_K(50),
      oilSupplyK: C_TO_K(55.01),
      at: AT,
      limits: {},
    });
    expect(suspect.warnings).toEqual(['W_SENSOR_SUSPECT']);
    expect(suspect.message).toMatch(/check both sensors/);
    expect(
      assessBearingTemperature({ temperatureK: C_TO_K(50), oilSupplyK: C_TO_K(55), at: AT, limits: {} }).warnings,
    ).toEqual([]);
  });

  it('should refuse readings out of range and rounds out of order', () => {
    expectCalcError(
      () => assessBearingTemperature({ temperatureK: C_TO_K(201), at: AT, limits: {} }),
      'E_TEMP_RANGE',
      'temperatureK',
    );
    expectCalcError(
      () => assessBearingTemperature({ temperatureK: C_TO_K(-41), at: AT, limits: {} }),
      'E_TEMP_RANGE',
      'temperatureK',
    );
    expectCalcError(
      () =>
        assessBearingTemperature({
          temperatureK: C_TO_K(60),
          previous: { temperatureK: C_TO_K(59), at: AT },
          at: AT,
          limits: {},
        }),
      'E_TIME_ORDER',
      'previous.at',
    );
    expectCalcError(
      () => assessBearingTemperature({ temperatureK: C_TO_K(60), at: 'yesterday', limits: {} }),
      'E_TIME_ORDER',
      'at',
    );
  });
});

describe('bearingClearance: worked examples §10 (rule of thumb 1 ‰ is common practice)', () => {
  const inch = (value: number) => toSI(value, 'in');

  it('J1: 0.0115 in on a 9.000 in main (1.278 mil/in), OEM 0.0070–0.0100 in → above max: watch, alarm past a wear limit', () => {
    const input = { measuredM: inch(0.0115), journalDiameterM: inch(9), specMinM: inch(0.007), specMaxM: inch(0.01) };
    const result = bearingClearance(input);
    expectClose(result.perDiameter * 1000, 1.278);
    expect(result.status).toBe('watch');
    expect(bearingClearance({ ...input, wearLimitM: inch(0.011) }).status).toBe('alarm');
    expect(bearingClearance({ ...input, wearLimitM: inch(0.0115) }).status).toBe('watch');
  });

  it('J2: 0.17 mm on a 180 mm crankpin (0.9444 ‰), OEM 0.14–0.20 mm → ok', () => {
    const result = bearingClearance({
      measuredM: 0.17e-3,
      journalDiameterM: 0.18,
      specMinM: 0.14e-3,
      specMaxM: 0.2e-3,
    });
    expectClose(result.perDiameter * 1000, 0.9444);
    expect(result.status).toBe('ok');
    expect(result.warnings).toEqual([]);
  });

  it('should call a clearance under the minimum tight', () => {
    const result = bearingClearance({
      measuredM: 0.13e-3,
      journalDiameterM: 0.18,
      specMinM: 0.14e-3,
      specMaxM: 0.2e-3,
    });
    expect(result.status).toBe('watch');
    expect(result.message).toMatch(/tight/);
  });

  it('should flag figures outside 0.5–2.0 ‰ for re-measurement', () => {
    const low = bearingClearance({ measuredM: 0.089e-3, journalDiameterM: 0.18 });
    expect(low.warnings).toEqual(['W_CHECK_MEASUREMENT']);
    expect(low.status).toBe('watch');
    expect(bearingClearance({ measuredM: 0.091e-3, journalDiameterM: 0.18 }).warnings).toEqual([]);
    expect(bearingClearance({ measuredM: 0.361e-3, journalDiameterM: 0.18 }).warnings).toEqual(['W_CHECK_MEASUREMENT']);
  });

  it('should refuse impossible sizes and ranges', () => {
    expectCalcError(() => bearingClearance({ measuredM: 0, journalDiameterM: 0.18 }), 'E_GEOMETRY', 'measuredM');
    expectCalcError(
      () => bearingClearance({ measuredM: 0.1e-3, journalDiameterM: -1 }),
      'E_GEOMETRY',
      'journalDiameterM',
    );
    expectCalcError(
      () => bearingClearance({ measuredM: 0.1e-3, journalDiameterM: 0.18, specMinM: 0.2e-3, specMaxM: 0.1e-3 }),
      'E_GEOMETRY',
      'specMaxM',
    );
  });
});
