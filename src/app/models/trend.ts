/**
 * One check point's history ready for a chart: times, values and limits in the unit the point is read in, the
 * projection of the recent trend to the nearest limit ahead of it (calc's `fitToLimit`, as the round checks do in
 * `src/checks/trend.ts`), and a one-sentence text alternative. Pure: no DOM, no store.
 */
import { fitToLimit, fromSI, TREND_MIN_R_SQUARED, unitInfo } from '../../calc';
import { barometerOf } from '../../checks';
import type { CheckPoint, Reading, SiteConfig } from '../../schema';
import { POINT_QUANTITY } from '../../schema';

const MS_PER_DAY = 86_400_000;
/** Readings fitted for the projection: the same window as the round checks (src/checks/trend.ts). */
export const CHART_TREND_WINDOW = 20;
/** Fewer readings than this make no projection, as in the round checks. */
export const CHART_TREND_MIN_POINTS = 10;
/** A crossing further ahead than this is not drawn: the line would squash the chart and mean little. */
export const CHART_HORIZON_DAYS = 365;

export type LimitLevel = 'watch' | 'alarm' | 'trip';
export type LimitSide = 'high' | 'low';

export interface ChartLimit {
  level: LimitLevel;
  side: LimitSide;
  /** In the display unit. */
  value: number;
}

export interface Projection {
  limitLevel: LimitLevel;
  side: LimitSide;
  /** The limit in the display unit. */
  limitValue: number;
  /** When the fitted line meets the limit; null when the readings scatter too much or it is beyond the horizon. */
  reachesAt: string | null;
  /** What a person reads, e.g. `At this rate it reaches the alarm limit 93 °C about 12 March 2027 (in 101 days).` */
  words: string;
  /** From the last reading to the crossing, [seconds since the epoch, display value]; null when reachesAt is. */
  line: [[number, number], [number, number]] | null;
}

export interface PointTrend {
  point: CheckPoint;
  /** The display unit's label (`°C`, `bar g`, `%`, `mm/s`), or '' for a unitless point. */
  unit: string;
  /** Seconds since the epoch, ascending. */
  times: number[];
  /** In the display unit; null where the reading was skipped. */
  values: Array<number | null>;
  limits: ChartLimit[];
  projection: Projection | null;
  summary: string;
}

export class TrendError extends Error {
  override name = 'TrendError';
}

const MONTHS = [
  'January',
  'February',
  'March',
  'April',
  'May',
  'June',
  'July',
  'August',
  'September',
  'October',
  'November',
  'December',
];

/** `12 March 2027`, in UTC so the same instant reads the same on every tablet and in tests. */
export function dayWords(iso: string | number): string {
  const d = new Date(iso);
  return `${d.getUTCDate()} ${MONTHS[d.getUTCMonth()]} ${d.getUTCFullYear()}`;
}

/** A display value with the digits the checks use (src/checks/context.ts `display`), trailing zeros dropped. */
export function showValue(value: number, unit: string): string {
  const digits = Math.abs(value) >= 100 ? 0 : Math.abs(value) >= 10 ? 1 : 2;
  const text = String(Number(value.toFixed(digits)));
  return unit ? `${text} ${unit}` : text;
}

/** Every check point of the configuration once, in route order. */
export function allPoints(config: SiteConfig): CheckPoint[] {
  const seen = new Map<string, CheckPoint>();
  for (const route of config.routes)
    for (const point of route.points) if (!seen.has(point.id)) seen.set(point.id, point);
  return [...seen.values()];
}

/** Points with numbers to chart (not yes/no, choice or text). */
export function isChartable(point: CheckPoint): boolean {
  return POINT_QUANTITY[point.kind] !== undefined;
}

interface Converter {
  /** Display label of the unit. */
  label: string;
  /** Label of a difference in this unit (K for °C, as the checks write it). */
  deltaLabel: string;
  toDisplay: (valueSI: number) => number;
}

function converterFor(config: SiteConfig, point: CheckPoint): Converter {
  const quantity = POINT_QUANTITY[point.kind];
  if (quantity === 'percent') return { label: '%', deltaLabel: '%', toDisplay: (v) => v };
  if (quantity === 'velocity') return { label: 'mm/s', deltaLabel: 'mm/s', toDisplay: (v) => v };
  if (!point.unit) return { label: '', deltaLabel: '', toDisplay: (v) => v };
  const unit = point.unit;
  const info = unitInfo(unit);
  const barometricPa = barometerOf(config);
  const deltaLabel =
    info.quantity === 'temperature' ? (unit === 'degF' ? '°F' : unit === 'degR' ? '°R' : 'K') : info.label;
  return { label: info.label, deltaLabel, toDisplay: (v) => fromSI(v, unit, { barometricPa }) };
}

function findPoint(config: SiteConfig, pointId: string): CheckPoint {
  const point = allPoints(config).find((p) => p.id === pointId);
  if (!point) throw new TrendError(`No check point "${pointId}" in site configuration version ${config.version}.`);
  if (!isChartable(point))
    throw new TrendError(
      `Check point "${pointId}" (${point.label}) is a ${point.kind} point and has no numbers to chart.`,
    );
  return point;
}

