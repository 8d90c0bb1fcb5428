/** Rounds, their readings (autosaved while the round is a draft) and the findings stored when it is finished. */
import {
  ConfigId,
  Envelope,
  envelopeFor,
  Finding,
  type FinishedRound,
  Id,
  IsoTime,
  parseEnvelope,
  Reading,
  RecordError,
  Round,
  type TypedEnvelope,
} from '../schema';
import { sameContent } from './canonical';
import { StoreError } from './errors';
import { enqueue } from './outbox';
import { type Ctx, read, write } from './tx';
import { invalid, parse } from './validate';

export interface EnvelopeMeta {
  /** The person's user id. */
  author: string;
  /** This tablet's device id. */
  device: string;
  createdAt: string;
}

export const EnvelopeMetaSchema = Envelope.pick({ author: true, device: true, createdAt: true });

export interface FinishRoundInput {
  roundId: string;
  finishedAt: string;
  findings: Finding[];
  meta: EnvelopeMeta;
}

const byTime = (a: { at: string; id: string }, b: { at: string; id: string }) =>
  Date.parse(a.at) - Date.parse(b.at) || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0);

/** Readings in the order they were taken (time, then id). */
export function sortReadings(readings: Reading[]): Reading[] {
  return [...readings].sort(byTime);
}

export function sortFindings(findings: Finding[]): Finding[] {
  return [...findings].sort((a, b) => (a.key < b.key ? -1 : a.key > b.key ? 1 : 0));
}

export async function startRound(ctx: Ctx, input: Round): Promise<void> {
  const round = parse(Round, input, 'round');
  if (round.state !== 'draft') {
    throw invalid('The round is not valid: round.state: a round starts as a draft (state "draft", finishedAt null)');
  }
  await write(
    ctx,
    ['rounds'],
    async (tx) => {
      const rounds = tx.objectStore('rounds');
      const existing = await rounds.get(round.id);
      if (existing) {
        if (sameContent(existing, round)) return false;
        throw new StoreError(
          existing.state === 'finished' ? 'E_IMMUTABLE' : 'E_CONFLICT',
          `Round ${round.id} already exists on this tablet with different content (${existing.state}); start a new round with a new id.`,
        );
      }
      await rounds.add(round);
      return true;
    },
    { userData: (wrote) => wrote },
  );
}

export async function saveReading(ctx: Ctx, input: Reading): Promise<void> {
  const reading = parse(Reading, input, 'reading');
  await write(
    ctx,
    ['rounds', 'readings'],
    async (tx) => {
      const round = await tx.objectStore('rounds').get(reading.roundId);
      if (!round) {
        throw new StoreError(
          'E_NOT_FOUND',
          `reading.roundId: there is no round ${reading.roundId} on this tablet; start the round first.`,
        );
      }
      if (round.state !== 'draft') {
        throw new StoreError(
          'E_IMMUTABLE',
          `Round ${round.id} is finished, so its readings can no longer change. Add a note to the round instead.`,
        );
      }
      const readings = tx.objectStore('readings');
      const existing = await readings.get(reading.id);
      if (existing && existing.roundId !== reading.roundId) {
        throw new StoreError(
          'E_CONFLICT',
          `reading.id: reading ${reading.id} belongs to round ${existing.roundId}, not ${reading.roundId}.`,
        );
      }
      await readings.put(reading);
      return true;
    },
    { userData: () => true },
  );
}

export async function getRound(ctx: Ctx, id: string): Promise<Round | undefined> {
  const roundId = parse(Id, id, 'round id', 'id');
  return read(ctx, ['rounds'], (tx) => tx.objectStore('rounds').get(roundId));
}

export interface RoundFilter {
  state?: 'draft' | 'finished';
  routeId?: string;
}

export async function listRounds(ctx: Ctx, filter: RoundFilter = {}): Promise<Round[]> {
  const state = filter.state === undefined ? undefined : parse(Round.shape.state, filter.state, 'filter', 'state');
  const routeId = filter.routeId === undefined ? undefined : parse(ConfigId, filter.routeId, 'filter', 'routeId');
  const rounds = await read(ctx, ['rounds'], (tx) => {
    const store = tx.objectStore('rounds');
    return state === undefined ? store.getAll() : store.index('byState').getAll(state);
  });
  return rounds
    .filter((round) => routeId === undefined || round.routeId === routeId)
    .sort((a, b) => Date.parse(b.startedAt) - Date.parse(a.startedAt) || (a.id < b.id ? 1 : a.id > b.id ? -1 : 0));
}

export async function readingsOf(ctx: Ctx, id: string): Promise<Reading[]> {
  const roundId = parse(Id, id, 'round id', 'roundId');
  return sortReadings(
    await read(ctx, ['readings'], (tx) => tx.objectStore('readings').index('byRound').getAll(roundId)),
  );
}

export async function findingsOf(ctx: Ctx, id: string): Promise<Finding[]> {
  const roundId = parse(Id, id, 'round id', 'roundId');
  return sortFindings(
    await read(ctx, ['findings'], (tx) => tx.objectStore('findings').index('byRound').getAll(roundId)),
  );
}

