/**
 * Recycle capacity control: matching throughput to demand by returning gas to suction.
 * Simple balance: f = Q_recycle/Q_cyl = 1 − Q_target/Q_cyl (standard-flow or molar units).
 * Multistage effect: later stages have fixed displacement, so with first-stage-only recycle the interstage
 * pressures fall until every later stage carries just the net flow; the last stage's ratio and temperature rise.
 * source: mass balance and the ideal-gas capacity model of capacity.ts (stage flow n = Ps·PD·VE(r)/(Z·R·Ts));
 * the interstage balance is solved numerically.
 */

import { rawVolumetricEfficiency, requireClearance, VE_EMPIRICAL_CONSTANT_DEFAULT, type VeMethod } from './capacity';
import { requireExponent } from './compression';
import { R_MOLAR } from './constants';
import { requireSuctionTemperature } from './discharge-temperature';
import { CalcError, requireRange, show } from './errors';
import { requireAbsolutePressure, requireZ } from './flow';
import { isentropicPowerUnchecked } from './power';

/** Recycle fraction for a stage that swallows `stageFlow` while the plant needs `targetFlow` (same units). */
export function recycleFraction(stageFlow: number, targetFlow: number): { recycleFlow: number; fraction: number } {
  requireRange('E_RECYCLE_RANGE', 'stageFlow', stageFlow, { min: 0, minOpen: true });
  requireRange('E_RECYCLE_RANGE', 'targetFlow', targetFlow, { min: 0, max: stageFlow, minOpen: true });
  return { recycleFlow: stageFlow - targetFlow, fraction: 1 - targetFlow / stageFlow };
}

export interface RecycleStageInput {
  /** Swept volume of the stage's active ends, m³/s. */
  displacementM3s: number;
  clearanceFraction: number;
  /** Suction temperature after the intercooler (or the recycle cooler), K. */
  suctionTemperatureK: number;
  k: number;
  zSuction?: number;
  zDischarge?: number;
}

export interface RecycleInput {
  stages: RecycleStageInput[];
  firstStageSuctionPressurePa: number;
  finalDischargePressurePa: number;
  /** Net flow the plant needs, mol/s (convert standard flow with molarFlowFromStandard). */
  targetMolarFlowMolS: number;
  /** 'first-stage': stage-1 discharge back to stage-1 suction; 'full': final discharge back to first suction. */
  mode: 'first-stage' | 'full';
  veMethod: VeMethod;
  veConstant?: number;
}

export interface RecycleStageResult {
  suctionPressurePa: number;
  dischargePressurePa: number;
  pressureRatio: number;
  molarFlowMolS: number;
  volumetricEfficiency: number;
  isentropicPowerW: number;
  /** Isentropic discharge temperature, K. */
  dischargeTemperatureK: number;
}

export interface RecycleCase {
  stages: RecycleStageResult[];
  netMolarFlowMolS: number;
  totalIsentropicPowerW: number;
  /** J per mol of net delivered gas. */
  specificEnergyJPerMol: number;
}

export interface RecycleResult {
  /** Without recycle: the flow the machine makes at these end pressures. */
  base: RecycleCase;
  /** With recycle at the target net flow. */
  recycled: RecycleCase;
  recycleMolarFlowMolS: number;
  /** Recycle / flow through the recycled stage(s). */
  recycleFraction: number;
}

interface Stage extends Required<RecycleStageInput> {
  method: VeMethod;
  constant: number;
}

function stageFlow(stage: Stage, suctionPa: number, dischargePa: number): number {
  const ratio = dischargePa / suctionPa;
  if (ratio < 1) return Number.POSITIVE_INFINITY; // cannot happen inside the solver's brackets; guards the search
  const ve = rawVolumetricEfficiency({
    clearanceFraction: stage.clearanceFraction,
    pressureRatio: ratio,
    k: stage.k,
    method: stage.method,
    zSuction: stage.zSuction,
    zDischarge: stage.zDischarge,
    constant: stage.constant,
  });
  return ve <= 0
    ? 0
    : (suctionPa * stage.displacementM3s * ve) / (stage.zSuction * R_MOLAR * stage.suctionTemperatureK);
}

