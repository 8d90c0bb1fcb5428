/**
 * Upgrades from every shipped version (reliability T3.1, T3.2): a genuine version-1 database, made by the shipped
 * v1 upgrade step and holding over 1,000 readings and over 50 unsent outbox entries, opened by the current code.
 */
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { DB_VERSION, openStore } from '../../src/store';
import { openDb } from '../../src/store/db';
import { stableHash } from '../support/stable-hash';
import {
  type DatabaseDump,
  dumpDatabase,
  makeFixture,
  pointIdOf,
  type StoreFixture,
  writeV1Database,
} from '../support/store-fixture';
import { freshName, rejection } from './helpers';

const V1_INDEXES = {
  configs: [],
  findings: ['byRound'],
  meta: [],
  outbox: ['byRecordId'],
  readings: ['byRound'],
  records: ['byType'],
  rounds: ['byState'],
};

/** One hash per stored record, keyed by store and primary key. */
function recordHashes(dump: DatabaseDump): Map<string, string> {
  const hashes = new Map<string, string>();
  for (const [store, entries] of Object.entries(dump.stores)) {
    for (const [key, value] of entries) hashes.set(`${store}/${JSON.stringify(key)}`, stableHash(value));
  }
  return hashes;
}

async function v1Database(): Promise<{ name: string; fixture: StoreFixture; before: DatabaseDump }> {
  const name = freshName();
  const fixture = makeFixture();
  await writeV1Database(name, fixture);
  const before = await dumpDatabase(name);
  expect(before.version).toBe(1);
  expect(before.indexes).toEqual(V1_INDEXES);
  expect(before.stores.readings?.length).toBeGreaterThanOrEqual(1000);
  expect(fixture.outbox.filter((entry) => entry.state === 'pending').length).toBeGreaterThanOrEqual(50);
  return { name, fixture, before };
}

describe('upgrading from version 1', () => {
  it('should keep every record unchanged, keep the outbox order and answer the new queries', async () => {
    const { name, fixture, before } = await v1Database();
    const store = await openStore({ name });
    const after = await dumpDatabase(name);
    expect(after.version).toBe(DB_VERSION);
    expect(after.indexes.readings).toEqual(['byPointAt', 'byRound']);
    expect(after.indexes.outbox).toEqual(['byRecordId', 'byState']);
    const hashesBefore = recordHashes(before);
    const hashesAfter = recordHashes(after);
    expect(hashesAfter.size).toBe(hashesBefore.size);
    for (const [key, hash] of hashesBefore) expect(hashesAfter.get(key), key).toBe(hash);
    expect(after.stores.outbox?.map(([seq]) => seq)).toEqual(before.stores.outbox?.map(([seq]) => seq));

    // The new outbox.byState index: pending entries in enqueue order, and the counts.
    const pending = fixture.outbox.filter((entry) => entry.state === 'pending').map((entry) => entry.id);
    expect((await store.outboxPending(1000)).map((entry) => entry.id)).toEqual(pending);
    expect(await store.outboxCounts()).toEqual({
      pending: pending.length,
      attention: fixture.outbox.length - pending.length,
    });

    // The new readings.byPointAt index: one point's history over the finished rounds, newest first.
    const finished = new Set(fixture.rounds.filter((round) => round.state === 'finished').map((round) => round.id));
    const expected = fixture.readings
      .filter((reading) => reading.pointId === pointIdOf(3) && finished.has(reading.roundId))
      .sort((a, b) => Date.parse(b.at) - Date.parse(a.at));
    expect(expected.length).toBe(finished.size);
    expect(await store.readingsForPoint(pointIdOf(3), { limit: 1000 })).toEqual(expected);

    // The old indexes answer as before.
    const round = fixture.rounds[4];
    expect(stableHash(await store.readingsOf(round?.id as string))).toBe(
      stableHash(fixture.readings.filter((reading) => reading.roundId === round?.id)),
    );
    expect((await store.listRounds({ state: 'draft' })).length).toBe(fixture.rounds.length - finished.size);
    expect(await store.deviceId()).toBe('dev-fixture');
    store.close();
  });

  it('should stay at version 1 with all data when the upgrade fails part-way, and upgrade on the next open', async () => {
    const { name, before } = await v1Database();
    const error = await rejection(
      openDb({
        name,
        upgradeProgress: (step) => {
          // After the first of the two v2 indexes exists: a failure in the middle of the step.
          if (step === 'readings.byPointAt') throw new Error('injected failure between the two v2 indexes');
        },
      }),
    );
    expect(error.code).toBe('E_UPGRADE');
    expect(error.message).toContain('injected failure');
    expect(error.message).toContain('from version 1 to 2');
    const afterFailure = await dumpDatabase(name);
    expect(afterFailure.version).toBe(1);
    expect(afterFailure.indexes).toEqual(V1_INDEXES);
    expect(stableHash(afterFailure)).toBe(stableHash(before));

    const store = await openStore({ name });
    expect((await dumpDatabase(name)).version).toBe(DB_VERSION);
    expect((await store.outboxPending(1000)).length).toBeGreaterThanOrEqual(50);
    store.close();
  });
});
