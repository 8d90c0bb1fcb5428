/**
 * The findings board over the demo history. Expected counts are derived from the demo's own finding records (the
 * findings each round carries), not from the board's code; the state rules are the ones stated in
 * src/app/models/findings-board.ts (a product decision, not a published fact).
 */
import { describe, expect, it } from 'vitest';
import { boardCounts, boardItems, filterBoard, makeReview, stateOf } from '../../../src/app/models/findings-board';
import { DEMO_PEOPLE, demoHistory } from '../../../src/demo';
import type { Finding, Review } from '../../../src/schema';

const END = '2026-11-30T00:00:00.000Z';
const history = demoHistory({ end: END });
const rounds = history.rounds.map((r) => r.round);
const byRound = new Map(history.rounds.map((r) => [r.round.id, r.findings]));
const allFindings: Finding[] = history.rounds.flatMap((r) => r.findings);
const outOfLimit = allFindings.filter((f) => f.severity !== 'ok');
const RANK = { ok: 0, watch: 1, alarm: 2, trip: 3 } as const;

const review = (finding: Finding, disposition: Review['disposition'], at: string, id: string): Review => ({
  id,
  findingKey: finding.key,
  roundId: finding.roundId,
  by: DEMO_PEOPLE.supervisor,
  disposition,
  comment: 'Checked on the next round.',
  at,
});

describe('findings board', () => {
  it('lists every out-of-limit finding of the demo, none of the "ok" ones', () => {
    const items = boardItems(rounds, byRound, []);
    expect(items).toHaveLength(outOfLimit.length);
    expect(outOfLimit.length).toBeGreaterThan(0);
    expect(items.every((item) => item.finding.severity !== 'ok' && item.state === 'open')).toBe(true);
    const counts = boardCounts(items);
    expect(counts.alarm).toBe(outOfLimit.filter((f) => f.severity === 'alarm').length);
    expect(counts.watch).toBe(outOfLimit.filter((f) => f.severity === 'watch').length);
  });

  it('puts the most severe first, then the newest round', () => {
    const items = boardItems(rounds, byRound, []);
    for (let k = 1; k < items.length; k += 1) {
      const a = items[k - 1];
      const b = items[k];
      if (!a || !b) continue;
      const rankA = RANK[a.finding.severity];
      const rankB = RANK[b.finding.severity];
      expect(rankA).toBeGreaterThanOrEqual(rankB);
      if (rankA === rankB) expect(Date.parse(a.round.startedAt)).toBeGreaterThanOrEqual(Date.parse(b.round.startedAt));
    }
  });

  it('follows the latest review of each finding', () => {
    const [first, second, third] = outOfLimit;
    if (!first || !second || !third) throw new Error('the demo needs three out-of-limit findings');
    const reviews = [
      review(first, 'acknowledged', '2026-11-29T08:00:00.000Z', '00000000-0000-4000-8000-000000000001'),
      review(first, 'falseAlarm', '2026-11-29T09:00:00.000Z', '00000000-0000-4000-8000-000000000002'),
      review(second, 'monitor', '2026-11-29T08:00:00.000Z', '00000000-0000-4000-8000-000000000003'),
      review(third, 'actionRaised', '2026-11-29T08:00:00.000Z', '00000000-0000-4000-8000-000000000004'),
    ];
    // Given out of order: the later review still wins.
    const items = boardItems(rounds, byRound, [...reviews].reverse());
    const itemOf = (f: Finding) => items.find((item) => item.finding.key === f.key);
    expect(itemOf(first)?.state).toBe('closed');
    expect(itemOf(first)?.reviews.map((r) => r.disposition)).toEqual(['acknowledged', 'falseAlarm']);
    expect(itemOf(second)?.state).toBe('acknowledged');
    expect(itemOf(third)?.state).toBe('closed');
    expect(stateOf(null)).toBe('open');

    const open = filterBoard(items, { states: ['open'] });
    expect(open).toHaveLength(outOfLimit.length - 3);
    expect(
      filterBoard(items, { states: ['closed'] })
        .map((i) => i.finding.key)
        .sort(),
    ).toEqual([first.key, third.key].sort());
  });

  it('filters by machine, stage, severity and round time', () => {
    const items = boardItems(rounds, byRound, []);
    const k101 = outOfLimit.filter((f) => f.subject.machineId === 'K-101');
    expect(filterBoard(items, { machineId: 'K-101' })).toHaveLength(k101.length);
    const stageId = k101.find((f) => f.subject.stageId)?.subject.stageId;
    if (stageId) {
      expect(filterBoard(items, { machineId: 'K-101', stageId })).toHaveLength(
        k101.filter((f) => f.subject.stageId === stageId).length,
      );
    }
    expect(filterBoard(items, { minSeverity: 'alarm' })).toHaveLength(
      outOfLimit.filter((f) => f.severity === 'alarm' || f.severity === 'trip').length,
    );
    const from = '2026-11-20T00:00:00.000Z';
    const recentRounds = new Set(rounds.filter((r) => Date.parse(r.startedAt) >= Date.parse(from)).map((r) => r.id));
    expect(filterBoard(items, { from })).toHaveLength(outOfLimit.filter((f) => recentRounds.has(f.roundId)).length);
  });

  it('refuses a range that is not one, saying how to fix it', () => {
    const items = boardItems(rounds, byRound, []);
    expect(() => filterBoard(items, { from: 'yesterday' })).toThrow(/is not a date; pick one from the calendar/);
    expect(() => filterBoard(items, { from: '2026-11-20', to: '2026-11-10' })).toThrow(/swap them/);
  });

  it('makes a review that supersedes the latest one and needs a comment', () => {
    const [first] = outOfLimit;
    if (!first) throw new Error('the demo needs a finding');
    const earlier = review(first, 'monitor', '2026-11-29T08:00:00.000Z', '00000000-0000-4000-8000-000000000005');
    const item = boardItems(rounds, byRound, [earlier]).find((i) => i.finding.key === first.key);
    if (!item) throw new Error('finding missing from the board');
    const next = makeReview(item, {
      disposition: 'actionRaised',
      comment: '  Bearing to be opened at the next stop.  ',
      by: DEMO_PEOPLE.supervisor,
      at: '2026-11-29T10:00:00.000Z',
      id: '00000000-0000-4000-8000-000000000006',
    });
    expect(next).toMatchObject({
      findingKey: first.key,
      roundId: first.roundId,
      supersedes: earlier.id,
      comment: 'Bearing to be opened at the next stop.',
    });
    expect(() =>
      makeReview(item, {
        disposition: 'acknowledged',
        comment: '  ',
        by: DEMO_PEOPLE.supervisor,
        at: next.at,
        id: next.id,
      }),
    ).toThrow(/Write a short comment/);
  });
});
