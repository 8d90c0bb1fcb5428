/**
 * Piston displacement, volumetric efficiency and inlet capacity of a reciprocating cylinder.
 * Displacement: head end (π/4)·D²·S·N, crank end (π/4)·(D² − d²)·S·N; a tail rod takes its area off the head end.
 * source: "Performance calculations for reciprocating compressors", in Rules of Thumb for Mechanical
 * Engineers (Pumps and Compressors chapter); GPSA Engineering Data Book, sec. 13.
 */
import { requireExponent, requireRatio } from './compression';
import { CalcError, requireRange, show } from './errors';
import { requireZ } from './flow';

export type ActiveEnds = 'both' | 'head' | 'crank';

export interface DisplacementInput {
  boreM: number;
  /** Piston rod diameter (crank end side). */
  rodM: number;
  strokeM: number;
  speedRpm: number;
  ends: ActiveEnds;
  /** Tail rod diameter through the head, if the cylinder has one. */
  tailRodM?: number;
}

export interface Displacement {
  headM3s: number;
  crankM3s: number;
  totalM3s: number;
}

/** Sanity limits well beyond any reciprocating compressor; larger values are typing errors (common practice). */
export const BORE_MAX_M = 3;
export const STROKE_MAX_M = 2;
export const SPEED_MAX_RPM = 3000;

/** Swept volume per end and in total, m³/s; an inactive end displaces nothing. */
export function pistonDisplacement(i: DisplacementInput): Displacement {
  const bore = requireRange('E_GEOMETRY', 'boreM', i.boreM, { min: 0, minOpen: true, max: BORE_MAX_M, unit: 'm' });
  const rod = requireRange('E_GEOMETRY', 'rodM', i.rodM, { min: 0, max: BORE_MAX_M, unit: 'm' });
  const stroke = requireRange('E_GEOMETRY', 'strokeM', i.strokeM, {
    min: 0,
    minOpen: true,
    max: STROKE_MAX_M,
    unit: 'm',
  });
  const speed = requireRange('E_GEOMETRY', 'speedRpm', i.speedRpm, { min: 0, max: SPEED_MAX_RPM, unit: 'rpm' });
  const tailRod = requireRange('E_GEOMETRY', 'tailRodM', i.tailRodM ?? 0, { min: 0, max: BORE_MAX_M, unit: 'm' });
  if (rod >= bore || tailRod >= bore) {
    const field = rod >= bore ? 'rodM' : 'tailRodM';
    const value = rod >= bore ? rod : tailRod;
    throw new CalcError(
      'E_GEOMETRY',
      field,
      value,
      `${field} = ${show(value)} m is not smaller than the bore ${show(bore)} m; a rod must be thinner than its piston.`,
    );
  }
  if (i.ends !== 'both' && i.ends !== 'head' && i.ends !== 'crank') {
    throw new CalcError('E_GEOMETRY', 'ends', i.ends, `ends = "${String(i.ends)}"; use both, head or crank.`);
  }
  const sweptPerSecond = (stroke * speed) / 60;
  const headArea = (Math.PI / 4) * (bore ** 2 - tailRod ** 2);
  const crankArea = (Math.PI / 4) * (bore ** 2 - rod ** 2);
  const headM3s = i.ends === 'crank' ? 0 : headArea * sweptPerSecond;
  const crankM3s = i.ends === 'head' ? 0 : crankArea * sweptPerSecond;
  return { headM3s, crankM3s, totalM3s: headM3s + crankM3s };
}

export const CLEARANCE_MIN = 0;
export const CLEARANCE_MAX = 2;
/** The constant A of the empirical form, percent; GPSA uses 100 (domain reference §6.2). */
export const VE_EMPIRICAL_CONSTANT_DEFAULT = 100;

export type VeMethod = 'theoretical' | 'empirical';

export interface VolumetricEfficiencyInput {
  /** Clearance volume / swept volume of that end, as a fraction. */
  clearanceFraction: number;
  pressureRatio: number;
  /** Re-expansion exponent: k, or the polytropic exponent. */
  k: number;
  method: VeMethod;
  zSuction?: number;
  zDischarge?: number;
  /** A of the empirical form, percent (default 100). */
  constant?: number;
}

export function requireClearance(field: string, clearance: number): number {
  return requireRange('E_CLEARANCE_RANGE', field, clearance, { min: CLEARANCE_MIN, max: CLEARANCE_MAX });
}

/**
 * VE as a fraction, without the range check: ≤ 0 means the end delivers nothing.
 * Theoretical (clearance re-expansion along p·Vᵏ): 1 − C·(r^(1/k) − 1).
 * Empirical, GPSA form: (A − r − 100·C·((Zs/Zd)·r^(1/k) − 1)) / 100.
 * source: GPSA Engineering Data Book, sec. 13 (empirical form); ideal clearance re-expansion (theoretical form).
 */
export function rawVolumetricEfficiency(i: VolumetricEfficiencyInput): number {
  const clearance = requireClearance('clearanceFraction', i.clearanceFraction);
  const ratio = requireRatio('pressureRatio', i.pressureRatio);
  const k = requireExponent('k', i.k);
  if (i.method === 'theoretical') return 1 - clearance * (ratio ** (1 / k) - 1);
  if (i.method !== 'empirical') {
    throw new CalcError(
      'E_VE_GT_1',
      'method',
      i.method,
      `method = "${String(i.method)}"; use theoretical or empirical.`,
    );
  }
  const zs = requireZ('zSuction', i.zSuction ?? 1);
  const zd = requireZ('zDischarge', i.zDischarge ?? 1);
  const constant = requireRange('E_VE_GT_1', 'constant', i.constant ?? VE_EMPIRICAL_CONSTANT_DEFAULT, {
    min: 50,
    max: 110,
  });
  return (constant - ratio - 100 * clearance * ((zs / zd) * ratio ** (1 / k) - 1)) / 100;
}

/** VE as a fraction; refuses an end that would deliver nothing (≤ 0) or more than it sweeps (> 1). */
export function volumetricEfficiency(i: VolumetricEfficiencyInput): number {
  const ve = rawVolumetricEfficiency(i);
  if (ve <= 0) {
    throw new CalcError(
      'E_VE_NONPOSITIVE',
      'pressureRatio',
      i.pressureRatio,
      `No delivery at this ratio and clearance: at ratio ${show(i.pressureRatio)} with clearance ${show(i.clearanceFraction)} the re-expanding clearance gas fills the whole stroke (VE ${show(ve)}).`,
    );
  }
  if (ve > 1) {
    throw new CalcError(
      'E_VE_GT_1',
      'constant',
      i.constant ?? VE_EMPIRICAL_CONSTANT_DEFAULT,
      `VE ${show(ve)} is above 1: a cylinder cannot take in more than it sweeps. Check the constant A and the clearance.`,
    );
  }
  return ve;
}
