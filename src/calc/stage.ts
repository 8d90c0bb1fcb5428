/**
 * One compressor stage (one cylinder) at a set of running conditions: ratio, predicted discharge temperature,
 * VE and capacity per end, standard and mass flow, isentropic and shaft power. Also the power-versus-discharge-
 * pressure curve at fixed suction and clearance. Methods and sources are those of the functions it calls.
 */

import {
  pistonDisplacement,
  rawVolumetricEfficiency,
  requireClearance,
  VE_EMPIRICAL_CONSTANT_DEFAULT,
  type VeMethod,
} from './capacity';
import { pressureRatio, requireEfficiency, requireExponent } from './compression';
import { R_MOLAR } from './constants';
import { kAtMeanTemperature, requireSuctionTemperature } from './discharge-temperature';
import { CalcError, type CalcWarningCode, requireRange, show } from './errors';
import { requireAbsolutePressure, requireZ, type StandardBasis, standardFlow } from './flow';
import { type Mixture, prepareMixture } from './gas';
import { COMPRESSION_EFFICIENCY_DEFAULT, isentropicPowerUnchecked, MECHANICAL_EFFICIENCY_DEFAULT } from './power';

export interface StageInput {
  boreM: number;
  rodM: number;
  strokeM: number;
  speedRpm: number;
  tailRodM?: number;
  /** Clearance volume / swept volume of each end, as a fraction. */
  headClearance: number;
  crankClearance: number;
  /** An inactive end (suction valves held open, or single-acting) delivers nothing. */
  headActive: boolean;
  crankActive: boolean;
  suctionPressurePa: number;
  dischargePressurePa: number;
  suctionTemperatureK: number;
  /** Give k or the composition (k is then taken at the mean of suction and discharge temperature). */
  k?: number;
  composition?: Record<string, number>;
  /** Only for the predicted discharge temperature; VE re-expansion and power use k. */
  polytropicExponent?: number;
  /** For mass flow when no composition is given. */
  molarMassKgPerMol?: number;
  zSuction?: number;
  zDischarge?: number;
  veMethod: VeMethod;
  /** A of the empirical VE form, percent (default 100). */
  veConstant?: number;
  /** η_c, default 0.85 (common practice). */
  compressionEfficiency?: number;
  /** η_m, default 0.95 (common practice). */
  mechanicalEfficiency?: number;
  /** Default Sm3-15C. */
  standardBasis?: StandardBasis;
}

export interface EndPerformance {
  active: boolean;
  clearanceFraction: number;
  displacementM3s: number;
  /** 0 for an inactive end or one that no longer delivers at this ratio. */
  volumetricEfficiency: number;
  /** False when inactive, or when clearance re-expansion fills the stroke (VE ≤ 0) at this ratio. */
  delivers: boolean;
  inletFlowM3s: number;
}

export interface StagePerformance {
  pressureRatio: number;
  /** k used for VE and power (at the mean temperature when computed from the composition). */
  k: number;
  predictedDischargeTemperatureK: number;
  head: EndPerformance;
  crank: EndPerformance;
  /** Swept volume of the active ends, m³/s. */
  displacementM3s: number;
  /** Actual inlet volume flow at suction P and T, m³/s. */
  inletFlowM3s: number;
  /** m³/s at the reference state of `standardBasis`. */
  standardFlowM3s: number;
  standardBasis: StandardBasis;
  molarFlowMolS: number;
  /** kg/s; null when neither composition nor molar mass is given. */
  massFlowKgS: number | null;
  isentropicPowerW: number;
  /** Isentropic power / (η_c · η_m). */
  shaftPowerW: number;
  compressionEfficiency: number;
  mechanicalEfficiency: number;
  /** True when at least one end delivers gas. */
  delivers: boolean;
  warnings: CalcWarningCode[];
}

interface PreparedStage {
  input: StageInput;
  headDisplacement: number;
  crankDisplacement: number;
  ps: number;
  ts: number;
  zs: number;
  zd: number;
  etaC: number;
  etaM: number;
  basis: StandardBasis;
  molarMass: number | null;
  mixture: Mixture | null;
}