/** Suction pressure at which `stage`, discharging at `dischargePa`, carries `molarFlow` (flow rises with suction P). */
function suctionForFlow(stage: Stage, dischargePa: number, molarFlow: number): number {
  let low = 0;
  let high = dischargePa;
  if (stageFlow(stage, high, dischargePa) < molarFlow) return Number.NaN;
  for (let step = 0; step < 200 && high - low > dischargePa * 1e-14; step += 1) {
    const mid = (low + high) / 2;
    if (mid > 0 && stageFlow(stage, mid, dischargePa) >= molarFlow) high = mid;
    else low = mid;
  }
  return high;
}

/** Interstage pressures, last stage first, so that stages 2…N each carry `molarFlow`; NaN when impossible. */
function laterStagePressures(stages: Stage[], finalPa: number, molarFlow: number): number[] {
  const pressures: number[] = new Array(stages.length + 1).fill(Number.NaN);
  pressures[stages.length] = finalPa;
  for (let index = stages.length - 1; index >= 1; index -= 1) {
    const stage = stages[index] as Stage;
    const suction = suctionForFlow(stage, pressures[index + 1] as number, molarFlow);
    if (!Number.isFinite(suction)) return pressures;
    pressures[index] = suction;
  }
  return pressures;
}

function describeCase(stages: Stage[], pressures: number[], flows: number[], netFlow: number): RecycleCase {
  const results = stages.map((stage, index): RecycleStageResult => {
    const suction = pressures[index] as number;
    const discharge = pressures[index + 1] as number;
    const ratio = discharge / suction;
    const flow = flows[index] as number;
    const ve = rawVolumetricEfficiency({
      clearanceFraction: stage.clearanceFraction,
      pressureRatio: ratio,
      k: stage.k,
      method: stage.method,
      zSuction: stage.zSuction,
      zDischarge: stage.zDischarge,
      constant: stage.constant,
    });
    const inletFlow = (flow * stage.zSuction * R_MOLAR * stage.suctionTemperatureK) / suction;
    return {
      suctionPressurePa: suction,
      dischargePressurePa: discharge,
      pressureRatio: ratio,
      molarFlowMolS: flow,
      volumetricEfficiency: Math.max(ve, 0),
      isentropicPowerW: isentropicPowerUnchecked(suction, inletFlow, ratio, stage.k, stage.zSuction, stage.zDischarge),
      dischargeTemperatureK: stage.suctionTemperatureK * ratio ** ((stage.k - 1) / stage.k),
    };
  });
  const total = results.reduce((sum, stage) => sum + stage.isentropicPowerW, 0);
  return {
    stages: results,
    netMolarFlowMolS: netFlow,
    totalIsentropicPowerW: total,
    specificEnergyJPerMol: total / netFlow,
  };
}

/**
 * The recycle needed for a target net flow, and where each stage's pressure, ratio, power and discharge
 * temperature go. Ideal gas per stage (Z as given), fixed displacement and clearance.
 */
