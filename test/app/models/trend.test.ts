import { describe, expect, it } from 'vitest';
import { bearingPoints, coverPoints, multiTrend, pointTrend, TrendError } from '../../../src/app/models/trend';
import { demoConfig } from '../../../src/demo';
import type { Reading, SiteConfig } from '../../../src/schema';

const DAY_MS = 86_400_000;
const START = Date.parse('2027-01-01T06:00:00Z');
// source: SI Brochure (BIPM, 9th ed. 2019) §2.3.1 and NIST SP 811 §4.2.1.1: t/°C = T/K − 273.15
const ZERO_C = 273.15;

/** One reading a day at 06:00 UTC from 1 January 2027, values given in °C (or as-is for percent points). */
function daily(pointId: string, values: Array<number | null>, unit: string | null = 'degC'): Reading[] {
  return values.map((value, k) => ({
    id: `00000000-0000-4000-8000-${String(k).padStart(12, '0')}`,
    roundId: `00000000-0000-4000-9000-${String(k).padStart(12, '0')}`,
    pointId,
    at: new Date(START + k * DAY_MS).toISOString(),
    entered: value === null ? null : { text: String(value), unit },
    valueSI: value === null ? null : unit === 'degC' ? value + ZERO_C : value,
    ...(value === null ? { skipped: { reason: 'guard off' } } : {}),
  }));
}

/** 20 daily values rising exactly 0.5 K a day and ending at 80 °C (hand-worked: 80 − 0.5 × 19 = 70.5 °C first). */
const rising = Array.from({ length: 20 }, (_, k) => 80 - 0.5 * (19 - k));
const LAST = new Date(START + 19 * DAY_MS).toISOString(); // 2027-01-20T06:00:00Z

/** The demo site with main bearing 1 of K-101 given only an alarm (93 °C) and a trip (104 °C) limit. */
function alarmOnlyConfig(): SiteConfig {
  const config = structuredClone(demoConfig());
  for (const route of config.routes)
    for (const point of route.points)
      if (point.id === 'K-101-MB1-T') point.limits = { highAlarm: 93 + ZERO_C, highTrip: 104 + ZERO_C };
  return config;
}

describe('pointTrend: projection to the nearest limit', () => {
  it('should reach the 93 °C alarm in 26 days when rising 0.5 K a day from 80 °C', () => {
    const trend = pointTrend(alarmOnlyConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising), LAST);
    // hand-worked: (93 − 80) / 0.5 = 26 days after 20 January 2027 06:00 UTC = 15 February 2027
    expect(trend.projection?.limitLevel).toBe('alarm');
    expect(trend.projection?.side).toBe('high');
    const days = (Date.parse(trend.projection?.reachesAt ?? '') - Date.parse(LAST)) / DAY_MS;
    expect(days).toBeCloseTo(26, 6);
    expect(trend.projection?.words).toBe(
      'At this rate it reaches the alarm limit 93 °C about 15 February 2027 (in 26 days).',
    );
    // The line starts at the last reading on the fitted line (exact data: 80 °C) and ends on the limit.
    const line = trend.projection?.line;
    expect(line?.[0][0]).toBe(Date.parse(LAST) / 1000);
    expect(line?.[0][1]).toBeCloseTo(80, 6);
    expect(line?.[1][0]).toBeCloseTo(Date.parse('2027-02-15T06:00:00Z') / 1000, 0);
    expect(line?.[1][1]).toBeCloseTo(93, 9);
  });

  it('should head for the watch limit first when one lies between the value and the alarm', () => {
    // demo limits: watch 85 °C, alarm 93 °C; hand-worked: (85 − 80) / 0.5 = 10 days → 30 January 2027
    const trend = pointTrend(demoConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising), LAST);
    expect(trend.projection?.limitLevel).toBe('watch');
    expect(trend.projection?.words).toBe(
      'At this rate it reaches the watch limit 85 °C about 30 January 2027 (in 10 days).',
    );
  });

  it('should count the days from now, not from the last reading', () => {
    // hand-worked: the crossing stays 15 February 2027; now is 5 days later than the last reading → 21 days
    const now = new Date(Date.parse(LAST) + 5 * DAY_MS).toISOString();
    const trend = pointTrend(alarmOnlyConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising), now);
    expect(trend.projection?.words).toMatch(/about 15 February 2027 \(in 21 days\)\.$/);
  });

  it('should project a falling level to its low watch limit', () => {
    // demo oil level limits: low alarm 35 %, low watch 45 %, high watch 85 %.
    // hand-worked: falling exactly 1 % a day to 55 %: (55 − 45) / 1 = 10 days → 30 January 2027
    const level = Array.from({ length: 20 }, (_, k) => 55 + (19 - k));
    const trend = pointTrend(demoConfig(), 'K-101-LO-LVL', daily('K-101-LO-LVL', level, null), LAST);
    expect(trend.unit).toBe('%');
    expect(trend.projection?.side).toBe('low');
    expect(trend.projection?.limitLevel).toBe('watch');
    expect(trend.projection?.words).toBe(
      'At this rate it reaches the watch limit 45 % about 30 January 2027 (in 10 days).',
    );
  });

  it('should give no projection when the readings are flat', () => {
    const flat = Array.from({ length: 20 }, () => 80);
    const trend = pointTrend(alarmOnlyConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', flat), LAST);
    expect(trend.projection).toBeNull();
    expect(trend.summary).toMatch(/, steady\.$/);
  });

  it('should give no projection when the readings fall away from the only (high) limits', () => {
    const falling = Array.from({ length: 20 }, (_, k) => 80 + 0.5 * (19 - k));
    const trend = pointTrend(alarmOnlyConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', falling), LAST);
    expect(trend.projection).toBeNull();
    expect(trend.summary).toMatch(/falling about 0\.5 K a day\.$/);
  });

  it('should give no projection from fewer readings than the round checks need (10)', () => {
    const trend = pointTrend(alarmOnlyConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising.slice(-9)), LAST);
    expect(trend.projection).toBeNull();
  });
});

