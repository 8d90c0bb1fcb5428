import { requireExponent, requireRatio } from './compression';
import { requireRange } from './errors';
import { FLOW_MAX_M3S, requireAbsolutePressure, requireZ } from './flow';

export interface IsentropicPowerInput {
  suctionPressurePa: number;
  /** Actual volume flow at suction conditions, m³/s. */
  inletFlowM3s: number;
  pressureRatio: number;
  k: number;
  zSuction?: number;
  zDischarge?: number;
}

/**
 * Isentropic gas power, W: (k/(k−1))·Ps·Q·(r^((k−1)/k) − 1)·(Zs + Zd)/(2·Zs).
 * source: ideal-gas isentropic work; the average-Z correction as in GPSA Engineering Data Book, sec. 13.
 */
export function isentropicPower(i: IsentropicPowerInput): number {
  const ps = requireAbsolutePressure('suctionPressurePa', i.suctionPressurePa);
  const flow = requireRange('E_VE_NONPOSITIVE', 'inletFlowM3s', i.inletFlowM3s, {
    min: 0,
    max: FLOW_MAX_M3S,
    unit: 'm³/s',
  });
  const ratio = requireRatio('pressureRatio', i.pressureRatio);
  const k = requireExponent('k', i.k);
  const zs = requireZ('zSuction', i.zSuction ?? 1);
  const zd = requireZ('zDischarge', i.zDischarge ?? 1);
  return isentropicPowerUnchecked(ps, flow, ratio, k, zs, zd);
}

/** The same formula for inputs already validated (hot loops of the power curve). */
export function isentropicPowerUnchecked(ps: number, flow: number, ratio: number, k: number, zs: number, zd: number) {
  return (k / (k - 1)) * ps * flow * (ratio ** ((k - 1) / k) - 1) * ((zs + zd) / (2 * zs));
}

/** Compression efficiency default (valve and passage losses; typically 0.80–0.90, common practice). */
export const COMPRESSION_EFFICIENCY_DEFAULT = 0.85;
/** Mechanical efficiency default (typically 0.93–0.97, common practice). */
export const MECHANICAL_EFFICIENCY_DEFAULT = 0.95;
