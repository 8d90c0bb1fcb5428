/**
 * Rider band wear from rod drop on a horizontal cylinder. The piston sinks as its rider bands wear and the rod tilts
 * about the crosshead pin, so a probe near the packing sees only part of the drop:
 * wear = Δrod_drop · L_rb / L_p (similar triangles; L_rb pin to rider-band centre, L_p pin to probe).
 * Thresholds: watch at 50 %, alarm (plan the band change) at 75 % of the allowable wear (common practice).
 */
import { CalcError, type CalcWarningCode, requireRange, show } from './errors';
import type { Status } from './status';

export const RIDER_BAND_WATCH_FRACTION = 0.5;
export const RIDER_BAND_ALARM_FRACTION = 0.75;

export interface RiderBandInput {
  /** Rod drop now minus rod drop with new bands, same crank angle or averaging mode, machine warm. */
  rodDropChangeM: number;
  riderToPinM: number;
  probeToPinM: number;
  /** From the maker: new radial projection of the band beyond the piston minus the minimum margin. */
  allowableWearM?: number;
}

export interface RiderBandResult {
  wearM: number;
  usedFraction: number | null;
  status: Exclude<Status, 'trip'>;
  message: string;
  warnings: CalcWarningCode[];
}

const mm = (metres: number) => `${(metres * 1000).toFixed(3)} mm`;

export function riderBandWear(i: RiderBandInput): RiderBandResult {
  const change = requireRange('E_GEOMETRY', 'rodDropChangeM', i.rodDropChangeM, { min: -0.05, max: 0.05, unit: 'm' });
  const rider = requireRange('E_GEOMETRY', 'riderToPinM', i.riderToPinM, { min: 0, minOpen: true, max: 20, unit: 'm' });
  const probe = requireRange('E_GEOMETRY', 'probeToPinM', i.probeToPinM, { min: 0, minOpen: true, max: 20, unit: 'm' });
  if (probe > rider) {
    throw new CalcError(
      'E_GEOMETRY',
      'probeToPinM',
      probe,
      `The probe (${show(probe)} m from the pin) cannot be beyond the rider band (${show(rider)} m); check both distances.`,
    );
  }
  const allowable =
    i.allowableWearM === undefined
      ? undefined
      : requireRange('E_GEOMETRY', 'allowableWearM', i.allowableWearM, { min: 0, minOpen: true, max: 0.05, unit: 'm' });
  const wearM = (change * rider) / probe;
  const warnings: CalcWarningCode[] = [];
  if (wearM < 0) {
    warnings.push('W_CHECK_MEASUREMENT');
    return {
      wearM,
      usedFraction: allowable === undefined ? null : wearM / allowable,
      status: 'ok',
      warnings,
      message: `The rod reads ${mm(-change)} higher than with new bands: check the probe gap, crosshead shoe wear and rod run-out before trusting the trend.`,
    };
  }
  if (allowable === undefined) {
    return {
      wearM,
      usedFraction: null,
      status: 'ok',
      warnings,
      message: `Rider band wear ${mm(wearM)}; enter the maker's allowable wear to judge it.`,
    };
  }
  const usedFraction = wearM / allowable;
  const used = `${mm(wearM)} worn, ${Math.round(usedFraction * 100)} % of the allowable ${mm(allowable)}`;
  if (usedFraction >= RIDER_BAND_ALARM_FRACTION) {
    return {
      wearM,
      usedFraction,
      status: 'alarm',
      warnings,
      message: `${used}: plan the rider band change${usedFraction >= 1 ? ' now: the piston may touch the liner' : ' before 100 %'}.`,
    };
  }
  if (usedFraction >= RIDER_BAND_WATCH_FRACTION) {
    return { wearM, usedFraction, status: 'watch', warnings, message: `${used}: trend it and have bands ready.` };
  }
  return { wearM, usedFraction, status: 'ok', warnings, message: `${used}.` };
}
