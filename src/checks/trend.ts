/** Per check point with history: where its trend meets the nearest limit ahead of it. */
import { fitToLimit } from '../calc';
import type { Finding } from '../schema';
import { display, makeFinding, type RoundContext } from './context';

/** A limit reached within this many days by the current trend is worth watching (common practice for rounds). */
export const TREND_HORIZON_DAYS = 14;
/** Readings fitted for a trend: about ten days of morning and night rounds. */
export const TREND_WINDOW = 20;
/** Fewer readings than this make no trend worth reporting. */
export const TREND_MIN_POINTS = 10;

export function trendFindings(ctx: RoundContext): Finding[] {
  const findings: Finding[] = [];
  for (const [pointId, reading] of ctx.readings) {
    const point = ctx.points.get(pointId);
    const past = ctx.history.get(pointId);
    if (!point?.limits || reading.valueSI === null || !past || past.length < 2) continue;
    const now = Date.parse(reading.at);
    const earlier = past.filter((entry) => entry.ms < now).slice(-(TREND_WINDOW - 1));
    const series = [
      ...earlier.map((entry) => ({ t: entry.ms, v: entry.reading.valueSI as number })),
      { t: now, v: reading.valueSI },
    ];
    if (series.length < TREND_MIN_POINTS) continue;
    // The nearest limit ahead in each direction: a value still below its watch limit is heading for that first.
    const value = reading.valueSI;
    const limits = point.limits;
    const highs = [limits.highWatch, limits.highAlarm, limits.highTrip].filter(
      (l): l is number => l !== undefined && l > value,
    );
    const lows = [limits.lowWatch, limits.lowAlarm, limits.lowTrip].filter(
      (l): l is number => l !== undefined && l < value,
    );
    const candidates: Array<{ limit: number; direction: 'rising' | 'falling' }> = [];
    if (highs.length) candidates.push({ limit: Math.min(...highs), direction: 'rising' });
    if (lows.length) candidates.push({ limit: Math.max(...lows), direction: 'falling' });
    for (const candidate of candidates) {
      const trend = fitToLimit(series, candidate.limit, candidate.direction, TREND_WINDOW);
      if (!trend.reachesAt) continue;
      const days = (Date.parse(trend.reachesAt) - Date.parse(reading.at)) / 86_400_000;
      if (days < 0 || days > TREND_HORIZON_DAYS) continue;
      const unit = reading.entered?.unit ?? point.unit;
      const perDay = display(ctx, Math.abs(trend.slopePerDay), unit, true);
      findings.push(
        makeFinding(
          ctx,
          'trend',
          { machineId: point.machineId, pointId },
          'watch',
          `${point.label} is ${candidate.direction} about ${perDay} a day and at this rate reaches ${display(ctx, candidate.limit, unit)} in about ${Math.max(1, Math.round(days))} days (${trend.reachesAt.slice(0, 10)}).`,
          { slopePerDay: trend.slopePerDay, rSquared: trend.rSquared, daysToLimit: days, limitSI: candidate.limit },
          { direction: candidate.direction, window: TREND_WINDOW, points: series.length },
        ),
      );
    }
  }
  return findings;
}