describe('pointTrend: units', () => {
  it('should show the limits in the unit the point is read in (K → °C)', () => {
    const trend = pointTrend(demoConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising), LAST);
    expect(trend.unit).toBe('°C');
    // demo limits 358.15 / 366.15 / 377.15 K; source: SI Brochure §2.3.1 (t/°C = T/K − 273.15) → 85 / 93 / 104 °C
    expect(trend.limits.map((l) => [l.level, l.side])).toEqual([
      ['watch', 'high'],
      ['alarm', 'high'],
      ['trip', 'high'],
    ]);
    expect(trend.limits[0]?.value).toBeCloseTo(85, 9);
    expect(trend.limits[1]?.value).toBeCloseTo(93, 9);
    expect(trend.limits[2]?.value).toBeCloseTo(104, 9);
    expect(trend.values[0]).toBeCloseTo(70.5, 9);
    expect(trend.values[19]).toBeCloseTo(80, 9);
  });

  it('should show a °F point in °F', () => {
    // source: NIST SP 811 appendix B.8: t/°F = 1.8 (T/K) − 459.67; 366.15 K → 199.4 °F (hand-worked: 93 × 1.8 + 32)
    const trend = pointTrend(demoConfig(), 'K-102-MB1-T', [], LAST);
    expect(trend.unit).toBe('°F');
    expect(trend.limits.find((l) => l.level === 'alarm')?.value).toBeCloseTo(199.4, 9);
  });

  it('should keep times in seconds, ascending, and skipped readings as gaps', () => {
    const readings = daily('K-101-MB1-T', [70, null, 72]).reverse();
    const trend = pointTrend(demoConfig(), 'K-101-MB1-T', readings, LAST);
    expect(trend.times).toEqual([START / 1000, START / 1000 + 86_400, START / 1000 + 2 * 86_400]);
    expect(trend.values[1]).toBeNull();
    expect(trend.values[2]).toBeCloseTo(72, 9);
  });
});

describe('pointTrend: summary sentence', () => {
  it('should name the count, dates, range, last value and trend', () => {
    const trend = pointTrend(demoConfig(), 'K-101-MB1-T', daily('K-101-MB1-T', rising), LAST);
    // hand-worked from the 20 readings above
    expect(trend.summary).toBe(
      'Main bearing 1 temperature: 20 readings from 1 January 2027 to 20 January 2027, between 70.5 °C and 80 °C; last 80 °C on 20 January 2027, rising about 0.5 K a day.',
    );
  });

  it('should say when there are no readings yet', () => {
    const trend = pointTrend(demoConfig(), 'K-101-MB1-T', [], LAST);
    expect(trend.summary).toBe('Main bearing 1 temperature: no readings on this tablet yet.');
    expect(trend.projection).toBeNull();
  });
});

describe('pointTrend: bad input', () => {
  it('should name a check point that does not exist', () => {
    expect(() => pointTrend(demoConfig(), 'K-999-NOPE', [], LAST)).toThrow(TrendError);
    expect(() => pointTrend(demoConfig(), 'K-999-NOPE', [], LAST)).toThrow(/No check point "K-999-NOPE"/);
  });

  it('should refuse a yes/no point, which has no numbers', () => {
    expect(() => pointTrend(demoConfig(), 'K-101-PACK', [], LAST)).toThrow(/has no numbers to chart/);
  });
});

describe('multiTrend', () => {
  it('should put the eight valve covers of one cylinder on one chart in one unit', () => {
    const config = demoConfig();
    // common practice: a double-acting cylinder with two suction and two discharge valves per end has eight covers
    const covers = coverPoints(config, 'K-101', 'C1');
    expect(covers).toHaveLength(8);
    const readings = covers.flatMap((p, k) => daily(p.id, [40 + k, 41 + k]));
    const multi = multiTrend(
      config,
      'K-101 C1 valve covers',
      covers.map((p) => p.id),
      readings,
    );
    expect(multi.unit).toBe('°C');
    expect(multi.series).toHaveLength(8);
    expect(multi.series[7]?.values[1]).toBeCloseTo(48, 9);
    expect(multi.summary.split('. ').length).toBe(8);
  });

  it('should chart the bearings with the oil supply temperature last', () => {
    const points = bearingPoints(demoConfig(), 'K-101');
    expect(points.at(-1)?.role).toBe('oilSupplyTemperature');
    expect(points.slice(0, -1).every((p) => p.kind === 'bearingTemperature')).toBe(true);
  });
});
