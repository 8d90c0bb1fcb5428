import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { demoConfig, demoHistory } from '../../src/demo';
import { seededRandom } from '../../src/demo/random';
import type { TypedEnvelope } from '../../src/schema';
import { type OutboxEntry, openStore, type Store } from '../../src/store';
import { backoffDelayMs, pullAll, pushOutbox, SESSION_KEY, SyncEngine, SyncError, takeBatch } from '../../src/sync';
import { FakeServer, hashOf } from './fake-server';

const config = demoConfig();
const fresh = async (): Promise<Store> => {
  const store = await openStore({ name: `sync-${Math.random().toString(36).slice(2)}` });
  await store.putConfig(config);
  await store.setMeta(SESSION_KEY, {
    token: 't'.repeat(43),
    user: { id: 'mara-oyelaran', name: 'Mara', roles: ['operator'] },
    device: { id: 'tablet', name: 'T' },
    signedInAt: '2026-01-01T00:00:00Z',
  });
  return store;
};

let noteCounter = 0;
async function addNotes(store: Store, count: number, author = 'mara-oyelaran'): Promise<string[]> {
  const ids: string[] = [];
  for (let index = 0; index < count; index += 1) {
    noteCounter += 1;
    const id = crypto.randomUUID();
    ids.push(id);
    await store.saveRecord(
      'note',
      {
        id,
        roundId: '00000000-0000-4000-8000-000000000001',
        by: { id: author, name: 'Mara' },
        at: '2026-03-01T07:00:00Z',
        text: `note ${noteCounter}`,
      },
      { author, device: 'tablet', createdAt: '2026-03-01T07:00:00Z' },
    );
  }
  return ids;
}

describe('takeBatch', () => {
  const entry = (size: number, n: number): OutboxEntry =>
    ({
      id: String(n),
      type: 'note',
      envelope: { text: 'x'.repeat(size) } as unknown as TypedEnvelope,
      state: 'pending',
      attempts: 0,
      enqueuedAt: '',
    }) as OutboxEntry;

  it('should stop at the record budget and at the byte budget, in outbox order', () => {
    const entries = Array.from({ length: 10 }, (_, n) => entry(100, n));
    expect(takeBatch(entries, 4, 1e6).map((e) => e.id)).toEqual(['0', '1', '2', '3']);
    // each entry is 112 bytes of JSON with its separator: two fit in 300 bytes, three do not
    expect(takeBatch(entries, 100, 300).map((e) => e.id)).toEqual(['0', '1']);
  });

  it('should still send one record that is larger than the byte budget on its own', () => {
    expect(takeBatch([entry(5000, 1), entry(10, 2)], 10, 1000).map((e) => e.id)).toEqual(['1']);
  });
});

describe('pushOutbox', () => {
  it('should empty the outbox when the server stores everything, keeping the records on the tablet', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    await addNotes(store, 7);
    const progress = await pushOutbox(store, server.api(), { batchRecords: 3 });
    expect(progress).toMatchObject({ sent: 7, acknowledged: 7, attention: 0, total: 7 });
    expect(server.pushes).toBe(3);
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    expect(await store.listRecords('note')).toHaveLength(7);
  });

  it('should park rejected and conflicting records with the server’s reason and send the rest', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    const [first] = await addNotes(store, 3);
    // The server already holds a different record under the first id.
    const stranger = (await store.outboxPending(1))[0]?.envelope as TypedEnvelope<'note'>;
    server.ingest([{ ...stranger, body: { ...stranger.body, text: 'someone else' } }]);
    await pushOutbox(store, server.api());
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 1 });
    expect(server.conflicts.map((e) => e.id)).toEqual([first]);
  });

  it('should leave every entry pending when the network fails, and send them later', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    await addNotes(store, 4);
    const failing = { ...server.api(), push: async () => Promise.reject(new SyncError('network', 'offline')) };
    await expect(pushOutbox(store, failing)).rejects.toThrow('offline');
    expect(await store.outboxCounts()).toEqual({ pending: 4, attention: 0 });
    await pushOutbox(store, server.api());
    expect(server.records.size).toBe(4);
  });

  it('should send fewer records at a time when the server says the body is too large', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    await addNotes(store, 8);
    const api = server.api();
    let calls = 0;
    const picky = {
      ...api,
      push: async (envelopes: TypedEnvelope[]) => {
        calls += 1;
        if (envelopes.length > 2) throw new SyncError('too-large', 'Body over 2 MB', 413);
        return api.push(envelopes);
      },
    };
    await pushOutbox(store, picky, { batchRecords: 8 });
    expect(server.records.size).toBe(8);
    expect(calls).toBeGreaterThan(4);
  });
});

