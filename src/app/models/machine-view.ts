/**
 * The supervisor's machine view, pure (no DOM, no store). From the site configuration, one machine and its finished
 * rounds (readings and the findings the checks stored), in SI throughout:
 * - per stage, the time series of observed against predicted discharge temperature, VE, capacity and power, taken
 *   from the stored findings (`dischargeTemperature`, `stagePerformance`);
 * - per stage, the power-versus-discharge-pressure curve at the latest operating state (calc `powerCurve`, summed over
 *   the stage's cylinders) with today's operating point and the peak;
 * - per throw, the rod load over a revolution with the frame's ratings and the crank-angle arcs where the load is
 *   reversed or not (calc `rodLoad`, called with the same inputs as the checks);
 * - per working cylinder end, the modelled pressure-volume loop: calc `rodLoad`'s ideal-valve cylinder pressures
 *   (clearance re-expansion and compression along p·Vⁿ) against the end's volume from the slider-crank travel.
 */
import {
  CalcError,
  dischargeTemperature,
  gasProperties,
  goldenMaximum,
  powerCurve,
  type RodLoadInput,
  type RodLoadResult,
  rodLoad,
  type StageInput,
  type Status,
} from '../../calc';
import { barometerOf, cylinderStageInput } from '../../checks';

export { cylinderStageInput };

import type { CheckPoint, Cylinder, Finding, FinishedRound, Machine, Reading, SiteConfig, Stage } from '../../schema';

export class MachineViewError extends Error {
  override name = 'MachineViewError';
}

/** One line of a time series, values in SI (K, fraction, m³/s at the standard state, W). */
export interface TimeLine {
  label: string;
  kind: 'observed' | 'predicted';
  /** Seconds since the epoch (the round's start), ascending. */
  times: number[];
  values: number[];
}

export type StageQuantityId = 'dischargeTemperature' | 'volumetricEfficiency' | 'capacity' | 'power';

export interface StageQuantity {
  quantity: StageQuantityId;
  lines: TimeLine[];
  /** Why there is no observed line, when there is none. */
  observedNote: string | null;
}

export interface OperatingState {
  roundId: string;
  at: string;
  suctionPressurePa: number;
  dischargePressurePa: number;
  suctionTemperatureK: number | null;
  dischargeTemperatureK: number | null;
}

export interface StagePowerCurve {
  suctionPressurePa: number;
  /** Isentropic gas power of the whole stage against discharge pressure, ascending in pressure. */
  points: Array<{ dischargePressurePa: number; powerW: number }>;
  peak: { dischargePressurePa: number; powerW: number };
  operating: { dischargePressurePa: number; powerW: number };
  /** Where the last delivering end of the stage stops delivering. */
  noDeliveryPressurePa: number;
}

export interface StageView {
  stage: Stage;
  cylinderIds: string[];
  dischargeTemperature: StageQuantity;
  volumetricEfficiency: StageQuantity;
  capacity: StageQuantity;
  power: StageQuantity;
  latest: OperatingState | null;
  powerCurve: StagePowerCurve | null;
  /** Why the curve could not be drawn (no complete reading set, or calc refused the inputs). */
  powerCurveNote: string | null;
}

/** A contiguous arc of the revolution in one load direction, within [0°, 360°]. */
export interface LoadArc {
  fromDeg: number;
  toDeg: number;
  direction: 'compression' | 'tension';
  /** True when this is the minority direction: the load is reversed here. */
  reversed: boolean;
}

export interface ThrowView {
  throw: number;
  cylinderId: string;
  stageId: string;
  at: string;
  crankDeg: number[];
  gasN: number[];
  combinedN: number[];
  ratedCompressionN: number;
  ratedTensionN: number;
  peakCompression: { loadN: number; atDeg: number };
  peakTension: { loadN: number; atDeg: number };
  /** Where the combined load changes sign, ascending. */
  signChangesDeg: number[];
  arcs: LoadArc[];
  reversal: RodLoadResult['reversal'];
  status: Status;
  message: string;
}