export function firstStageRecycle(i: RecycleInput): RecycleResult {
  if (!Array.isArray(i.stages) || i.stages.length === 0) {
    throw new CalcError('E_RECYCLE_RANGE', 'stages', i.stages, 'Give at least one stage.');
  }
  const firstPa = requireAbsolutePressure('firstStageSuctionPressurePa', i.firstStageSuctionPressurePa);
  const finalPa = requireAbsolutePressure('finalDischargePressurePa', i.finalDischargePressurePa);
  if (finalPa < firstPa) {
    throw new CalcError(
      'E_RATIO_LT_1',
      'finalDischargePressurePa',
      finalPa,
      `Final discharge ${show(finalPa)} Pa is below first-stage suction ${show(firstPa)} Pa; the overall ratio must be at least 1.`,
    );
  }
  if (i.mode !== 'first-stage' && i.mode !== 'full') {
    throw new CalcError('E_RECYCLE_RANGE', 'mode', i.mode, `mode = "${String(i.mode)}"; use first-stage or full.`);
  }
  const constant = requireRange('E_VE_GT_1', 'veConstant', i.veConstant ?? VE_EMPIRICAL_CONSTANT_DEFAULT, {
    min: 50,
    max: 110,
  });
  const stages: Stage[] = i.stages.map((stage, index) => ({
    displacementM3s: requireRange('E_GEOMETRY', `stages[${index}].displacementM3s`, stage.displacementM3s, {
      min: 0,
      minOpen: true,
      unit: 'm³/s',
    }),
    clearanceFraction: requireClearance(`stages[${index}].clearanceFraction`, stage.clearanceFraction),
    suctionTemperatureK: requireSuctionTemperature(`stages[${index}].suctionTemperatureK`, stage.suctionTemperatureK),
    k: requireExponent(`stages[${index}].k`, stage.k),
    zSuction: requireZ(`stages[${index}].zSuction`, stage.zSuction ?? 1),
    zDischarge: requireZ(`stages[${index}].zDischarge`, stage.zDischarge ?? 1),
    method: i.veMethod,
    constant,
  }));

  // Base case: find the flow at which stage 1 swallows exactly what the later stages pass on.
  const mismatch = (flow: number): number => {
    const pressures = laterStagePressures(stages, finalPa, flow);
    pressures[0] = firstPa;
    const interstage = stages.length > 1 ? (pressures[1] as number) : finalPa;
    if (!Number.isFinite(interstage) || interstage < firstPa) return -1;
    return stageFlow(stages[0] as Stage, firstPa, interstage) - flow;
  };
  const single = stages.length === 1;
  let baseFlow: number;
  if (single) baseFlow = stageFlow(stages[0] as Stage, firstPa, finalPa);
  else {
    let low = 0;
    let high = stageFlow(stages[0] as Stage, firstPa, firstPa);
    for (let step = 0; step < 200 && high - low > high * 1e-14; step += 1) {
      const mid = (low + high) / 2;
      if (mismatch(mid) > 0) low = mid;
      else high = mid;
    }
    baseFlow = low;
  }
  if (!(baseFlow > 0)) {
    throw new CalcError(
      'E_VE_NONPOSITIVE',
      'finalDischargePressurePa',
      finalPa,
      'The machine delivers nothing between these pressures: the clearance re-expansion fills the stroke. Check the pressures and clearances.',
    );
  }
  const basePressures = single ? [firstPa, finalPa] : laterStagePressures(stages, finalPa, baseFlow);
  basePressures[0] = firstPa;
  const base = describeCase(
    stages,
    basePressures,
    stages.map(() => baseFlow),
    baseFlow,
  );

  const target = requireRange('E_RECYCLE_RANGE', 'targetMolarFlowMolS', i.targetMolarFlowMolS, {
    min: 0,
    max: baseFlow,
    minOpen: true,
    unit: 'mol/s',
  });
  if (i.mode === 'full' || single) {
    const recycled = describeCase(
      stages,
      basePressures,
      stages.map(() => baseFlow),
      target,
    );
    return {
      base,
      recycled,
      recycleMolarFlowMolS: baseFlow - target,
      recycleFraction: 1 - target / baseFlow,
    };
  }
  const pressures = laterStagePressures(stages, finalPa, target);
  pressures[0] = firstPa;
  const firstFlow = stageFlow(stages[0] as Stage, firstPa, pressures[1] as number);
  const recycled = describeCase(
    stages,
    pressures,
    stages.map((_, index) => (index === 0 ? firstFlow : target)),
    target,
  );
  return {
    base,
    recycled,
    recycleMolarFlowMolS: firstFlow - target,
    recycleFraction: 1 - target / firstFlow,
  };
}