describe('pullAll', () => {
  it('should take other tablets’ records page by page with the cursor, and not repeat them', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    const history = demoHistory({ days: 3 });
    const { demoEnvelopes } = await import('../../src/demo');
    server.ingest(demoEnvelopes(history));
    const first = await pullAll(store, server.api(), { pageSize: 2 });
    expect(first.added).toBe(server.records.size);
    expect(first.pages).toBe(Math.ceil(server.records.size / 2));
    expect(await store.pullCursor()).toBe(server.records.size);
    expect((await store.listRounds()).length).toBe(6);
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    const again = await pullAll(store, server.api(), { pageSize: 2 });
    expect(again).toMatchObject({ pages: 1, added: 0 });
  });
});

describe('exactly once under faults (reliability T5.1, in-process)', () => {
  it('should end with every record on the server once, identical, and every outbox empty', async () => {
    const random = seededRandom(20_261_201);
    const server = new FakeServer(config);
    const faults = { random, dropRequest: 0.3, dropResponse: 0.2, duplicate: 0.1 };
    const devices = await Promise.all([fresh(), fresh(), fresh()]);
    const sent = new Map<string, string>();
    for (const store of devices) {
      for (const id of await addNotes(store, 40)) {
        const entry = (await store.outboxPending(1000)).find((e) => e.id === id);
        sent.set(id, hashOf(entry?.envelope as TypedEnvelope));
      }
    }
    // Each device keeps trying until its outbox is empty (bounded number of rounds).
    for (let attempt = 0; attempt < 200; attempt += 1) {
      const counts = await Promise.all(devices.map((store) => store.outboxCounts()));
      if (counts.every((c) => c.pending === 0)) break;
      await Promise.all(
        devices.map((store) => pushOutbox(store, server.api({ faults }), { batchRecords: 7 }).catch(() => undefined)),
      );
    }
    for (const store of devices) expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    expect(server.records.size).toBe(sent.size);
    for (const [id, hash] of sent) expect(server.records.get(id)?.hash).toBe(hash);
    expect(server.conflicts).toEqual([]);
  });
});

describe('SyncEngine', () => {
  it('should retry failures that may pass with growing, jittered delays, and stop on a lost sign-in', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    await addNotes(store, 2);
    const scheduled: number[] = [];
    let online = false;
    const api = server.api();
    const flaky = {
      ...api,
      push: (e: TypedEnvelope[]) => (online ? api.push(e) : Promise.reject(new SyncError('network', 'no route'))),
    };
    const engine = new SyncEngine(store, flaky, {
      schedule: (ms) => {
        scheduled.push(ms);
        return () => {};
      },
      random: () => 1,
      now: () => 0,
    });
    await engine.run('start');
    await engine.run('timer');
    expect(engine.status.phase).toBe('waiting');
    // source: exponential back-off, base 2 s doubling (reliability plan T5.3); random = 1 gives the full step
    expect(scheduled).toEqual([backoffDelayMs(1, () => 1), backoffDelayMs(2, () => 1)]);
    expect(scheduled).toEqual([2000, 4000]);
    online = true;
    await engine.run('reachable');
    expect(engine.status).toMatchObject({ phase: 'idle', pending: 0, attention: 0 });
    expect(server.records.size).toBe(2);

    const expired = { ...api, push: () => Promise.reject(new SyncError('unauthorized', 'token revoked', 401)) };
    await addNotes(store, 1);
    const engine2 = new SyncEngine(store, expired, { schedule: () => () => {} });
    await engine2.run('start');
    expect(engine2.status.phase).toBe('signed-out');
    expect(await store.getMeta(SESSION_KEY)).toBeNull();
    expect(await store.outboxCounts()).toEqual({ pending: 1, attention: 0 });
  });

  it('should refuse to sign out while records wait to be sent', async () => {
    const store = await fresh();
    const server = new FakeServer(config);
    await addNotes(store, 1);
    const engine = new SyncEngine(store, server.api());
    await expect(engine.signOut()).rejects.toThrow(/1 records are still on this tablet only/);
    await engine.run('manual');
    await engine.signOut();
    expect(engine.status.phase).toBe('signed-out');
  });

  it('should cap the back-off at five minutes (reliability plan T5.3)', () => {
    expect(backoffDelayMs(30, () => 1)).toBe(300_000);
    expect(backoffDelayMs(30, () => 0)).toBe(150_000);
  });
});