export interface PvLoop {
  cylinderId: string;
  end: 'head' | 'crank';
  at: string;
  /** Closed loop in crank-angle order from head-end dead centre (the first point is not repeated). */
  volumeM3: number[];
  pressurePa: number[];
  clearanceVolumeM3: number;
  sweptVolumeM3: number;
  /** Observed pressures of the round the loop is modelled for (absolute). */
  suctionPressurePa: number;
  dischargePressurePa: number;
  exponent: number;
  /** Enclosed area: indicated work per revolution, J. */
  workPerCycleJ: number;
  /** Work per cycle × revolutions per second, W. */
  indicatedPowerW: number;
  suctionOpensDeg: number | null;
  dischargeOpensDeg: number | null;
}

export interface MachineView {
  machine: Machine;
  barometricPa: number;
  /** Rounds that read or judged something on this machine, oldest first. */
  roundCount: number;
  stages: StageView[];
  throws: ThrowView[];
  pvLoops: PvLoop[];
  /** Throws or loops that could not be modelled, and why. */
  notes: string[];
}

const NO_METER_NOTE =
  'Predicted only: the site configuration has no flow or power meter point for this stage, so there is nothing observed to compare with.';

const seconds = (iso: string) => Date.parse(iso) / 1000;

function pointsOf(config: SiteConfig): Map<string, CheckPoint> {
  const points = new Map<string, CheckPoint>();
  for (const route of config.routes)
    for (const point of route.points) if (!points.has(point.id)) points.set(point.id, point);
  return points;
}

/** The stage's header readings of one round, by role (as the checks find them): the latest reading of each point. */
export function stageState(
  config: SiteConfig,
  machine: Machine,
  stage: Stage,
  round: FinishedRound,
  points: Map<string, CheckPoint> = pointsOf(config),
): OperatingState | null {
  const latest = new Map<string, Reading>();
  for (const reading of round.readings) {
    if (reading.skipped || reading.valueSI === null) continue;
    const point = points.get(reading.pointId);
    if (!point || point.machineId !== machine.id || point.stageId !== stage.id || point.cylinderId !== undefined)
      continue;
    const before = latest.get(point.role);
    if (!before || Date.parse(reading.at) >= Date.parse(before.at)) latest.set(point.role, reading);
  }
  const value = (role: string) => latest.get(role)?.valueSI ?? null;
  const ps = value('suctionPressure');
  const pd = value('dischargePressure');
  if (ps === null || pd === null) return null;
  return {
    roundId: round.round.id,
    at: round.round.startedAt,
    suctionPressurePa: ps,
    dischargePressurePa: pd,
    suctionTemperatureK: value('suctionTemperature'),
    dischargeTemperatureK: value('dischargeTemperature'),
  };
}

function line(label: string, kind: TimeLine['kind']): TimeLine {
  return { label, kind, times: [], values: [] };
}

function push(target: TimeLine, t: number, value: number | null | undefined) {
  if (typeof value !== 'number' || !Number.isFinite(value)) return;
  target.times.push(t);
  target.values.push(value);
}

/** Lines in a stable order, empty ones dropped. */
function lines(map: Map<string, TimeLine>): TimeLine[] {
  return [...map.values()].filter((l) => l.times.length > 0);
}

function lineFor(map: Map<string, TimeLine>, label: string, kind: TimeLine['kind']): TimeLine {
  const key = `${label}|${kind}`;
  let found = map.get(key);
  if (!found) {
    found = line(`${label} ${kind}`, kind);
    map.set(key, found);
  }
  return found;
}

