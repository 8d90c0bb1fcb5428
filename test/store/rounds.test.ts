import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { type Finding, parseEnvelope, type Reading } from '../../src/schema';
import type { Store } from '../../src/store';
import { stableHash } from '../support/stable-hash';
import { fixtureFindings, fixtureReading, fixtureRound } from '../support/store-fixture';
import { freshStore, META, rejection } from './helpers';

async function draftWithReadings(store: Store, round = 0, points = 4): Promise<Reading[]> {
  await store.startRound(fixtureRound(round));
  const readings = Array.from({ length: points }, (_, p) => fixtureReading(round, p));
  for (const reading of readings) await store.saveReading(reading);
  return readings;
}

function finishInput(round: number, findings: Finding[] = fixtureFindings(round)) {
  const finishedAt = fixtureRound(round, 'finished').finishedAt as string;
  return { roundId: fixtureRound(round).id, finishedAt, findings, meta: { ...META, createdAt: finishedAt } };
}

describe('rounds and readings', () => {
  it('should store a draft round and give it back by id and in lists', async () => {
    const store = await freshStore();
    await store.startRound(fixtureRound(0));
    await store.startRound(fixtureRound(1));
    expect(await store.getRound(fixtureRound(0).id)).toEqual(fixtureRound(0));
    expect(await store.getRound(fixtureRound(5).id)).toBeUndefined();
    // Newest start first; rounds 0 and 1 run on routes R-1 and R-2 (store-fixture.ts).
    expect((await store.listRounds()).map((r) => r.id)).toEqual([fixtureRound(1).id, fixtureRound(0).id]);
    expect((await store.listRounds({ routeId: 'R-1' })).map((r) => r.id)).toEqual([fixtureRound(0).id]);
    expect(await store.listRounds({ state: 'finished' })).toEqual([]);
    store.close();
  });

  it('should treat a repeated startRound as a no-op and refuse a different round under the same id', async () => {
    const store = await freshStore();
    await store.startRound(fixtureRound(0));
    await store.startRound(fixtureRound(0));
    const error = await rejection(store.startRound({ ...fixtureRound(0), routeId: 'R-9' }));
    expect(error.code).toBe('E_CONFLICT');
    expect(await store.getRound(fixtureRound(0).id)).toEqual(fixtureRound(0));
    expect(await rejection(store.startRound(fixtureRound(3, 'finished')))).toMatchObject({ code: 'E_INVALID' });
    expect(await store.getRound(fixtureRound(3).id)).toBeUndefined();
    store.close();
  });

  it('should replace a draft reading saved again under the same id (autosave)', async () => {
    const store = await freshStore();
    const [first] = await draftWithReadings(store, 0, 2);
    const corrected: Reading = {
      ...(first as Reading),
      entered: { text: '11.4', unit: 'barg' },
      valueSI: 11.4e5 + 101_325,
    };
    await store.saveReading(corrected);
    const readings = await store.readingsOf(fixtureRound(0).id);
    expect(readings).toHaveLength(2);
    expect(readings[0]).toEqual(corrected);
    store.close();
  });

  it('should refuse an invalid reading, name the field and store nothing', async () => {
    const store = await freshStore();
    await store.startRound(fixtureRound(0));
    const bad = { ...fixtureReading(0, 0), entered: { text: '12', unit: 'bananas' } } as unknown as Reading;
    const error = await rejection(store.saveReading(bad));
    expect(error.code).toBe('E_INVALID');
    expect(error.message).toContain('reading.entered.unit');
    const noRound = await rejection(store.saveReading(fixtureReading(7, 0)));
    expect(noRound.code).toBe('E_NOT_FOUND');
    expect(noRound.message).toContain('reading.roundId');
    expect(await store.readingsOf(fixtureRound(0).id)).toEqual([]);
    store.close();
  });

  it('should finish a round in one step: state, findings and exactly one outbox entry with the whole round', async () => {
    const store = await freshStore();
    const readings = await draftWithReadings(store, 0, 5);
    expect(await store.finishRound(finishInput(0))).toBe('finished');

    const round = await store.getRound(fixtureRound(0).id);
    expect(round).toEqual(fixtureRound(0, 'finished'));
    expect(await store.findingsOf(fixtureRound(0).id)).toEqual(fixtureFindings(0));
    const outbox = await store.outboxPending(10);
    expect(outbox).toHaveLength(1);
    const envelope = parseEnvelope(outbox[0]?.envelope);
    expect(envelope).toMatchObject({ id: fixtureRound(0).id, type: 'round', author: META.author, device: META.device });
    expect(stableHash(envelope.body)).toBe(stableHash({ round, readings, findings: fixtureFindings(0) }));
    store.close();
  });

  it('should keep a finished round and its readings unchanged (E_IMMUTABLE)', async () => {
    const store = await freshStore();
    const readings = await draftWithReadings(store, 0, 3);
    await store.finishRound(finishInput(0));
    const edited = { ...(readings[0] as Reading), note: 'changed afterwards' };
    const error = await rejection(store.saveReading(edited));
    expect(error.code).toBe('E_IMMUTABLE');
    const added = await rejection(store.saveReading(fixtureReading(0, 9)));
    expect(added.code).toBe('E_IMMUTABLE');
    expect(stableHash(await store.readingsOf(fixtureRound(0).id))).toBe(stableHash(readings));
    // Finishing again with the same content is a retry; with other findings it is refused.
    expect(await store.finishRound(finishInput(0))).toBe('unchanged');
    const other = await rejection(store.finishRound(finishInput(0, [])));
    expect(other.code).toBe('E_IMMUTABLE');
    expect(await store.findingsOf(fixtureRound(0).id)).toEqual(fixtureFindings(0));
    expect((await store.outboxCounts()).pending).toBe(1);
    store.close();
  });

  it('should leave nothing behind when finishing fails inside the transaction', async () => {
    const store = await freshStore();
    await draftWithReadings(store, 0, 2);
    await draftWithReadings(store, 1, 2);
    await store.finishRound(finishInput(0));
    // Round 1's second finding reuses a key round 0 already stored: the first finding was written before the clash.
    const [own] = fixtureFindings(1);
    const [taken] = fixtureFindings(0);
    const findings = [own as Finding, { ...(taken as Finding), roundId: fixtureRound(1).id }];
    const error = await rejection(store.finishRound(finishInput(1, findings)));
    expect(error.code).toBe('E_CONFLICT');
    expect((await store.getRound(fixtureRound(1).id))?.state).toBe('draft');
    expect(await store.findingsOf(fixtureRound(1).id)).toEqual([]);
    expect((await store.outboxPending(10)).map((entry) => entry.id)).toEqual([fixtureRound(0).id]);
    await store.saveReading(fixtureReading(1, 5));
    store.close();
  });

  it('should refuse invalid finish input by field and change nothing', async () => {
    const store = await freshStore();
    await draftWithReadings(store, 0, 2);
    const badFinding = { ...(fixtureFindings(0)[0] as Finding), severity: 'dreadful' } as unknown as Finding;
    const finding = await rejection(store.finishRound(finishInput(0, [badFinding])));
    expect(finding.code).toBe('E_INVALID');
    expect(finding.message).toContain('findings.0.severity');
    const early = await rejection(store.finishRound({ ...finishInput(0), finishedAt: '2026-02-01T00:00:00Z' }));
    expect(early.code).toBe('E_INVALID');
    expect(early.message).toContain('round.finishedAt');
    const meta = await rejection(store.finishRound({ ...finishInput(0), meta: { ...META, author: '' } }));
    expect(meta.message).toContain('meta.author');
    expect((await store.getRound(fixtureRound(0).id))?.state).toBe('draft');
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    store.close();
  });

  it('should answer point history from finished rounds only, newest first, with before and limit', async () => {
    const store = await freshStore();
    for (const round of [0, 1, 2]) {
      await draftWithReadings(store, round, 3);
      await store.finishRound(finishInput(round));
    }
    await draftWithReadings(store, 3, 3);
    const point = fixtureReading(0, 1).pointId;
    const history = await store.readingsForPoint(point);
    expect(history).toEqual([fixtureReading(2, 1), fixtureReading(1, 1), fixtureReading(0, 1)]);
    expect(await store.readingsForPoint(point, { before: fixtureReading(2, 1).at })).toEqual([
      fixtureReading(1, 1),
      fixtureReading(0, 1),
    ]);
    expect(await store.readingsForPoint(point, { limit: 1 })).toEqual([fixtureReading(2, 1)]);
    expect(await store.readingsForPoint('PT-999')).toEqual([]);
    expect((await rejection(store.readingsForPoint(point, { limit: 0 }))).code).toBe('E_INVALID');
    expect((await rejection(store.readingsForPoint(point, { before: 'yesterday' }))).message).toContain('before');
    store.close();
  });

  it('should order point history by instant when readings carry different zone offsets', async () => {
    // source: RFC 3339 §4.2: 08:30+02:00 is 06:30Z, so it comes before 07:00Z although its text sorts after it.
    const store = await freshStore();
    const times = ['2026-03-01T07:00:00Z', '2026-03-01T08:30:00+02:00'];
    for (const [index, at] of times.entries()) {
      const round = { ...fixtureRound(index), startedAt: '2026-03-01T05:00:00Z' };
      await store.startRound(round);
      await store.saveReading({ ...fixtureReading(index, 0), at });
      await store.finishRound({ ...finishInput(index, []), finishedAt: '2026-03-01T09:00:00Z' });
    }
    const history = await store.readingsForPoint(fixtureReading(0, 0).pointId);
    expect(history.map((reading) => reading.at)).toEqual(['2026-03-01T07:00:00Z', '2026-03-01T08:30:00+02:00']);
    store.close();
  });
});