function validateFinish(input: FinishRoundInput): FinishRoundInput {
  if (typeof input !== 'object' || input === null) throw invalid('The round cannot be finished: the input is missing');
  const roundId = parse(Id, input.roundId, 'round to finish', 'roundId');
  const finishedAt = parse(IsoTime, input.finishedAt, 'finish time', 'finishedAt');
  const findings = parse(Finding.array().max(5000), input.findings, 'list of findings', 'findings');
  const meta = parse(EnvelopeMetaSchema, input.meta, 'record information', 'meta');
  const keys = new Set<string>();
  findings.forEach((finding, index) => {
    if (finding.roundId !== roundId) {
      throw invalid(
        `The findings are not valid: findings.${index}.roundId: belongs to round ${finding.roundId}, not ${roundId}`,
      );
    }
    if (keys.has(finding.key))
      throw invalid(`The findings are not valid: findings.${index}.key: ${finding.key} appears twice`);
    keys.add(finding.key);
  });
  return { roundId, finishedAt, findings, meta };
}

const MAX_FINISH_ATTEMPTS = 3;

/**
 * Marks the round finished, stores its findings and queues it for the server, all in one transaction. The round is
 * read and validated first (outside the transaction); the write re-reads it and starts over if a reading changed
 * in between, so the queued envelope is exactly what is stored.
 */
export async function finishRound(ctx: Ctx, raw: FinishRoundInput): Promise<'finished' | 'unchanged'> {
  const input = validateFinish(raw);
  for (let attempt = 1; attempt <= MAX_FINISH_ATTEMPTS; attempt += 1) {
    const snapshot = await read(ctx, ['rounds', 'readings', 'findings'], async (tx) => ({
      round: await tx.objectStore('rounds').get(input.roundId),
      readings: sortReadings(await tx.objectStore('readings').index('byRound').getAll(input.roundId)),
      findings: sortFindings(await tx.objectStore('findings').index('byRound').getAll(input.roundId)),
    }));
    if (!snapshot.round)
      throw new StoreError('E_NOT_FOUND', `roundId: there is no round ${input.roundId} on this tablet.`);
    if (snapshot.round.state === 'finished') {
      // A retry of a finish whose result was not seen (the tab closed after the commit) is harmless.
      if (
        snapshot.round.finishedAt === input.finishedAt &&
        sameContent(snapshot.findings, sortFindings(input.findings))
      ) {
        return 'unchanged';
      }
      throw new StoreError(
        'E_IMMUTABLE',
        `Round ${input.roundId} is already finished; a finished round never changes.`,
      );
    }
    const draft = snapshot.round;
    const body: FinishedRound = {
      round: { ...draft, state: 'finished', finishedAt: input.finishedAt },
      readings: snapshot.readings,
      findings: input.findings,
    };
    let envelope: TypedEnvelope<'round'>;
    try {
      envelope = parseEnvelope(envelopeFor('round', body, input.meta)) as TypedEnvelope<'round'>;
    } catch (error) {
      if (error instanceof RecordError) {
        throw invalid(`The round cannot be finished: ${error.issues.replaceAll('body.', '')}`);
      }
      throw error;
    }
    const outcome = await write(
      ctx,
      ['rounds', 'readings', 'findings', 'outbox'],
      async (tx) => {
        const rounds = tx.objectStore('rounds');
        const current = await rounds.get(input.roundId);
        const readings = sortReadings(await tx.objectStore('readings').index('byRound').getAll(input.roundId));
        if (!sameContent(current, draft) || !sameContent(readings, snapshot.readings)) return 'changed' as const;
        const findings = tx.objectStore('findings');
        for (const finding of input.findings) {
          const clash = await findings.get(finding.key);
          if (clash) {
            throw new StoreError(
              'E_CONFLICT',
              `findings: a finding with key ${finding.key} is already stored for round ${clash.roundId}.`,
            );
          }
          await findings.add(finding);
        }
        await rounds.put(envelope.body.round);
        await enqueue(tx, envelope);
        return 'finished' as const;
      },
      { userData: (result) => result === 'finished' },
    );
    if (outcome === 'finished') return 'finished';
  }
  throw new StoreError(
    'E_CONFLICT',
    `Round ${input.roundId} kept changing while it was being finished (another tab is editing it); try again.`,
  );
}

export interface HistoryOptions {
  /** Only readings taken strictly before this time. */
  before?: string;
  /** At most this many (default 100, at most 10,000). */
  limit?: number;
}

/**
 * Readings of finished rounds for one check point, newest first. Times may carry different zone offsets, so
 * they are ordered by instant rather than by the index's string order.
 */
export async function readingsForPoint(ctx: Ctx, point: string, options: HistoryOptions = {}): Promise<Reading[]> {
  const pointId = parse(ConfigId, point, 'check point id', 'pointId');
  const before =
    options.before === undefined ? undefined : Date.parse(parse(IsoTime, options.before, 'history query', 'before'));
  const limit = options.limit ?? 100;
  if (!Number.isInteger(limit) || limit < 1 || limit > 10_000) {
    throw invalid(`The history query is not valid: limit: must be a whole number from 1 to 10000, not ${limit}`);
  }
  const found = await read(ctx, ['readings', 'rounds'], async (tx) => {
    const readings = await tx
      .objectStore('readings')
      .index('byPointAt')
      .getAll(IDBKeyRange.bound([pointId], [pointId, []]));
    const rounds = tx.objectStore('rounds');
    const finished = new Map<string, boolean>();
    for (const reading of readings) {
      if (!finished.has(reading.roundId)) {
        finished.set(reading.roundId, (await rounds.get(reading.roundId))?.state === 'finished');
      }
    }
    return readings.filter((reading) => finished.get(reading.roundId));
  });
  return found
    .filter((reading) => before === undefined || Date.parse(reading.at) < before)
    .sort((a, b) => byTime(b, a))
    .slice(0, limit);
}
