import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assessDischargeTemperature, dischargeTemperature, toSI } from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose, K_TO_C } from './helpers';

const PIPELINE_GAS = {
  methane: 0.9,
  ethane: 0.05,
  propane: 0.02,
  isobutane: 0.005,
  nbutane: 0.005,
  nitrogen: 0.01,
  carbonDioxide: 0.01,
};
const D = { suctionTemperatureK: C_TO_K(30), suctionPressurePa: 30e5, dischargePressurePa: 75e5 };

describe('dischargeTemperature', () => {
  // source: ideal-gas isentropic relation T2 = T1·r^((k−1)/k); air from 300 K at r = 10, k = 1.4 gives 579.2 K
  // (a standard textbook result, e.g. Çengel & Boles, Thermodynamics, ch. 7; from memory)
  it('should reproduce the textbook isentropic air example', () => {
    const result = dischargeTemperature({
      suctionTemperatureK: 300,
      suctionPressurePa: 1e5,
      dischargePressurePa: 10e5,
      k: 1.4,
    });
    expectClose(result.temperatureK, 579.2);
    expect(result.pressureRatio).toBe(10);
  });

  // Worked examples D1–D3 of the engineering reference (computed from the cited formulas)
  it('D1: k = 1.28, 30 °C, 30 → 75 bara gives 97.28 °C', () => {
    expectClose(K_TO_C(dischargeTemperature({ ...D, k: 1.28 }).temperatureK), 97.28, 1e-4);
  });

  it('D2: the pipeline gas with k at the mean temperature converges to k = 1.265, 94.09 °C', () => {
    const result = dischargeTemperature({ ...D, composition: PIPELINE_GAS });
    expectClose(K_TO_C(result.temperatureK), 94.09, 1e-4);
    expectClose(result.k, 1.265);
  });

  it('D3: polytropic n = 1.25 gives 90.97 °C', () => {
    expectClose(K_TO_C(dischargeTemperature({ ...D, polytropicExponent: 1.25 }).temperatureK), 90.97, 1e-4);
  });

  it('D5: 65 → 215 psig at 80 °F, k = 1.26: 211.7 °F at sea level, 214.6 °F at 5000 ft', () => {
    const run = (barometricPa: number) => {
      const result = dischargeTemperature({
        suctionTemperatureK: toSI(80, 'degF'),
        suctionPressurePa: toSI(65, 'psig', { barometricPa }),
        dischargePressurePa: toSI(215, 'psig', { barometricPa }),
        k: 1.26,
      });
      return { ratio: result.pressureRatio, degF: (result.temperatureK * 9) / 5 - 459.67 };
    };
    const sea = run(toSI(14.696, 'psia'));
    expectClose(sea.ratio, 2.882);
    expectClose(sea.degF, 211.7);
    const high = run(toSI(12.23, 'psia'));
    expectClose(high.ratio, 2.942);
    expectClose(high.degF, 214.6);
  });

  it('should flag a high ratio and high pressure', () => {
    expect(
      dischargeTemperature({ suctionTemperatureK: 300, suctionPressurePa: 1e5, dischargePressurePa: 12e5, k: 1.4 })
        .warnings,
    ).toEqual(['W_RATIO_HIGH']);
    expect(
      dischargeTemperature({ suctionTemperatureK: 300, suctionPressurePa: 80e5, dischargePressurePa: 160e5, k: 1.3 })
        .warnings,
    ).toEqual(['W_REAL_GAS']);
  });

  it('should refuse contradictory or missing gas data and impossible states', () => {
    expectCalcError(() => dischargeTemperature({ ...D }), 'E_K_RANGE', 'k');
    expectCalcError(() => dischargeTemperature({ ...D, k: 1.3, composition: PIPELINE_GAS }), 'E_K_RANGE', 'k');
    expectCalcError(() => dischargeTemperature({ ...D, k: 1 }), 'E_K_RANGE', 'k');
    expectCalcError(() => dischargeTemperature({ ...D, k: 1.71 }), 'E_K_RANGE', 'k');
    expectCalcError(() => dischargeTemperature({ ...D, polytropicExponent: 0.9 }), 'E_K_RANGE', 'polytropicExponent');
    expectCalcError(
      () => dischargeTemperature({ ...D, k: 1.3, dischargePressurePa: 29e5 }),
      'E_RATIO_LT_1',
      'dischargePressurePa',
    );
    expectCalcError(
      () => dischargeTemperature({ ...D, k: 1.3, suctionTemperatureK: 150 }),
      'E_TEMP_RANGE',
      'suctionTemperatureK',
    );
    expectCalcError(
      () => dischargeTemperature({ ...D, k: 1.3, suctionTemperatureK: 0 }),
      'E_TEMP_ABS_ZERO',
      'suctionTemperatureK',
    );
  });

  it('should predict a hotter discharge at a higher ratio (property)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 250, max: 400, noNaN: true }),
        fc.double({ min: 1, max: 6, noNaN: true }),
        fc.double({ min: 0.01, max: 2, noNaN: true }),
        fc.double({ min: 1.05, max: 1.67, noNaN: true }),
        (ts, ratio, step, k) => {
          const at = (r: number) =>
            dischargeTemperature({ suctionTemperatureK: ts, suctionPressurePa: 1e6, dischargePressurePa: 1e6 * r, k })
              .temperatureK;
          return at(ratio + step) > at(ratio);
        },
      ),
    );
  });
});

