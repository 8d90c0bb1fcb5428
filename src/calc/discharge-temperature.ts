/**
 * Predicted against observed discharge temperature, the most telling round reading per cylinder.
 * Isentropic: Td = Ts·r^((k−1)/k); polytropic: Td = Ts·r^((n−1)/n) (absolute T and P).
 * Apparent exponent from readings: x = ln(Td/Ts)/ln r, n_app = 1/(1 − x).
 * source: ideal-gas isentropic and polytropic relations (any thermodynamics text, e.g. Çengel & Boles,
 * Thermodynamics, ch. 7); the average-temperature k iteration follows GPSA Engineering Data Book, sec. 13.
 */
import { pressureRatio, REAL_GAS_PRESSURE_PA, requireExponent, requireRatio } from './compression';
import { CalcError, type CalcWarningCode, requireRange } from './errors';
import { requireAbsoluteTemperature } from './flow';
import { type Mixture, mixtureK, prepareMixture } from './gas';
import { type Status, worstStatus } from './status';

export const SUCTION_TEMPERATURE_MIN_K = 200;
export const SUCTION_TEMPERATURE_MAX_K = 600;
/** Convergence of the average-temperature k iteration, K. */
const ITERATION_TOLERANCE_K = 1e-9;
const ITERATION_LIMIT = 100;

export function requireSuctionTemperature(field: string, temperatureK: number): number {
  requireAbsoluteTemperature(field, temperatureK);
  return requireRange('E_TEMP_RANGE', field, temperatureK, {
    min: SUCTION_TEMPERATURE_MIN_K,
    max: SUCTION_TEMPERATURE_MAX_K,
    unit: 'K',
  });
}

export interface DischargeTemperatureInput {
  suctionTemperatureK: number;
  suctionPressurePa: number;
  dischargePressurePa: number;
  /** Ratio of specific heats; give this or `composition` (not both) unless `polytropicExponent` is given. */
  k?: number;
  /** Mole fractions; k is then evaluated at the average of suction and discharge temperature. */
  composition?: Record<string, number>;
  /** From design data or a pressure-volume card; when given, the rise follows it instead of k. */
  polytropicExponent?: number;
}

export interface DischargeTemperatureResult {
  temperatureK: number;
  /**
   * The k used: as given, or from the composition at the average temperature. With only a polytropic exponent
   * and no gas data, this is that exponent.
   */
  k: number;
  pressureRatio: number;
  warnings: CalcWarningCode[];
}

function riseFactor(ratio: number, exponent: number): number {
  return ratio ** ((exponent - 1) / exponent);
}

/** k of the mixture at the mean of Ts and the Td it produces, by fixed-point iteration. */
export function kAtMeanTemperature(
  mixture: Mixture,
  suctionTemperatureK: number,
  ratio: number,
  warnings: CalcWarningCode[],
): { k: number; dischargeTemperatureK: number } {
  let k = mixtureK(mixture, suctionTemperatureK, warnings);
  let td = suctionTemperatureK * riseFactor(ratio, k);
  for (let pass = 0; pass < ITERATION_LIMIT; pass += 1) {
    k = mixtureK(mixture, (suctionTemperatureK + td) / 2, warnings);
    const next = suctionTemperatureK * riseFactor(ratio, k);
    const converged = Math.abs(next - td) < ITERATION_TOLERANCE_K;
    td = next;
    if (converged) break;
  }
  return { k, dischargeTemperatureK: td };
}

/** Predicted discharge temperature, K. */
export function dischargeTemperature(i: DischargeTemperatureInput): DischargeTemperatureResult {
  requireSuctionTemperature('suctionTemperatureK', i.suctionTemperatureK);
  const warnings: CalcWarningCode[] = [];
  const ratio = pressureRatio(i.suctionPressurePa, i.dischargePressurePa, warnings);
  const hasK = i.k !== undefined;
  const hasComposition = i.composition !== undefined;
  if (hasK && hasComposition) {
    throw new CalcError('E_K_RANGE', 'k', i.k, 'Give either k or the gas composition, not both.');
  }
  const mixture = hasComposition ? prepareMixture(i.composition as Record<string, number>) : null;
  if (i.dischargePressurePa > REAL_GAS_PRESSURE_PA) warnings.push('W_REAL_GAS');
  else if (mixture && mixture.carbonDioxideFraction >= 0.5 && i.dischargePressurePa > 5e6) {
    // CO2-rich gas near its critical point (7.38 MPa, 304 K) departs from ideal behaviour well below 100 bar.
    warnings.push('W_REAL_GAS');
  }

  if (i.polytropicExponent !== undefined) {
    const n = requireExponent('polytropicExponent', i.polytropicExponent);
    const temperatureK = i.suctionTemperatureK * riseFactor(ratio, n);
    let k = n;
    if (hasK) k = requireExponent('k', i.k as number);
    else if (mixture) k = mixtureK(mixture, (i.suctionTemperatureK + temperatureK) / 2, warnings);
    return { temperatureK, k, pressureRatio: ratio, warnings };
  }
  if (hasK) {
    const k = requireExponent('k', i.k as number);
    return { temperatureK: i.suctionTemperatureK * riseFactor(ratio, k), k, pressureRatio: ratio, warnings };
  }
  if (mixture) {
    const mean = kAtMeanTemperature(mixture, i.suctionTemperatureK, ratio, warnings);
    return { temperatureK: mean.dischargeTemperatureK, k: mean.k, pressureRatio: ratio, warnings };
  }
  throw new CalcError('E_K_RANGE', 'k', undefined, 'Give k, the gas composition or a polytropic exponent.');
}

export interface DischargeExcessThresholds {
  watchK: number;
  watchFractionOfRise: number;
  alarmK: number;
  alarmFractionOfRise: number;
  alarmMarginBelowLimitK: number;
}