function prepare(i: StageInput): PreparedStage {
  if (typeof i.headActive !== 'boolean' || typeof i.crankActive !== 'boolean') {
    throw new CalcError('E_GEOMETRY', 'headActive', i.headActive, 'headActive and crankActive must be true or false.');
  }
  const ends = i.headActive && i.crankActive ? 'both' : i.headActive ? 'head' : i.crankActive ? 'crank' : null;
  const displacement = pistonDisplacement({
    boreM: i.boreM,
    rodM: i.rodM,
    strokeM: i.strokeM,
    speedRpm: i.speedRpm,
    ends: ends ?? 'both',
    ...(i.tailRodM === undefined ? {} : { tailRodM: i.tailRodM }),
  });
  requireClearance('headClearance', i.headClearance);
  requireClearance('crankClearance', i.crankClearance);
  const hasK = i.k !== undefined;
  const hasComposition = i.composition !== undefined;
  if (hasK === hasComposition) {
    throw new CalcError('E_K_RANGE', 'k', i.k, 'Give either k or the gas composition (exactly one of them).');
  }
  if (hasK) requireExponent('k', i.k as number);
  if (i.polytropicExponent !== undefined) requireExponent('polytropicExponent', i.polytropicExponent);
  const mixture = hasComposition ? prepareMixture(i.composition as Record<string, number>) : null;
  let molarMass: number | null = mixture ? mixture.molarMassKgPerMol : null;
  if (!mixture && i.molarMassKgPerMol !== undefined) {
    molarMass = requireRange('E_COMPOSITION_SUM', 'molarMassKgPerMol', i.molarMassKgPerMol, {
      min: 0.002,
      max: 0.2,
      unit: 'kg/mol',
    });
  }
  const basis = i.standardBasis ?? 'Sm3-15C';
  return {
    input: i,
    headDisplacement: i.headActive ? displacement.headM3s : 0,
    crankDisplacement: i.crankActive ? displacement.crankM3s : 0,
    ps: requireAbsolutePressure('suctionPressurePa', i.suctionPressurePa),
    ts: requireSuctionTemperature('suctionTemperatureK', i.suctionTemperatureK),
    zs: requireZ('zSuction', i.zSuction ?? 1),
    zd: requireZ('zDischarge', i.zDischarge ?? 1),
    etaC: requireEfficiency('compressionEfficiency', i.compressionEfficiency ?? COMPRESSION_EFFICIENCY_DEFAULT),
    etaM: requireEfficiency('mechanicalEfficiency', i.mechanicalEfficiency ?? MECHANICAL_EFFICIENCY_DEFAULT),
    basis,
    molarMass,
    mixture,
  };
}

function endAt(
  stage: PreparedStage,
  active: boolean,
  clearance: number,
  displacement: number,
  ratio: number,
  k: number,
): EndPerformance {
  if (!active) {
    return {
      active,
      clearanceFraction: clearance,
      displacementM3s: 0,
      volumetricEfficiency: 0,
      delivers: false,
      inletFlowM3s: 0,
    };
  }
  const ve = rawVolumetricEfficiency({
    clearanceFraction: clearance,
    pressureRatio: ratio,
    k,
    method: stage.input.veMethod,
    zSuction: stage.zs,
    zDischarge: stage.zd,
    constant: stage.input.veConstant ?? VE_EMPIRICAL_CONSTANT_DEFAULT,
  });
  if (ve > 1) {
    throw new CalcError(
      'E_VE_GT_1',
      'veConstant',
      stage.input.veConstant,
      `VE ${show(ve)} is above 1: a cylinder cannot take in more than it sweeps. Check veConstant and the clearance.`,
    );
  }
  const delivers = ve > 0;
  return {
    active,
    clearanceFraction: clearance,
    displacementM3s: displacement,
    volumetricEfficiency: delivers ? ve : 0,
    delivers,
    inletFlowM3s: delivers ? ve * displacement : 0,
  };
}

/** Golden-section search for the maximum of a unimodal function on [low, high], to a tolerance relative to low. */
export function goldenMaximum(
  f: (x: number) => number,
  lowStart: number,
  highStart: number,
  relativeTolerance = PEAK_RELATIVE_TOLERANCE,
): { at: number; value: number } {
  let low = lowStart;
  let high = highStart;
  const golden = (Math.sqrt(5) - 1) / 2;
  let x1 = high - golden * (high - low);
  let x2 = low + golden * (high - low);
  let f1 = f(x1);
  let f2 = f(x2);
  while (high - low > relativeTolerance * low) {
    if (f1 < f2) {
      low = x1;
      x1 = x2;
      f1 = f2;
      x2 = low + golden * (high - low);
      f2 = f(x2);
    } else {
      high = x2;
      x2 = x1;
      f2 = f1;
      x1 = high - golden * (high - low);
      f1 = f(x1);
    }
  }
  const at = (low + high) / 2;
  return { at, value: f(at) };
}