function stageTrends(stage: Stage, cylinders: Cylinder[], rounds: FinishedRound[], machineId: string) {
  const temperature = new Map<string, TimeLine>();
  const ve = new Map<string, TimeLine>();
  const capacity = new Map<string, TimeLine>();
  const power = new Map<string, TimeLine>();
  // Fix the order of the lines: each cylinder end, then the stage.
  for (const cylinder of cylinders) {
    if (cylinder.headActive) lineFor(ve, `${cylinder.id} head end`, 'predicted');
    if (cylinder.crankActive) lineFor(ve, `${cylinder.id} crank end`, 'predicted');
  }
  for (const round of rounds) {
    const t = seconds(round.round.startedAt);
    for (const finding of round.findings) {
      if (finding.subject.machineId !== machineId || finding.subject.stageId !== stage.id) continue;
      const n = finding.numbers;
      if (finding.rule === 'dischargeTemperature') {
        const label = finding.subject.cylinderId ? `Cylinder ${finding.subject.cylinderId}` : 'Stage';
        push(lineFor(temperature, label, 'observed'), t, n.observedK);
        push(lineFor(temperature, label, 'predicted'), t, n.predictedK);
      } else if (finding.rule === 'stagePerformance') {
        for (const cylinder of cylinders) {
          if (cylinder.headActive)
            push(lineFor(ve, `${cylinder.id} head end`, 'predicted'), t, n[`${cylinder.id}.veHead`]);
          if (cylinder.crankActive)
            push(lineFor(ve, `${cylinder.id} crank end`, 'predicted'), t, n[`${cylinder.id}.veCrank`]);
        }
        push(lineFor(capacity, 'Standard flow', 'predicted'), t, n.standardFlowM3s);
        push(lineFor(power, 'Shaft power', 'predicted'), t, n.shaftPowerW);
      }
    }
  }
  return {
    dischargeTemperature: { quantity: 'dischargeTemperature', lines: lines(temperature), observedNote: null },
    volumetricEfficiency: { quantity: 'volumetricEfficiency', lines: lines(ve), observedNote: NO_METER_NOTE },
    capacity: { quantity: 'capacity', lines: lines(capacity), observedNote: NO_METER_NOTE },
    power: { quantity: 'power', lines: lines(power), observedNote: NO_METER_NOTE },
  } satisfies Record<string, StageQuantity>;
}

/** Points on the stage's power curve. */
export const STAGE_CURVE_POINTS = 120;

/**
 * Isentropic power of a stage (its cylinders in parallel on one suction and discharge) against discharge pressure,
 * from calc's `powerCurve` per cylinder on a common pressure grid. The peak of the sum is searched on the grid and
 * refined by golden-section search, since cylinders of different clearance peak at different ratios.
 */
export function stagePowerCurve(inputs: StageInput[], operatingDischargePa: number): StagePowerCurve {
  if (inputs.length === 0) throw new MachineViewError('A stage without cylinders has no power curve.');
  const ps = (inputs[0] as StageInput).suctionPressurePa;
  const stop = Math.max(
    ...inputs.map((input) => powerCurve({ ...input, dischargePressuresPa: [ps] }).noDeliveryPressurePa),
  );
  const total = (pressures: number[]) => {
    const sums = pressures.map(() => 0);
    for (const input of inputs) {
      powerCurve({ ...input, dischargePressuresPa: pressures }).points.forEach((point, index) => {
        sums[index] = (sums[index] as number) + point.powerW;
      });
    }
    return sums;
  };
  const grid = Array.from({ length: STAGE_CURVE_POINTS }, (_, index) =>
    index === STAGE_CURVE_POINTS - 1 ? stop : ps + ((stop - ps) * index) / (STAGE_CURVE_POINTS - 1),
  );
  const power = total(grid);
  let best = 0;
  for (let index = 1; index < grid.length; index += 1)
    if ((power[index] as number) > (power[best] as number)) best = index;
  const refined = goldenMaximum(
    (pd) => total([pd])[0] as number,
    grid[Math.max(0, best - 1)] as number,
    grid[Math.min(grid.length - 1, best + 1)] as number,
    1e-6,
  );
  return {
    suctionPressurePa: ps,
    points: grid.map((pd, index) => ({ dischargePressurePa: pd, powerW: power[index] as number })),
    peak: { dischargePressurePa: refined.at, powerW: refined.value },
    operating: { dischargePressurePa: operatingDischargePa, powerW: total([operatingDischargePa])[0] as number },
    noDeliveryPressurePa: stop,
  };
}

/** The polytropic exponent the checks use for a cylinder's rod load (src/checks/stage.ts). */
function rodLoadExponent(cylinder: Cylinder, state: OperatingState, composition: Record<string, number>): number {
  if (cylinder.polytropicExponent !== undefined) return cylinder.polytropicExponent;
  if (state.suctionTemperatureK === null) return gasProperties(composition, 300).k;
  return dischargeTemperature({
    suctionTemperatureK: state.suctionTemperatureK,
    suctionPressurePa: state.suctionPressurePa,
    dischargePressurePa: state.dischargePressurePa,
    composition,
  }).k;
}

