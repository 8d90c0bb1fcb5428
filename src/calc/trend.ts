/**
 * Time to a limit: an ordinary least-squares line through the most recent readings, extended to where it meets the
 * limit. source: ordinary least squares (e.g. NIST/SEMATECH e-Handbook of Statistical Methods, §4.1.4.1).
 * The answer is withheld (null) when the trend moves away from the limit or the line explains too little (R² < 0.5).
 */
import { CalcError, requireFinite, requireRange } from './errors';
import { MS_PER_DAY, parseTime } from './time';

export const TREND_WINDOW_DEFAULT = 10;
export const TREND_MIN_POINTS = 3;
export const TREND_MIN_R_SQUARED = 0.5;

export interface TimeToLimitInput {
  points: Array<{ at: string; value: number }>;
  limit: number;
  direction: 'rising' | 'falling';
  /** How many of the most recent points to fit (default 10). */
  window?: number;
}

export interface TimeToLimitResult {
  slopePerDay: number;
  reachesAt: string | null;
  rSquared: number;
  enoughData: boolean;
}

export function timeToLimit(i: TimeToLimitInput): TimeToLimitResult {
  if (!Array.isArray(i.points))
    throw new CalcError('E_TIME_ORDER', 'points', i.points, 'points must be a list of { at, value }.');
  requireFinite('limit', i.limit);
  if (i.direction !== 'rising' && i.direction !== 'falling') {
    throw new CalcError(
      'E_TIME_ORDER',
      'direction',
      i.direction,
      `direction = "${String(i.direction)}"; use rising or falling.`,
    );
  }
  const window = Math.floor(
    requireRange('E_TIME_ORDER', 'window', i.window ?? TREND_WINDOW_DEFAULT, { min: 2, max: 10_000 }),
  );
  const all = i.points.map((point, index) => ({
    t: parseTime(`points[${index}].at`, point.at),
    v: requireFinite(`points[${index}].value`, point.value),
  }));
  return fitToLimit(all, i.limit, i.direction, window);
}

/**
 * The same fit for points whose times are already parsed (ms since the epoch, finite values): the checks engine
 * keeps parsed times for its history, so it skips re-reading ISO strings on every evaluation.
 */
export function fitToLimit(
  points: ReadonlyArray<{ t: number; v: number }>,
  limit: number,
  direction: 'rising' | 'falling',
  window = TREND_WINDOW_DEFAULT,
): TimeToLimitResult {
  const recent = [...points].sort((a, b) => a.t - b.t).slice(-window);
  const n = recent.length;
  const none = { slopePerDay: 0, reachesAt: null, rSquared: 0, enoughData: false };
  if (n < 2) return none;
  // Fit in days from the first point, for numerical conditioning.
  const t0 = (recent[0] as { t: number }).t;
  const xs = recent.map((p) => (p.t - t0) / MS_PER_DAY);
  const ys = recent.map((p) => p.v);
  const meanX = xs.reduce((s, x) => s + x, 0) / n;
  const meanY = ys.reduce((s, y) => s + y, 0) / n;
  let sxx = 0;
  let sxy = 0;
  let syy = 0;
  for (let k = 0; k < n; k += 1) {
    const dx = (xs[k] as number) - meanX;
    const dy = (ys[k] as number) - meanY;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  if (sxx === 0) return none; // all readings at one instant: no time trend
  const slopePerDay = sxy / sxx;
  const intercept = meanY - slopePerDay * meanX;
  const residual = ys.reduce((s, y, k) => s + (y - (intercept + slopePerDay * (xs[k] as number))) ** 2, 0);
  const rSquared = syy === 0 ? 1 : Math.max(0, 1 - residual / syy);
  const enoughData = n >= TREND_MIN_POINTS;
  const towardLimit = direction === 'rising' ? slopePerDay > 0 : slopePerDay < 0;
  if (!enoughData || !towardLimit || rSquared < TREND_MIN_R_SQUARED)
    return { slopePerDay, reachesAt: null, rSquared, enoughData };
  const crossingDays = (limit - intercept) / slopePerDay;
  const crossingMs = t0 + crossingDays * MS_PER_DAY;
  // Beyond the range of a Date the line never meets the limit in any useful time.
  const reachesAt =
    Number.isFinite(crossingMs) && Math.abs(crossingMs) < 8.64e15 ? new Date(crossingMs).toISOString() : null;
  return { slopePerDay, reachesAt, rSquared, enoughData };
}