const LIMIT_KEYS: Array<{ key: keyof NonNullable<CheckPoint['limits']>; level: LimitLevel; side: LimitSide }> = [
  { key: 'lowTrip', level: 'trip', side: 'low' },
  { key: 'lowAlarm', level: 'alarm', side: 'low' },
  { key: 'lowWatch', level: 'watch', side: 'low' },
  { key: 'highWatch', level: 'watch', side: 'high' },
  { key: 'highAlarm', level: 'alarm', side: 'high' },
  { key: 'highTrip', level: 'trip', side: 'high' },
];

interface Series {
  times: number[];
  values: Array<number | null>;
  /** Readings with a value, SI, ascending: what the fit uses. */
  fit: Array<{ t: number; v: number }>;
}

function seriesOf(pointId: string, readings: readonly Reading[], convert: Converter): Series {
  const mine = readings
    .filter((r) => r.pointId === pointId)
    .map((r) => ({ reading: r, ms: Date.parse(r.at) }))
    .filter((r) => Number.isFinite(r.ms))
    .sort((a, b) => a.ms - b.ms);
  const times: number[] = [];
  const values: Array<number | null> = [];
  const fit: Array<{ t: number; v: number }> = [];
  for (const { reading, ms } of mine) {
    times.push(ms / 1000);
    const v = reading.skipped ? null : reading.valueSI;
    if (v === null) {
      values.push(null);
      continue;
    }
    let shown: number | null;
    try {
      shown = convert.toDisplay(v);
    } catch {
      shown = null; // a stored value outside the unit's range is left out of the chart, never thrown
    }
    values.push(shown);
    if (shown !== null) fit.push({ t: ms, v });
  }
  return { times, values, fit };
}

function projectionOf(
  point: CheckPoint,
  fit: ReadonlyArray<{ t: number; v: number }>,
  convert: Converter,
  nowMs: number,
): Projection | null {
  const recent = fit.slice(-CHART_TREND_WINDOW);
  const last = recent.at(-1);
  if (!last || recent.length < CHART_TREND_MIN_POINTS || !point.limits) return null;
  // The nearest limit ahead in each direction, from the last value (as the round checks choose it).
  const ahead = LIMIT_KEYS.flatMap(({ key, level, side }) => {
    const value = point.limits?.[key];
    if (value === undefined) return [];
    if (side === 'high' ? value <= last.v : value >= last.v) return [];
    return [{ level, side, value }];
  });
  const highs = ahead.filter((l) => l.side === 'high').sort((a, b) => a.value - b.value);
  const lows = ahead.filter((l) => l.side === 'low').sort((a, b) => b.value - a.value);
  const candidates = [highs[0], lows[0]].filter((c) => c !== undefined);
  for (const limit of candidates) {
    const direction = limit.side === 'high' ? 'rising' : 'falling';
    const trend = fitToLimit(recent, limit.value, direction, CHART_TREND_WINDOW);
    const toward = direction === 'rising' ? trend.slopePerDay > 0 : trend.slopePerDay < 0;
    if (!trend.enoughData || !toward) continue;
    const limitValue = convert.toDisplay(limit.value);
    const named = `the ${limit.level} limit ${showValue(limitValue, convert.label)}`;
    const base = { limitLevel: limit.level, side: limit.side, limitValue };
    if (trend.rSquared < TREND_MIN_R_SQUARED || !trend.reachesAt) {
      return {
        ...base,
        reachesAt: null,
        words: `The readings drift toward ${named}, but scatter too much to say when it would be reached.`,
        line: null,
      };
    }
    const crossMs = Date.parse(trend.reachesAt);
    const days = (crossMs - nowMs) / MS_PER_DAY;
    if (days > CHART_HORIZON_DAYS) {
      return {
        ...base,
        reachesAt: null,
        words: `At this rate it would take more than a year to reach ${named}.`,
        line: null,
      };
    }
    // The fitted line passes through the crossing with the fitted slope: its value at the last reading follows.
    const fittedLastSI = limit.value + trend.slopePerDay * ((last.t - crossMs) / MS_PER_DAY);
    let fittedLast: number;
    try {
      fittedLast = convert.toDisplay(fittedLastSI);
    } catch {
      fittedLast = convert.toDisplay(last.v);
    }
    const line: [[number, number], [number, number]] = [
      [last.t / 1000, fittedLast],
      [crossMs / 1000, limitValue],
    ];
    const words =
      days < 0
        ? `At this rate it would already have reached ${named} about ${dayWords(crossMs)}.`
        : `At this rate it reaches ${named} about ${dayWords(crossMs)} (in ${Math.max(1, Math.round(days))} ${Math.max(1, Math.round(days)) === 1 ? 'day' : 'days'}).`;
    return { ...base, reachesAt: trend.reachesAt, words, line };
  }
  return null;
}