export function rodLoadInputOf(
  machine: Machine,
  cylinder: Cylinder,
  state: OperatingState,
  composition: Record<string, number>,
  barometricPa: number,
): RodLoadInput {
  const frameThrow = machine.frame.throws.find((t) => t.index === cylinder.throw);
  return {
    boreM: cylinder.boreM,
    rodM: cylinder.rodM,
    strokeM: machine.frame.strokeM,
    connectingRodM: machine.frame.connectingRodM,
    speedRpm: machine.frame.ratedSpeedRpm,
    suctionPressurePa: state.suctionPressurePa,
    dischargePressurePa: state.dischargePressurePa,
    distancePiecePressurePa: barometricPa,
    headClearance: cylinder.headClearance,
    crankClearance: cylinder.crankClearance,
    headActive: cylinder.headActive,
    crankActive: cylinder.crankActive,
    exponent: rodLoadExponent(cylinder, state, composition),
    reciprocatingMassKg: frameThrow?.reciprocatingMassKg ?? 0,
    ratedCompressionN: machine.frame.ratedCompressionN,
    ratedTensionN: machine.frame.ratedTensionN,
    ...(machine.frame.reversalCriterion ? { reversalCriterion: machine.frame.reversalCriterion } : {}),
  };
}

/**
 * Arcs of one load direction over a revolution from samples at ascending angles in [0°, 360°): sign changes are
 * placed by linear interpolation between neighbouring samples (wrapping through 0°), and the arc that wraps is split
 * at 0°/360° so every arc lies within [0°, 360°].
 */
export function loadArcs(
  crankDeg: readonly number[],
  loadN: readonly number[],
  minority: 'compression' | 'tension',
): { arcs: LoadArc[]; signChangesDeg: number[] } {
  const count = crankDeg.length;
  const direction = (load: number): LoadArc['direction'] => (load > 0 ? 'compression' : 'tension');
  const changes: number[] = [];
  for (let k = 0; k < count; k += 1) {
    const a = loadN[k] as number;
    const b = loadN[(k + 1) % count] as number;
    if (direction(a) === direction(b)) continue;
    const aDeg = crankDeg[k] as number;
    const bDeg = k + 1 < count ? (crankDeg[k + 1] as number) : (crankDeg[0] as number) + 360;
    const at = aDeg + ((bDeg - aDeg) * a) / (a - b);
    changes.push(at >= 360 ? at - 360 : at);
  }
  changes.sort((x, y) => x - y);
  const arc = (fromDeg: number, toDeg: number, dir: LoadArc['direction']): LoadArc => ({
    fromDeg,
    toDeg,
    direction: dir,
    reversed: dir === minority,
  });
  if (changes.length === 0) return { arcs: [arc(0, 360, direction(loadN[0] ?? 0))], signChangesDeg: [] };
  const directionAfter = (deg: number) => {
    // The sample just after a change tells its direction.
    const index = crankDeg.findIndex((d) => d > deg);
    return direction(loadN[index === -1 ? 0 : index] as number);
  };
  const arcs: LoadArc[] = [];
  const first = changes[0] as number;
  const last = changes[changes.length - 1] as number;
  const wrapping = directionAfter(last);
  if (first > 0) arcs.push(arc(0, first, wrapping));
  for (let k = 0; k < changes.length - 1; k += 1) {
    const from = changes[k] as number;
    arcs.push(arc(from, changes[k + 1] as number, directionAfter(from)));
  }
  if (last < 360) arcs.push(arc(last, 360, wrapping));
  return { arcs, signChangesDeg: changes };
}

