/**
 * Exactly once under faults (reliability plan T5.1, A13's "set" check), against the real server app: several
 * tablets push thousands of records through a faulty network that drops requests, drops responses after the
 * commit, delivers requests twice and delays them. At the end the server holds every record exactly once with the
 * content the tablet made, every outbox is empty, and a supervisor's tablet pulls them all.
 */
import 'fake-indexeddb/auto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { seededRandom } from '../../src/demo/random';
import type { TypedEnvelope } from '../../src/schema';
import { contentHash } from '../../src/server/records';
import { openStore, type Store } from '../../src/store';
import { createApi, pullAll, pushOutbox, type SyncApi } from '../../src/sync';
import { type ApiFixture, makeApi, PASSCODE, PEOPLE, type PersonKey } from '../server/api-fixtures';

const RECORDS_PER_TABLET = 600;
const SEED = 20_261_201;

let api: ApiFixture;
beforeAll(async () => {
  api = await makeApi();
});
afterAll(() => api?.close());

interface Tablet {
  who: PersonKey;
  store: Store;
  sync: SyncApi;
}

/** A network between tablet and server that misbehaves on purpose (reliability plan T5.1 fault mix). */
function faultyFetch(random: () => number): typeof fetch {
  return (async (input: RequestInfo | URL, init?: RequestInit) => {
    const url = typeof input === 'string' ? input : input.toString();
    const send = () => Promise.resolve(api.app.request(url.startsWith('http') ? url : `http://localhost${url}`, init));
    await new Promise((resolve) => setTimeout(resolve, Math.floor(random() * 3)));
    if (random() < 0.3) throw new TypeError('Failed to fetch (request dropped)');
    const response = await send();
    if (random() < 0.1) await send(); // delivered twice
    if (random() < 0.2) throw new TypeError('Failed to fetch (response lost after the commit)');
    return response;
  }) as typeof fetch;
}

async function tablet(who: PersonKey, random: () => number): Promise<Tablet> {
  const store = await openStore({ name: `exactly-once-${who}-${Math.random().toString(36).slice(2)}` });
  let token: string | null = null;
  const sync = createApi({ fetch: faultyFetch(random), token: async () => token, timeoutMs: 5_000 });
  // Sign-in goes over a clean line: the test is about records, and a failed sign-in is simply repeated by a person.
  const clean = createApi({
    fetch: ((u: string, i?: RequestInit) => api.app.request(`http://localhost${u}`, i)) as typeof fetch,
    token: async () => null,
  });
  const session = await clean.signIn({
    user: who,
    passcode: PASSCODE,
    device: { id: await store.deviceId(), name: `${who} tablet` },
  });
  token = session.token;
  await store.setMeta('session', {
    token,
    user: session.user,
    device: { id: await store.deviceId(), name: 'x' },
    signedInAt: new Date().toISOString(),
  });
  return { who, store, sync };
}

describe('sync under faults, against the real server', () => {
  it('should store every record exactly once with its own content, and empty every outbox', async () => {
    const random = seededRandom(SEED);
    const tablets = await Promise.all(
      (['operator', 'operator2', 'mechanic', 'supervisor', 'admin'] as const).map((who) => tablet(who, random)),
    );
    const sent = new Map<string, string>();
    for (const t of tablets) {
      const device = await t.store.deviceId();
      for (let n = 0; n < RECORDS_PER_TABLET; n += 1) {
        const at = new Date(Date.UTC(2026, 10, 1, 6, 0, n)).toISOString();
        const body = {
          id: crypto.randomUUID(),
          roundId: '00000000-0000-4000-8000-000000000001',
          by: { id: t.who, name: PEOPLE[t.who].name },
          at,
          text: `${t.who} note ${n}`,
        };
        await t.store.saveRecord('note', body, { author: t.who, device, createdAt: at });
      }
      for (const entry of await t.store.outboxPending(10_000))
        sent.set(entry.id, contentHash(entry.envelope as TypedEnvelope));
    }
    expect(sent.size).toBe(5 * RECORDS_PER_TABLET);

    // Every tablet keeps pushing until its outbox is empty (bounded: a hang fails the test, it does not stall it).
    for (let attempt = 0; attempt < 400; attempt += 1) {
      const pending = await Promise.all(tablets.map(async (t) => (await t.store.outboxCounts()).pending));
      if (pending.every((n) => n === 0)) break;
      await Promise.all(tablets.map((t) => pushOutbox(t.store, t.sync, { batchRecords: 97 }).catch(() => undefined)));
    }

    for (const t of tablets) expect(await t.store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    const rows = api.db.prepare("SELECT id, content_hash AS hash FROM records WHERE type = 'note'").all() as Array<{
      id: string;
      hash: string;
    }>;
    expect(rows).toHaveLength(sent.size);
    expect(new Set(rows.map((r) => r.id)).size).toBe(sent.size);
    for (const row of rows) expect(row.hash).toBe(sent.get(row.id));
    expect((api.db.prepare('SELECT count(*) AS n FROM conflicts').get() as { n: number }).n).toBe(0);

    // The supervisor's tablet receives everything (supervisors may read every record), still over the bad line.
    const supervisor = tablets.find((t) => t.who === 'supervisor') as Tablet;
    for (let attempt = 0; attempt < 400; attempt += 1) {
      try {
        const progress = await pullAll(supervisor.store, supervisor.sync, { pageSize: 250 });
        if (progress.cursor >= rows.length) break;
      } catch {
        // dropped: pull again from the stored cursor
      }
    }
    const notes = await supervisor.store.listRecords('note');
    expect(notes).toHaveLength(sent.size);
  }, 240_000);
});
