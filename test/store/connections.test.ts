/**
 * Opening, versions and several tabs (reliability T3.3, P8): an older connection must let a newer version in,
 * after saving what it holds, and the newer open must complete once it has.
 */
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { DB_VERSION, openStore } from '../../src/store';
import { openDb } from '../../src/store/db';
import { dumpDatabase, fixtureReading, fixtureRound } from '../support/store-fixture';
import { freshName, rejection, within } from './helpers';

function rawOpen(name: string, version: number): Promise<IDBDatabase> {
  return new Promise((resolve, reject) => {
    const request = indexedDB.open(name, version);
    request.onsuccess = () => resolve(request.result);
    request.onerror = () => reject(request.error);
  });
}

describe('opening the database', () => {
  it('should create the current version with the stores and indexes of the schema', async () => {
    const name = freshName();
    (await openStore({ name })).close();
    const dump = await dumpDatabase(name);
    expect(DB_VERSION).toBe(2);
    expect(dump.version).toBe(2);
    expect(dump.indexes).toEqual({
      configs: [],
      findings: ['byRound'],
      meta: [],
      outbox: ['byRecordId', 'byState'],
      readings: ['byPointAt', 'byRound'],
      records: ['byType'],
      rounds: ['byState'],
    });
  });

  it('should let a newer version in: blocked is reported, the old side saves its draft and closes, the open completes', async () => {
    const name = freshName();
    const events: string[] = [];
    const old = await openDb({
      name,
      version: 1,
      onVersionChange: async () => {
        events.push('versionchange');
        // The old tab saves its draft through its own (version 1) connection before letting go.
        await old.put('rounds', fixtureRound(0));
        await old.put('readings', fixtureReading(0, 0));
      },
      onHandedOver: () => events.push('closed'),
    });
    const store = await within(
      openStore({ name, onBlocked: () => events.push('blocked') }),
      5000,
      'the new version opening after the old connection closed',
    );
    // source: W3C IndexedDB 3.0 "open a database connection": versionchange goes to the open connections first,
    // blocked follows while any of them is still open, and the upgrade runs once they have closed.
    expect(events).toEqual(['versionchange', 'blocked', 'closed']);
    expect(await store.readingsOf(fixtureRound(0).id)).toEqual([fixtureReading(0, 0)]);
    expect((await dumpDatabase(name)).version).toBe(DB_VERSION);
    store.close();
  });

  it("should run the store's onVersionChange, then refuse further calls with E_BLOCKED", async () => {
    const name = freshName();
    const store = await openStore({
      name,
      onVersionChange: async () => {
        await store.saveReading(fixtureReading(0, 1));
      },
    });
    await store.startRound(fixtureRound(0));
    const newer = await within(rawOpen(name, DB_VERSION + 1), 5000, 'a newer version opening');
    newer.close();
    const error = await rejection(store.saveReading(fixtureReading(0, 2)));
    expect(error.code).toBe('E_BLOCKED');
    expect(error.message).toContain('Reload');
    const dump = await dumpDatabase(name);
    expect(dump.stores.readings?.map(([key]) => key)).toEqual([fixtureReading(0, 1).id]);
  });

  it('should refuse to open a database written by a newer version, and leave it alone', async () => {
    const name = freshName();
    (await rawOpen(name, DB_VERSION + 1)).close();
    const error = await rejection(openStore({ name }));
    expect(error.code).toBe('E_UPGRADE');
    expect(error.message).toContain('newer version');
    expect((await dumpDatabase(name)).version).toBe(DB_VERSION + 1);
  });

  it('should refuse a version that was never shipped', async () => {
    const error = await rejection(openDb({ name: freshName(), version: DB_VERSION + 1 }));
    expect(error.code).toBe('E_INVALID');
    expect(error.message).toContain('version');
  });
});