export function throwView(
  machine: Machine,
  cylinder: Cylinder,
  state: OperatingState,
  input: RodLoadInput,
  result: RodLoadResult = rodLoad(input),
): ThrowView {
  const minority = result.combined.tensionN <= result.combined.compressionN ? 'tension' : 'compression';
  const { arcs, signChangesDeg } = loadArcs(result.curve.crankDeg, result.curve.combinedN, minority);
  return {
    throw: cylinder.throw,
    cylinderId: cylinder.id,
    stageId: cylinder.stageId,
    at: state.at,
    crankDeg: result.curve.crankDeg,
    gasN: result.curve.gasN,
    combinedN: result.curve.combinedN,
    ratedCompressionN: machine.frame.ratedCompressionN,
    ratedTensionN: machine.frame.ratedTensionN,
    peakCompression: { loadN: result.combined.compressionN, atDeg: result.combined.compressionAtDeg },
    peakTension: { loadN: result.combined.tensionN, atDeg: result.combined.tensionAtDeg },
    signChangesDeg,
    arcs,
    reversal: result.reversal,
    status: result.status,
    message: result.message,
  };
}

/**
 * The modelled pressure-volume loops of a cylinder's working ends. Pressures are calc `rodLoad`'s ideal-valve cylinder
 * pressures (1° steps) with the valve-opening corners added exactly (suction opens at Ps, discharge at Pd); the volume
 * at crank angle θ is V_HE = A_HE·(C_HE·S + x), V_CE = A_CE·(C_CE·S + S − x) with the slider-crank piston travel
 * x = r(1 − cos θ) + L(1 − √(1 − λ²sin²θ)). The enclosed area is the indicated work per revolution.
 * source: ideal reciprocating compressor cycle with clearance (e.g. Eastop & McConkey, Applied Thermodynamics for
 * Engineering Technologists, ch. 9; from memory); slider-crank travel as in any machine-dynamics text.
 */
export function pvLoops(cylinderId: string, input: RodLoadInput, at: string, result: RodLoadResult = rodLoad(input)) {
  const radius = input.strokeM / 2;
  const lambda = radius / input.connectingRodM;
  const travel = (deg: number) => {
    const theta = (deg * Math.PI) / 180;
    const s = Math.sin(theta);
    return radius * (1 - Math.cos(theta)) + input.connectingRodM * (1 - Math.sqrt(1 - lambda * lambda * s * s));
  };
  const areaHead = (Math.PI / 4) * input.boreM ** 2;
  const areaCrank = (Math.PI / 4) * (input.boreM ** 2 - input.rodM ** 2);
  const loops: PvLoop[] = [];
  const events = result.valveEventsDeg;
  const ends = [
    {
      end: 'head' as const,
      active: input.headActive,
      area: areaHead,
      clearance: input.headClearance,
      volume: (deg: number) => areaHead * (input.headClearance * input.strokeM + travel(deg)),
      pressures: result.curve.headPressurePa,
      corners: [
        { deg: events.headSuction, p: input.suctionPressurePa },
        { deg: events.headDischarge, p: input.dischargePressurePa },
      ],
      suction: events.headSuction ?? null,
      discharge: events.headDischarge ?? null,
    },
    {
      end: 'crank' as const,
      active: input.crankActive,
      area: areaCrank,
      clearance: input.crankClearance,
      volume: (deg: number) => areaCrank * (input.crankClearance * input.strokeM + input.strokeM - travel(deg)),
      pressures: result.curve.crankPressurePa,
      corners: [
        { deg: events.crankDischarge, p: input.dischargePressurePa },
        { deg: events.crankSuction, p: input.suctionPressurePa },
      ],
      suction: events.crankSuction ?? null,
      discharge: events.crankDischarge ?? null,
    },
  ];
  for (const end of ends) {
    if (!end.active) continue;
    const samples = result.curve.crankDeg.map((deg, k) => ({ deg, p: end.pressures[k] as number }));
    for (const corner of end.corners) if (corner.deg !== undefined) samples.push({ deg: corner.deg, p: corner.p });
    samples.sort((a, b) => a.deg - b.deg);
    const volumeM3 = samples.map((s) => end.volume(s.deg));
    const pressurePa = samples.map((s) => s.p);
    let twiceArea = 0;
    for (let k = 0; k < samples.length; k += 1) {
      const next = (k + 1) % samples.length;
      twiceArea +=
        (volumeM3[k] as number) * (pressurePa[next] as number) - (volumeM3[next] as number) * (pressurePa[k] as number);
    }
    const work = Math.abs(twiceArea) / 2;
    loops.push({
      cylinderId,
      end: end.end,
      at,
      volumeM3,
      pressurePa,
      clearanceVolumeM3: end.area * end.clearance * input.strokeM,
      sweptVolumeM3: end.area * input.strokeM,
      suctionPressurePa: input.suctionPressurePa,
      dischargePressurePa: input.dischargePressurePa,
      exponent: input.exponent,
      workPerCycleJ: work,
      indicatedPowerW: (work * input.speedRpm) / 60,
      suctionOpensDeg: end.suction,
      dischargeOpensDeg: end.discharge,
    });
  }
  return loops;
}

