/**
 * The supervisor's findings board: every out-of-limit finding of every finished round the tablet holds (its own and
 * those pulled from the site server), with the latest review of each, filtered and ordered. Pure apart from
 * `loadBoard`, which reads the store.
 *
 * States follow the latest review of a finding: none → open; "acknowledged" or "monitor" → acknowledged (someone
 * owns it and it stays in view); "actionRaised" or "falseAlarm" → closed (handed to a repair, or not a fault).
 */
import type { Finding, Review, Round, Severity } from '../../schema';
import type { Store } from '../../store';

export type BoardState = 'open' | 'acknowledged' | 'closed';
export type Disposition = Review['disposition'];

export const DISPOSITIONS: ReadonlyArray<{ id: Disposition; label: string; state: BoardState }> = [
  { id: 'acknowledged', label: 'Acknowledged', state: 'acknowledged' },
  { id: 'monitor', label: 'Keep watching', state: 'acknowledged' },
  { id: 'actionRaised', label: 'Repair raised (close)', state: 'closed' },
  { id: 'falseAlarm', label: 'Not a fault (close)', state: 'closed' },
];

const SEVERITY_RANK: Record<Severity, number> = { ok: 0, watch: 1, alarm: 2, trip: 3 };

export interface BoardItem {
  finding: Finding;
  round: Round;
  /** Every review of this finding, oldest first. */
  reviews: Review[];
  latest: Review | null;
  state: BoardState;
}

export interface BoardFilter {
  machineId?: string;
  stageId?: string;
  /** Least severity shown (watch when not given: "ok" findings are never on the board). */
  minSeverity?: 'watch' | 'alarm' | 'trip';
  states?: readonly BoardState[];
  /** Round start from (inclusive) and to (exclusive), ISO times. */
  from?: string;
  to?: string;
}

export function stateOf(latest: Review | null): BoardState {
  if (!latest) return 'open';
  return DISPOSITIONS.find((d) => d.id === latest.disposition)?.state ?? 'open';
}

/** Joins findings to their rounds and reviews; drops "ok" findings; most severe first, then the newest round. */
export function boardItems(
  rounds: readonly Round[],
  findingsByRound: ReadonlyMap<string, readonly Finding[]>,
  reviews: readonly Review[],
): BoardItem[] {
  const reviewsByKey = new Map<string, Review[]>();
  for (const review of reviews) {
    const list = reviewsByKey.get(review.findingKey);
    if (list) list.push(review);
    else reviewsByKey.set(review.findingKey, [review]);
  }
  const items: BoardItem[] = [];
  for (const round of rounds) {
    for (const finding of findingsByRound.get(round.id) ?? []) {
      if (finding.severity === 'ok') continue;
      const own = (reviewsByKey.get(finding.key) ?? []).sort(
        (a, b) => Date.parse(a.at) - Date.parse(b.at) || a.id.localeCompare(b.id),
      );
      const latest = own[own.length - 1] ?? null;
      items.push({ finding, round, reviews: own, latest, state: stateOf(latest) });
    }
  }
  return items.sort(
    (a, b) =>
      SEVERITY_RANK[b.finding.severity] - SEVERITY_RANK[a.finding.severity] ||
      Date.parse(b.round.startedAt) - Date.parse(a.round.startedAt) ||
      a.finding.key.localeCompare(b.finding.key),
  );
}

/** The items a filter lets through, in the same order. A time that is not a date is an error the screen shows. */
export function filterBoard(items: readonly BoardItem[], filter: BoardFilter): BoardItem[] {
  const time = (name: string, value: string | undefined) => {
    if (value === undefined || value === '') return undefined;
    const ms = Date.parse(value);
    if (Number.isNaN(ms)) throw new Error(`The ${name} date "${value}" is not a date; pick one from the calendar.`);
    return ms;
  };
  const from = time('from', filter.from);
  const to = time('to', filter.to);
  if (from !== undefined && to !== undefined && from >= to) {
    throw new Error('The "from" date is not before the "to" date; swap them or widen the range.');
  }
  const least = SEVERITY_RANK[filter.minSeverity ?? 'watch'];
  return items.filter((item) => {
    const started = Date.parse(item.round.startedAt);
    return (
      SEVERITY_RANK[item.finding.severity] >= least &&
      (!filter.machineId || item.finding.subject.machineId === filter.machineId) &&
      (!filter.stageId || item.finding.subject.stageId === filter.stageId) &&
      (!filter.states || filter.states.length === 0 || filter.states.includes(item.state)) &&
      (from === undefined || started >= from) &&
      (to === undefined || started < to)
    );
  });
}

/** How many items of each severity and state, for the board's header. */
export function boardCounts(items: readonly BoardItem[]): Record<BoardState, number> & Record<Severity, number> {
  const counts = { open: 0, acknowledged: 0, closed: 0, ok: 0, watch: 0, alarm: 0, trip: 0 };
  for (const item of items) {
    counts[item.state] += 1;
    counts[item.finding.severity] += 1;
  }
  return counts;
}

/** Reads every finished round, its findings and every review from the store. */
export async function loadBoard(store: Store): Promise<BoardItem[]> {
  const [rounds, reviews] = await Promise.all([store.listRounds({ state: 'finished' }), store.listRecords('review')]);
  const findings = await Promise.all(rounds.map((round) => store.findingsOf(round.id)));
  const byRound = new Map(rounds.map((round, index) => [round.id, findings[index] ?? []]));
  return boardItems(rounds, byRound, reviews);
}

/** A new review of a finding; the previous latest review, if any, is the one it supersedes. */
export function makeReview(
  item: BoardItem,
  input: { disposition: Disposition; comment: string; by: Review['by']; at: string; id: string },
): Review {
  const comment = input.comment.trim();
  if (comment === '') throw new Error('Write a short comment: what was decided and why.');
  return {
    id: input.id,
    findingKey: item.finding.key,
    roundId: item.round.id,
    by: input.by,
    disposition: input.disposition,
    comment,
    at: input.at,
    ...(item.latest ? { supersedes: item.latest.id } : {}),
  };
}
