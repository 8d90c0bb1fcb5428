/**
 * Valve position history from the demo's invented valve changes. The expected figures are worked out by hand from
 * the demo story (src/demo/history.ts): K-101 C1-HE-D2 fails on day 8 at 11:00, day 20 at 11:00 and day 70 at 10:00
 * (UTC). MTBC as the mean of completed intervals and the censored mean counting the valve in service are the usual
 * reliability definitions (common practice).
 */
import { describe, expect, it } from 'vitest';
import { positionHistories, rankPositions, siteValveLife } from '../../../src/app/models/valve-history';
import { demoHistory } from '../../../src/demo';

const END = '2026-11-30T00:00:00.000Z';
const DAYS = 90;
const HOUR_MS = 3_600_000;
const history = demoHistory({ end: END, days: DAYS });
const machine = (id: string) => {
  const found = history.config.machines.find((m) => m.id === id);
  if (!found) throw new Error(`demo has no ${id}`);
  return found;
};
// Day d of the story starts (DAYS - d) days before END.
const dayAt = (day: number, hour: number) => Date.parse(END) - (DAYS - day) * 24 * HOUR_MS + hour * HOUR_MS;

describe('valve position history from the demo', () => {
  const now = new Date(dayAt(DAYS, 0)).toISOString();
  const k101 = positionHistories(machine('K-101'), history.valveChanges, now);
  const d2 = k101.find((h) => h.positionId === 'C1-HE-D2');

  it('lists every change at the position in date order with its interval', () => {
    expect(d2?.changes.map((c) => c.at)).toEqual([
      new Date(dayAt(8, 11)).toISOString(),
      new Date(dayAt(20, 11)).toISOString(),
      new Date(dayAt(70, 10)).toISOString(),
    ]);
    // 12 days = 288 h; 50 days less 1 h = 1199 h (hand-worked).
    expect(d2?.changes.map((c) => c.intervalH)).toEqual([null, 288, 1199]);
    expect(d2?.life?.basis).toBe('calendar');
  });

  it('gives the mean between changes, completed and counting the valve now in service', () => {
    expect(d2?.life?.meanTimeBetweenChangesH).toBeCloseTo((288 + 1199) / 2, 9); // 743.5 h
    // Valve in service since day 70 10:00, now day 90 00:00: 19 days 14 h = 470 h.
    expect(d2?.life?.currentRunningH).toBeCloseTo(470, 9);
    expect(d2?.life?.censoredMeanH).toBeCloseTo((288 + 1199 + 470) / 2, 9); // 978.5 h
    expect(d2?.life?.failures).toBe(3);
    expect(d2?.life?.indicative).toBe(false);
  });

  it('counts failures by as-found word, most frequent first', () => {
    expect(d2?.failuresByWord).toEqual([
      { word: 'broken plate', count: 2 },
      { word: 'broken springs', count: 1 },
      { word: 'debris', count: 1 },
      { word: 'flutter marks', count: 1 },
    ]);
  });

  it('ranks positions with changes, the one with failures first', () => {
    expect(rankPositions(k101).map((h) => h.positionId)).toEqual(['C1-HE-D2']);
    const k102 = positionHistories(machine('K-102'), history.valveChanges, now);
    const ranked = rankPositions(k102);
    expect(ranked.map((h) => h.positionId)).toEqual(['C2-CE-S1']);
    // One planned change: no failure and no completed interval yet.
    expect(ranked[0]?.life?.failures).toBe(0);
    expect(ranked[0]?.life?.meanTimeBetweenChangesH).toBeNull();
    expect(ranked[0]?.failuresByWord).toEqual([]);
  });

  it('reports a tablet clock before the last change as a problem instead of throwing', () => {
    const future = positionHistories(machine('K-101'), history.valveChanges, new Date(dayAt(60, 0)).toISOString());
    expect(future.find((h) => h.positionId === 'C1-HE-D2')?.problem).toMatch(/before the last recorded change/);
  });

  it('ranks the whole site: the failing K-101 valve first, then the planned change on K-102', () => {
    const site = siteValveLife(history.config, history.valveChanges, now);
    expect(site.map((h) => `${h.machineId}/${h.positionId}`)).toEqual(['K-101/C1-HE-D2', 'K-102/C2-CE-S1']);
    expect(site[0]?.life?.failures).toBe(3);
    expect(site[1]?.life?.failures).toBe(0);
  });
});