/** Tool defaults for the excess of observed over predicted discharge temperature (common practice). */
export const DISCHARGE_EXCESS_THRESHOLDS: Readonly<DischargeExcessThresholds> = {
  watchK: 8,
  watchFractionOfRise: 0.1,
  alarmK: 15,
  alarmFractionOfRise: 0.2,
  /** Alarm this far below the trip setting or rated limit (common practice: about 10 K). */
  alarmMarginBelowLimitK: 10,
};

/** Reported when the observed rise exceeds any compression exponent (Td/Ts ≥ r). */
export const APPARENT_EXPONENT_MAX = 10;

export interface DischargeAssessmentInput {
  suctionTemperatureK: number;
  predictedK: number;
  observedK: number;
  pressureRatio: number;
  /** Trip setting or rated limit on the measured discharge temperature, K. */
  limitK?: number;
  thresholds?: Partial<DischargeExcessThresholds>;
}

export interface DischargeAssessment {
  /** Observed minus predicted, K. */
  excessK: number;
  /** Excess as a fraction of the predicted rise (Td_pred − Ts). */
  excessFraction: number;
  /** n_app = 1/(1 − ln(Td/Ts)/ln r); capped at APPARENT_EXPONENT_MAX. */
  apparentExponent: number;
  status: Status;
  message: string;
  warnings: CalcWarningCode[];
}

const kelvins = (value: number) => `${value.toFixed(1)} K`;
const percent = (fraction: number) => `${Math.round(fraction * 100)} %`;

/** Judges an observed discharge temperature against its prediction, in plain words. */
export function assessDischargeTemperature(i: DischargeAssessmentInput): DischargeAssessment {
  const ts = requireSuctionTemperature('suctionTemperatureK', i.suctionTemperatureK);
  requireAbsoluteTemperature('predictedK', i.predictedK);
  requireAbsoluteTemperature('observedK', i.observedK);
  const ratio = requireRatio('pressureRatio', i.pressureRatio);
  if (ratio === 1) {
    throw new CalcError(
      'E_RATIO_LT_1',
      'pressureRatio',
      ratio,
      'pressureRatio = 1: with no compression there is no temperature rise to judge; it must be above 1.',
    );
  }
  if (i.observedK <= ts) {
    throw new CalcError(
      'E_TD_BELOW_TS',
      'observedK',
      i.observedK,
      `Observed discharge ${kelvins(i.observedK)} is not above suction ${kelvins(ts)}; a working cylinder heats the gas. Check both thermometers.`,
    );
  }
  if (i.predictedK <= ts) {
    throw new CalcError(
      'E_TD_BELOW_TS',
      'predictedK',
      i.predictedK,
      `Predicted discharge ${kelvins(i.predictedK)} is not above suction ${kelvins(ts)}; recompute the prediction.`,
    );
  }
  const thresholds = { ...DISCHARGE_EXCESS_THRESHOLDS, ...i.thresholds };
  const rise = i.predictedK - ts;
  const excessK = i.observedK - i.predictedK;
  const excessFraction = excessK / rise;
  const warnings: CalcWarningCode[] = [];
  const x = Math.log(i.observedK / ts) / Math.log(ratio);
  let apparentExponent = x >= 1 ? APPARENT_EXPONENT_MAX : Math.min(1 / (1 - x), APPARENT_EXPONENT_MAX);
  if (apparentExponent >= APPARENT_EXPONENT_MAX) {
    apparentExponent = APPARENT_EXPONENT_MAX;
    warnings.push('W_SENSOR_SUSPECT');
  }

  const watchBand = Math.max(thresholds.watchK, thresholds.watchFractionOfRise * rise);
  const alarmBand = Math.max(thresholds.alarmK, thresholds.alarmFractionOfRise * rise);
  const numbers = `${kelvins(excessK)} above prediction (${percent(excessFraction)} of the predicted ${kelvins(rise)} rise; apparent exponent ${apparentExponent.toFixed(3)})`;
  let status: Status = 'ok';
  let message: string;
  if (excessK >= alarmBand) {
    status = 'alarm';
    message = `Discharge runs hot: ${numbers}. Gas is being compressed more than once: usually leaking valves on one end (find the hot valve cover) or, with both ends hot and no single hot cover, piston ring leakage. Confirm the gauges and suction temperature first.`;
  } else if (excessK >= watchBand) {
    status = 'watch';
    message = `Discharge is warmer than predicted: ${numbers}. Early sign of valve or ring leakage; compare valve cover temperatures and the trend. A heavier gas, higher ratio or warmer suction also raise it.`;
  } else if (excessK <= -watchBand) {
    status = 'watch';
    warnings.push('W_CHECK_MEASUREMENT');
    message = `Discharge is cooler than any compression should give: ${kelvins(-excessK)} below prediction. Check the thermometer position and thermowell, the suction temperature reading and the gas composition.`;
  } else {
    message = `Discharge temperature is as predicted (${kelvins(excessK)} from prediction).`;
  }
  if (i.limitK !== undefined) {
    const limitK = requireAbsoluteTemperature('limitK', i.limitK);
    if (i.observedK >= limitK) {
      status = 'trip';
      message = `Discharge ${kelvins(i.observedK)} is at or above its limit ${kelvins(limitK)}. ${message}`;
    } else if (i.observedK >= limitK - thresholds.alarmMarginBelowLimitK) {
      status = worstStatus(status, 'alarm');
      message = `Discharge ${kelvins(i.observedK)} is within ${kelvins(limitK - i.observedK)} of its limit ${kelvins(limitK)}. ${message}`;
    }
  }
  return { excessK, excessFraction, apparentExponent, status, message, warnings };
}