/** The stage at one discharge pressure. */
function evaluate(stage: PreparedStage, dischargePressurePa: number): StagePerformance {
  const i = stage.input;
  const warnings: CalcWarningCode[] = [];
  const ratio = pressureRatio(stage.ps, requireAbsolutePressure('dischargePressurePa', dischargePressurePa), warnings);
  let k: number;
  let predictedK: number;
  if (stage.mixture) {
    const mean = kAtMeanTemperature(stage.mixture, stage.ts, ratio, warnings);
    k = mean.k;
    predictedK = mean.dischargeTemperatureK;
  } else {
    k = i.k as number;
    predictedK = stage.ts * ratio ** ((k - 1) / k);
  }
  if (i.polytropicExponent !== undefined) {
    const n = i.polytropicExponent;
    predictedK = stage.ts * ratio ** ((n - 1) / n);
  }
  if (dischargePressurePa > 10e6 && !warnings.includes('W_REAL_GAS')) warnings.push('W_REAL_GAS');
  const head = endAt(stage, i.headActive, i.headClearance, stage.headDisplacement, ratio, k);
  const crank = endAt(stage, i.crankActive, i.crankClearance, stage.crankDisplacement, ratio, k);
  const inletFlowM3s = head.inletFlowM3s + crank.inletFlowM3s;
  const molarFlowMolS = (stage.ps * inletFlowM3s) / (stage.zs * R_MOLAR * stage.ts);
  const isentropicPowerW = isentropicPowerUnchecked(stage.ps, inletFlowM3s, ratio, k, stage.zs, stage.zd);
  return {
    pressureRatio: ratio,
    k,
    predictedDischargeTemperatureK: predictedK,
    head,
    crank,
    displacementM3s: stage.headDisplacement + stage.crankDisplacement,
    inletFlowM3s,
    standardFlowM3s: standardFlow({
      actualM3s: inletFlowM3s,
      pressurePa: stage.ps,
      temperatureK: stage.ts,
      z: stage.zs,
      basis: stage.basis,
    }),
    standardBasis: stage.basis,
    molarFlowMolS,
    massFlowKgS: stage.molarMass === null ? null : molarFlowMolS * stage.molarMass,
    isentropicPowerW,
    shaftPowerW: isentropicPowerW / (stage.etaC * stage.etaM),
    compressionEfficiency: stage.etaC,
    mechanicalEfficiency: stage.etaM,
    delivers: head.delivers || crank.delivers,
    warnings,
  };
}

/** Everything a screen shows for one cylinder at its running conditions. */
export function stagePerformance(i: StageInput): StagePerformance {
  return evaluate(prepare(i), i.dischargePressurePa);
}

export interface PowerCurvePoint {
  dischargePressurePa: number;
  pressureRatio: number;
  inletFlowM3s: number;
  /** Isentropic gas power, W. */
  powerW: number;
}

export interface PowerCurve {
  points: PowerCurvePoint[];
  peak: { dischargePressurePa: number; pressureRatio: number; powerW: number };
  /** Where the last active end stops delivering (clearance re-expansion fills the stroke). */
  noDeliveryPressurePa: number;
}

/** Highest ratio searched for the no-delivery point; beyond this the clearance is too small to matter. */
const NO_DELIVERY_RATIO_LIMIT = 1e4;
/** Default number of points on the curve. */
export const POWER_CURVE_POINTS = 100;
/** The peak's ratio is located to this relative width (0.01 %, inside the 0.1 % asked of it). */
const PEAK_RELATIVE_TOLERANCE = 1e-4;

