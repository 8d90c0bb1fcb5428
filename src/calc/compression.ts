/** Shared checks for compression calculations: pressure ratio, k and exponents, efficiencies. */
import { CalcError, type CalcWarningCode, requireRange, show } from './errors';
import { requireAbsolutePressure } from './flow';

export const K_MIN = 1;
export const K_MAX = 1.7;
/** Above this single-stage ratio the result is flagged W_RATIO_HIGH (common practice). */
export const RATIO_HIGH = 10;
/** Above this discharge pressure ideal-gas k is flagged W_REAL_GAS (common practice: about 100 bar). */
export const REAL_GAS_PRESSURE_PA = 10e6;

/** k (or a polytropic exponent) must lie in (1, 1.7]. */
export function requireExponent(field: string, value: number): number {
  return requireRange('E_K_RANGE', field, value, { min: K_MIN, max: K_MAX, minOpen: true });
}

/** r = Pd/Ps from absolute pressures; r < 1 is refused, r > 10 is flagged. */
export function pressureRatio(
  suctionPressurePa: number,
  dischargePressurePa: number,
  warnings?: CalcWarningCode[],
): number {
  requireAbsolutePressure('suctionPressurePa', suctionPressurePa);
  requireAbsolutePressure('dischargePressurePa', dischargePressurePa);
  const ratio = dischargePressurePa / suctionPressurePa;
  if (ratio < 1) {
    throw new CalcError(
      'E_RATIO_LT_1',
      'dischargePressurePa',
      dischargePressurePa,
      `Discharge pressure ${show(dischargePressurePa)} Pa is below suction pressure ${show(suctionPressurePa)} Pa (ratio ${show(ratio)}); the ratio must be at least 1. Check both gauges and their units.`,
    );
  }
  if (ratio > RATIO_HIGH && warnings && !warnings.includes('W_RATIO_HIGH')) warnings.push('W_RATIO_HIGH');
  return ratio;
}

/** A pressure ratio given directly must be at least 1. */
export function requireRatio(field: string, ratio: number): number {
  return requireRange('E_RATIO_LT_1', field, ratio, { min: 1 });
}

/** Efficiencies lie in (0.5, 1]. */
export function requireEfficiency(field: string, value: number): number {
  return requireRange('E_EFFICIENCY_RANGE', field, value, { min: 0.5, max: 1, minOpen: true });
}
