/** What every check needs to know about the site and this round's readings, looked up once. */
import { barometricPressure, CalcError, fromSI, unitInfo } from '../calc';
import type { CheckPoint, Finding, Machine, Reading, SiteConfig } from '../schema';

export interface History {
  /** Readings of earlier, finished rounds (any order). */
  readings: Reading[];
}

export interface RoundContext {
  config: SiteConfig;
  roundId: string;
  barometricPa: number;
  points: Map<string, CheckPoint>;
  machines: Map<string, Machine>;
  /** This round's readings with a value, by point id (the latest if a point was read twice). */
  readings: Map<string, Reading>;
  /** Earlier readings by point id, oldest first, with their time in ms. */
  history: Map<string, Array<{ reading: Reading; ms: number }>>;
  /** Results of pure calculations within this evaluation, by their inputs (cylinders of one stage often match). */
  memo: Map<string, unknown>;
}

/** Runs a pure calculation once per distinct input within one evaluation. */
export function memoised<I, O>(ctx: RoundContext, name: string, input: I, run: (input: I) => O): O {
  const key = `${name}:${JSON.stringify(input)}`;
  if (ctx.memo.has(key)) return ctx.memo.get(key) as O;
  const result = run(input);
  ctx.memo.set(key, result);
  return result;
}

export function barometerOf(config: SiteConfig): number {
  return config.barometer.kind === 'fixed'
    ? config.barometer.pressurePa
    : barometricPressure(config.barometer.elevationM);
}

/**
 * Parsed reading times. History arrays are reused between evaluations (the tablet re-evaluates as each reading is
 * entered), and Date.parse is the slowest step of building the context; records are immutable, so caching is safe.
 */
const parsedTimes = new WeakMap<Reading, number>();

function timeOf(reading: Reading): number {
  let ms = parsedTimes.get(reading);
  if (ms === undefined) {
    ms = Date.parse(reading.at);
    parsedTimes.set(reading, ms);
  }
  return ms;
}

/** Point definitions by id; identical on every route by configuration rule, so one map per configuration. */
const pointMaps = new WeakMap<SiteConfig, Map<string, CheckPoint>>();

function pointsOf(config: SiteConfig): Map<string, CheckPoint> {
  let points = pointMaps.get(config);
  if (!points) {
    points = new Map();
    for (const route of config.routes)
      for (const point of route.points) if (!points.has(point.id)) points.set(point.id, point);
    pointMaps.set(config, points);
  }
  return points;
}

/** Earlier readings grouped by point and sorted by time, once per history object (records never change). */
const historyMaps = new WeakMap<History, Map<string, Array<{ reading: Reading; ms: number }>>>();

function historyByPoint(history: History): Map<string, Array<{ reading: Reading; ms: number }>> {
  let past = historyMaps.get(history);
  if (!past) {
    past = new Map();
    for (const reading of history.readings) {
      if (reading.skipped || reading.valueSI === null) continue;
      const list = past.get(reading.pointId) ?? [];
      list.push({ reading, ms: timeOf(reading) });
      past.set(reading.pointId, list);
    }
    for (const list of past.values()) list.sort((a, b) => a.ms - b.ms);
    historyMaps.set(history, past);
  }
  return past;
}

export function buildContext(config: SiteConfig, readings: Reading[], history: History | undefined): RoundContext {
  const points = pointsOf(config);
  const current = new Map<string, Reading>();
  for (const reading of readings) {
    if (reading.skipped || reading.entered === null) continue;
    const earlier = current.get(reading.pointId);
    if (!earlier || Date.parse(earlier.at) <= Date.parse(reading.at)) current.set(reading.pointId, reading);
  }
  const past = history ? historyByPoint(history) : new Map();
  return {
    config,
    roundId: readings[0]?.roundId ?? '',
    barometricPa: barometerOf(config),
    points,
    machines: new Map(config.machines.map((machine) => [machine.id, machine])),
    readings: current,
    history: past,
    memo: new Map(),
  };
}

/** The reading of the first point matching `match`, with its point. */
export function findReading(
  ctx: RoundContext,
  match: (point: CheckPoint) => boolean,
): { point: CheckPoint; reading: Reading; value: number } | null {
  for (const [pointId, reading] of ctx.readings) {
    const point = ctx.points.get(pointId);
    if (point && reading.valueSI !== null && match(point)) return { point, reading, value: reading.valueSI };
  }
  return null;
}

/** A value in SI shown in the unit the person used (or the point's unit), e.g. `52.3 barg`. */
export function display(ctx: RoundContext, valueSI: number, unit: string | null | undefined, delta = false): string {
  if (!unit) return Number(valueSI.toPrecision(4)).toString();
  const info = unitInfo(unit);
  if (delta && info.quantity === 'temperature') {
    const factor = unit === 'degF' || unit === 'degR' ? 1.8 : 1;
    return `${(valueSI * factor).toFixed(1)} ${unit === 'degF' ? '°F' : unit === 'degR' ? '°R' : 'K'}`;
  }
  try {
    const value = fromSI(valueSI, unit, { barometricPa: ctx.barometricPa });
    const digits = Math.abs(value) >= 100 ? 0 : Math.abs(value) >= 10 ? 1 : 2;
    return `${value.toFixed(digits)} ${info.label}`;
  } catch {
    return `${Number(valueSI.toPrecision(4))} ${unitInfoSafe(unit)}`;
  }
}

function unitInfoSafe(unit: string): string {
  try {
    return unitInfo(unit).id;
  } catch {
    return unit;
  }
}

export function findingKey(ctx: RoundContext, rule: Finding['rule'], subject: Finding['subject']): string {
  const parts = [
    subject.machineId,
    subject.stageId,
    subject.cylinderId,
    subject.throw,
    subject.bearingId,
    subject.valvePositionId,
    subject.pointId,
  ]
    .filter((part) => part !== undefined)
    .join('/');
  return `${ctx.roundId}:${rule}:${parts}`;
}

export function makeFinding(
  ctx: RoundContext,
  rule: Finding['rule'],
  subject: Finding['subject'],
  severity: Finding['severity'],
  message: string,
  numbers: Finding['numbers'],
  inputs: Finding['inputs'],
): Finding {
  const clean: Finding['numbers'] = {};
  for (const [key, value] of Object.entries(numbers))
    clean[key] = value === null || Number.isFinite(value) ? value : null;
  return {
    key: findingKey(ctx, rule, subject),
    roundId: ctx.roundId,
    rule,
    subject,
    severity,
    message: message.slice(0, 2000),
    numbers: clean,
    inputs,
  };
}

/** A reading a check cannot use becomes an `input` finding that says why, never an exception. */
export function inputFinding(ctx: RoundContext, subject: Finding['subject'], what: string, error: unknown): Finding {
  if (!(error instanceof CalcError)) throw error;
  return makeFinding(
    ctx,
    'input',
    subject,
    'watch',
    `Cannot check ${what}: ${error.message}`,
    {},
    { code: error.code, field: error.field },
  );
}