describe('assessDischargeTemperature', () => {
  const predictedK = dischargeTemperature({ ...D, composition: PIPELINE_GAS }).temperatureK;
  const base = { suctionTemperatureK: C_TO_K(30), predictedK, pressureRatio: 2.5 };

  // Worked example D4 of the engineering reference; thresholds are tool defaults (common practice)
  it('D4: 104 °C observed is 9.912 K over (15.47 %), n_app 1.313, watch', () => {
    const result = assessDischargeTemperature({ ...base, observedK: C_TO_K(104) });
    expectClose(result.excessK, 9.912);
    expectClose(result.excessFraction, 0.1547);
    expectClose(result.apparentExponent, 1.313);
    expect(result.status).toBe('watch');
    expect(result.message).toMatch(/valve or ring leakage/);
  });

  it('D4: 118 °C observed is 23.91 K over (37.31 %), n_app 1.385, alarm', () => {
    const result = assessDischargeTemperature({ ...base, observedK: C_TO_K(118) });
    expectClose(result.excessK, 23.91);
    expectClose(result.excessFraction, 0.3731);
    expectClose(result.apparentExponent, 1.385);
    expect(result.status).toBe('alarm');
    expect(result.message).toMatch(/hot valve cover|piston ring/);
  });

  it('should be ok near the prediction and ask to check the thermometer far below it', () => {
    expect(assessDischargeTemperature({ ...base, observedK: predictedK + 2 }).status).toBe('ok');
    const cold = assessDischargeTemperature({ ...base, observedK: predictedK - 12 });
    expect(cold.status).toBe('watch');
    expect(cold.warnings).toContain('W_CHECK_MEASUREMENT');
    expect(cold.message).toMatch(/thermometer/);
  });

  it('should trip at the limit and alarm within 10 K of it', () => {
    const limitK = C_TO_K(100);
    expect(assessDischargeTemperature({ ...base, observedK: C_TO_K(100), limitK }).status).toBe('trip');
    expect(assessDischargeTemperature({ ...base, observedK: C_TO_K(95), limitK }).status).toBe('alarm');
    expect(assessDischargeTemperature({ ...base, observedK: C_TO_K(89), limitK }).status).toBe('ok');
  });

  it('should let a site override the thresholds', () => {
    const result = assessDischargeTemperature({ ...base, observedK: C_TO_K(104), thresholds: { watchK: 12 } });
    expect(result.status).toBe('ok');
  });

  it('should cap an impossible apparent exponent and flag the sensor', () => {
    const result = assessDischargeTemperature({ ...base, observedK: C_TO_K(30) * 2.6 });
    expect(result.apparentExponent).toBe(10);
    expect(result.warnings).toContain('W_SENSOR_SUSPECT');
    expect(result.status).toBe('alarm');
  });

  it('should refuse readings that cannot be judged', () => {
    expectCalcError(() => assessDischargeTemperature({ ...base, observedK: C_TO_K(25) }), 'E_TD_BELOW_TS', 'observedK');
    expectCalcError(
      () => assessDischargeTemperature({ ...base, observedK: C_TO_K(90), pressureRatio: 1 }),
      'E_RATIO_LT_1',
      'pressureRatio',
    );
    expectCalcError(
      () => assessDischargeTemperature({ ...base, observedK: C_TO_K(90), pressureRatio: 0.8 }),
      'E_RATIO_LT_1',
      'pressureRatio',
    );
  });
});