const touches = (round: FinishedRound, machineId: string, points: Map<string, CheckPoint>) =>
  round.findings.some((f: Finding) => f.subject.machineId === machineId) ||
  round.readings.some((r) => points.get(r.pointId)?.machineId === machineId);

const why = (error: unknown) => {
  if (error instanceof CalcError || error instanceof MachineViewError) return error.message;
  throw error;
};

/** Everything the machine screen shows for one machine. Throws MachineViewError for an unknown machine id. */
export function machineView(config: SiteConfig, machineId: string, rounds: readonly FinishedRound[]): MachineView {
  const machine = config.machines.find((m) => m.id === machineId);
  if (!machine) throw new MachineViewError(`There is no machine ${machineId} in site configuration ${config.version}.`);
  const points = pointsOf(config);
  const barometricPa = barometerOf(config);
  const mine = rounds
    .filter((round) => round.round.state === 'finished' && touches(round, machine.id, points))
    .sort((a, b) => Date.parse(a.round.startedAt) - Date.parse(b.round.startedAt));
  const notes: string[] = [];
  const stages: StageView[] = [];
  const throws: ThrowView[] = [];
  const loops: PvLoop[] = [];
  for (const stage of [...machine.stages].sort((a, b) => a.index - b.index)) {
    const cylinders = machine.cylinders.filter((c) => c.stageId === stage.id).sort((a, b) => a.throw - b.throw);
    const gas = config.gasStreams.find((g) => g.id === stage.gasStreamId);
    let latest: OperatingState | null = null;
    for (let k = mine.length - 1; k >= 0 && latest === null; k -= 1)
      latest = stageState(config, machine, stage, mine[k] as FinishedRound, points);
    let curve: StagePowerCurve | null = null;
    let powerCurveNote: string | null = null;
    if (!latest) powerCurveNote = 'No round has read both the suction and the discharge pressure of this stage yet.';
    else if (latest.suctionTemperatureK === null)
      powerCurveNote = 'The latest round with both pressures has no suction temperature, which the curve needs.';
    else if (!gas) powerCurveNote = `Gas stream ${stage.gasStreamId} is missing from the site configuration.`;
    else {
      const state = { ...latest, suctionTemperatureK: latest.suctionTemperatureK };
      try {
        curve = stagePowerCurve(
          cylinders.map((c) => cylinderStageInput(machine, stage, c, state, gas.composition, gas.standardBasis)),
          latest.dischargePressurePa,
        );
      } catch (error) {
        powerCurveNote = `No power curve: ${why(error)}`;
      }
    }
    if (latest && gas) {
      for (const cylinder of cylinders) {
        try {
          const input = rodLoadInputOf(machine, cylinder, latest, gas.composition, barometricPa);
          const result = rodLoad(input);
          throws.push(throwView(machine, cylinder, latest, input, result));
          loops.push(...pvLoops(cylinder.id, input, latest.at, result));
        } catch (error) {
          notes.push(`Throw ${cylinder.throw} (${cylinder.id}): ${why(error)}`);
        }
      }
    }
    stages.push({
      stage,
      cylinderIds: cylinders.map((c) => c.id),
      ...stageTrends(stage, cylinders, mine, machine.id),
      latest,
      powerCurve: curve,
      powerCurveNote,
    });
  }
  throws.sort((a, b) => a.throw - b.throw);
  return { machine, barometricPa, roundCount: mine.length, stages, throws, pvLoops: loops, notes };
}