function ratioWhereEndStops(stage: PreparedStage, clearance: number): number {
  const k0 = stage.input.k;
  const veAt = (ratio: number): number => {
    const warnings: CalcWarningCode[] = [];
    const k = stage.mixture ? kAtMeanTemperature(stage.mixture, stage.ts, ratio, warnings).k : (k0 as number);
    return rawVolumetricEfficiency({
      clearanceFraction: clearance,
      pressureRatio: ratio,
      k,
      method: stage.input.veMethod,
      zSuction: stage.zs,
      zDischarge: stage.zd,
      constant: stage.input.veConstant ?? VE_EMPIRICAL_CONSTANT_DEFAULT,
    });
  };
  if (veAt(1) <= 0) return 1;
  let low = 1;
  let high = 2;
  while (veAt(high) > 0) {
    low = high;
    high *= 2;
    if (high > NO_DELIVERY_RATIO_LIMIT) {
      throw new CalcError(
        'E_CLEARANCE_RANGE',
        'clearance',
        clearance,
        `With clearance ${show(clearance)} this end never stops delivering below ratio ${NO_DELIVERY_RATIO_LIMIT}; a power curve needs the cylinder's real clearance (above 0).`,
      );
    }
  }
  // Bisection on a decreasing VE: 60 halvings take any bracket below double-precision resolution.
  for (let step = 0; step < 60; step += 1) {
    const mid = (low + high) / 2;
    if (veAt(mid) > 0) low = mid;
    else high = mid;
  }
  return high;
}

/**
 * Power against discharge pressure at fixed suction and clearance: the power rises, peaks, then falls to zero
 * where clearance re-expansion fills the stroke (for the theoretical VE at r₀ = (1 + 1/C)^k).
 * source: consequence of the VE and isentropic power formulas above; peak located numerically
 * (sampling, then golden-section search).
 */
export function powerCurve(i: StageInput & { dischargePressuresPa?: number[] }): PowerCurve {
  const stage = prepare(i);
  const ends: number[] = [];
  if (i.headActive) ends.push(ratioWhereEndStops(stage, i.headClearance));
  if (i.crankActive) ends.push(ratioWhereEndStops(stage, i.crankClearance));
  if (ends.length === 0) {
    throw new CalcError('E_GEOMETRY', 'headActive', false, 'Both ends are inactive: the cylinder compresses nothing.');
  }
  const stopRatio = Math.max(...ends);
  const noDeliveryPressurePa = stage.ps * stopRatio;
  const powerAt = (ratio: number) => evaluate(stage, stage.ps * ratio);

  const pressures =
    i.dischargePressuresPa ??
    Array.from({ length: POWER_CURVE_POINTS }, (_, index) => {
      const ratio = 1 + ((stopRatio - 1) * index) / (POWER_CURVE_POINTS - 1);
      return index === POWER_CURVE_POINTS - 1 ? noDeliveryPressurePa : stage.ps * ratio;
    });
  const points = pressures.map((pressure, index) => {
    const at = evaluate(stage, requireAbsolutePressure(`dischargePressuresPa[${index}]`, pressure));
    return {
      dischargePressurePa: pressure,
      pressureRatio: at.pressureRatio,
      inletFlowM3s: at.inletFlowM3s,
      powerW: at.isentropicPowerW,
    };
  });

  // Sample the whole delivering range, then refine every local maximum by golden-section search. With two ends of
  // different clearance the curve can have two humps, so the best refined hump wins.
  const samples = 256;
  const sampleRatio = (index: number) => 1 + ((stopRatio - 1) * index) / samples;
  const sampled = Array.from({ length: samples + 1 }, (_, index) => powerAt(sampleRatio(index)).isentropicPowerW);
  let peakRatio = 1;
  let peakPower = -1;
  for (let index = 0; index <= samples; index += 1) {
    const here = sampled[index] as number;
    const left = index > 0 ? (sampled[index - 1] as number) : Number.NEGATIVE_INFINITY;
    const right = index < samples ? (sampled[index + 1] as number) : Number.NEGATIVE_INFINITY;
    if (here < left || here < right) continue;
    const refined = goldenMaximum(
      (ratio) => powerAt(ratio).isentropicPowerW,
      sampleRatio(Math.max(0, index - 1)),
      sampleRatio(Math.min(samples, index + 1)),
    );
    if (refined.value > peakPower) {
      peakPower = refined.value;
      peakRatio = refined.at;
    }
  }
  return {
    points,
    peak: {
      dischargePressurePa: stage.ps * peakRatio,
      pressureRatio: peakRatio,
      powerW: powerAt(peakRatio).isentropicPowerW,
    },
    noDeliveryPressurePa,
  };
}