function trendWords(fit: ReadonlyArray<{ t: number; v: number }>, convert: Converter): string {
  const recent = fit.slice(-CHART_TREND_WINDOW);
  const last = recent.at(-1);
  if (!last || recent.length < 3) return 'too few readings to show a trend';
  // Any limit works here: only the slope and how well the line fits are used.
  const trend = fitToLimit(recent, last.v, 'rising', CHART_TREND_WINDOW);
  if (trend.slopePerDay === 0) return 'steady';
  if (trend.rSquared < TREND_MIN_R_SQUARED) return 'no clear trend';
  let perDay: number;
  try {
    perDay = Math.abs(convert.toDisplay(last.v + trend.slopePerDay) - convert.toDisplay(last.v));
  } catch {
    perDay = Math.abs(trend.slopePerDay);
  }
  return `${trend.slopePerDay > 0 ? 'rising' : 'falling'} about ${showValue(perDay, convert.deltaLabel)} a day`;
}

function summaryOf(label: string, series: Series, fit: Series['fit'], convert: Converter): string {
  const shown = series.values
    .map((v, k) => ({ v, t: series.times[k] as number }))
    .filter((x): x is { v: number; t: number } => x.v !== null);
  const last = shown.at(-1);
  const first = shown[0];
  if (!last || !first) return `${label}: no readings on this tablet yet.`;
  const low = Math.min(...shown.map((x) => x.v));
  const high = Math.max(...shown.map((x) => x.v));
  const count = `${shown.length} ${shown.length === 1 ? 'reading' : 'readings'}`;
  const span =
    shown.length === 1
      ? `on ${dayWords(first.t * 1000)}`
      : `from ${dayWords(first.t * 1000)} to ${dayWords(last.t * 1000)}, between ${showValue(low, convert.label)} and ${showValue(high, convert.label)}`;
  return `${label}: ${count} ${span}; last ${showValue(last.v, convert.label)} on ${dayWords(last.t * 1000)}, ${trendWords(fit, convert)}.`;
}

/** One check point's trend for a chart. Throws TrendError for an unknown or non-numeric point. */
export function pointTrend(config: SiteConfig, pointId: string, readings: readonly Reading[], now: string): PointTrend {
  const point = findPoint(config, pointId);
  const nowMs = Date.parse(now);
  if (!Number.isFinite(nowMs)) throw new TrendError(`"${now}" is not a time; give now as an ISO 8601 time.`);
  const convert = converterFor(config, point);
  const series = seriesOf(pointId, readings, convert);
  const limits: ChartLimit[] = LIMIT_KEYS.flatMap(({ key, level, side }) => {
    const value = point.limits?.[key];
    if (value === undefined) return [];
    try {
      return [{ level, side, value: convert.toDisplay(value) }];
    } catch {
      return [];
    }
  });
  return {
    point,
    unit: convert.label,
    times: series.times,
    values: series.values,
    limits,
    projection: projectionOf(point, series.fit, convert, nowMs),
    summary: summaryOf(point.label, series, series.fit, convert),
  };
}

export interface SeriesLine {
  pointId: string;
  label: string;
  /** Seconds since the epoch, ascending. */
  times: number[];
  /** In the shared display unit; null where skipped. */
  values: Array<number | null>;
}

export interface MultiTrend {
  title: string;
  unit: string;
  series: SeriesLine[];
  /** One sentence per series, joined: the text alternative. */
  summary: string;
}

/** Several points on one chart, all in the first point's display unit (e.g. the valve covers of one cylinder). */
export function multiTrend(
  config: SiteConfig,
  title: string,
  pointIds: readonly string[],
  readings: readonly Reading[],
): MultiTrend {
  const points = pointIds.map((id) => findPoint(config, id));
  const first = points[0];
  if (!first) throw new TrendError(`${title}: no check points to chart.`);
  const convert = converterFor(config, first);
  const series = points.map((point) => {
    if (POINT_QUANTITY[point.kind] !== POINT_QUANTITY[first.kind])
      throw new TrendError(`${point.label} is not read in the same quantity as ${first.label}; chart it on its own.`);
    const s = seriesOf(point.id, readings, convert);
    return { point, s };
  });
  return {
    title,
    unit: convert.label,
    series: series.map(({ point, s }) => ({ pointId: point.id, label: point.label, times: s.times, values: s.values })),
    summary: series.map(({ point, s }) => summaryOf(point.label, s, s.fit, convert)).join(' '),
  };
}

/** The valve cover points of one cylinder, in configuration order. */
export function coverPoints(config: SiteConfig, machineId: string, cylinderId: string): CheckPoint[] {
  return allPoints(config).filter(
    (p) => p.kind === 'valveCoverTemperature' && p.machineId === machineId && p.cylinderId === cylinderId,
  );
}

/** The bearing temperature points of one machine, then its oil supply temperature. */
export function bearingPoints(config: SiteConfig, machineId: string): CheckPoint[] {
  const mine = allPoints(config).filter((p) => p.machineId === machineId);
  return [
    ...mine.filter((p) => p.kind === 'bearingTemperature'),
    ...mine.filter((p) => p.role === 'oilSupplyTemperature'),
  ];
}
