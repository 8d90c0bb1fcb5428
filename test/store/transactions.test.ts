/** How writes reach the disk and how they fail (reliability T1.1, T1.5, T2.2, P4, P6). */
import 'fake-indexeddb/auto';
import { forceCloseDatabase } from 'fake-indexeddb';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { openStore, type RecordKind, type Store } from '../../src/store';
import { storeErrorFrom } from '../../src/store/errors';
import { stableHash } from '../support/stable-hash';
import { dumpDatabase, fixtureFindings, fixtureReading, fixtureRecord, fixtureRound } from '../support/store-fixture';
import { freshName, freshStore, META, rejection } from './helpers';

afterEach(() => {
  vi.restoreAllMocks();
});

async function fillSome(store: Store): Promise<void> {
  await store.startRound(fixtureRound(0));
  await store.saveReading(fixtureReading(0, 0));
  const finishedAt = fixtureRound(0, 'finished').finishedAt as string;
  await store.finishRound({ roundId: fixtureRound(0).id, finishedAt, findings: fixtureFindings(0), meta: META });
  const note = fixtureRecord(0, 0);
  await store.saveRecord('note', note.body as never, META);
  await store.acknowledge([note.id]);
  await store.markNeedsAttention(fixtureRound(0).id, 'refused');
}

describe('transactions', () => {
  it('should open every readwrite transaction with strict durability', async () => {
    const modes: Array<[string, string]> = [];
    const original = IDBDatabase.prototype.transaction;
    vi.spyOn(IDBDatabase.prototype, 'transaction').mockImplementation(function (
      this: IDBDatabase,
      ...args: Parameters<IDBDatabase['transaction']>
    ) {
      const tx = original.apply(this, args);
      modes.push([tx.mode, tx.durability]);
      return tx;
    });
    const store = await freshStore();
    await fillSome(store);
    await store.setMeta('cursor', 1);
    await store.deviceId();
    await store.importBackup(await store.exportBackup());
    const writes = modes.filter(([mode]) => mode === 'readwrite');
    // source: W3C IndexedDB 3.0, IDBTransaction.durability reflects the option the transaction was opened with
    expect(writes.length).toBeGreaterThanOrEqual(9);
    expect(new Set(writes.map(([, durability]) => durability))).toEqual(new Set(['strict']));
    store.close();
  });

  it('should report an abort with no request error as E_QUOTA and keep everything stored before', async () => {
    const name = freshName();
    const store = await openStore({ name });
    await fillSome(store);
    const before = stableHash(await dumpDatabase(name));
    // A full disk in some engines aborts the transaction with no error on any request (reliability P4):
    // the first add succeeds, then the transaction is aborted from outside.
    const add = IDBObjectStore.prototype.add;
    vi.spyOn(IDBObjectStore.prototype, 'add').mockImplementation(function (
      this: IDBObjectStore,
      ...args: Parameters<IDBObjectStore['add']>
    ) {
      const request = add.apply(this, args);
      request.addEventListener('success', () => this.transaction.abort());
      return request;
    });
    const record = fixtureRecord(2, 0);
    const error = await rejection(store.saveRecord(record.type as RecordKind, record.body as never, META));
    expect(error.code).toBe('E_QUOTA');
    expect(error.message).toMatch(/Sync/);
    expect(error.message).toMatch(/free space/);
    vi.restoreAllMocks();
    expect(stableHash(await dumpDatabase(name))).toBe(before);
    expect(await store.saveRecord(record.type as RecordKind, record.body as never, META)).toBe('saved');
    store.close();
  });

  it('should turn a QuotaExceededError into E_QUOTA and other failures into their own codes', () => {
    // source: WebIDL "QuotaExceededError" and W3C IndexedDB "ConstraintError", the DOMException names the engines throw
    expect(storeErrorFrom(new DOMException('quota', 'QuotaExceededError')).code).toBe('E_QUOTA');
    expect(storeErrorFrom(new DOMException('aborted', 'AbortError'), false).code).toBe('E_QUOTA');
    expect(storeErrorFrom(new DOMException('aborted', 'AbortError'), true).code).toBe('E_STORAGE');
    expect(storeErrorFrom(new DOMException('key exists', 'ConstraintError')).code).toBe('E_CONFLICT');
    expect(storeErrorFrom(new DOMException('closing', 'InvalidStateError')).code).toBe('E_CLOSED');
  });

  it('should reopen by itself after the browser dropped the connection', async () => {
    const connections: IDBDatabase[] = [];
    const open = IDBFactory.prototype.open;
    vi.spyOn(IDBFactory.prototype, 'open').mockImplementation(function (
      this: IDBFactory,
      ...args: Parameters<IDBFactory['open']>
    ) {
      const request = open.apply(this, args);
      request.addEventListener('success', () => connections.push(request.result));
      return request;
    });
    const store = await freshStore();
    await store.startRound(fixtureRound(0));
    expect(connections).toHaveLength(1);
    // source: W3C IndexedDB 3.0 "close a database connection" with forced flag: the "close" event fires
    // fake-indexeddb types its argument as the class rather than an instance.
    forceCloseDatabase(connections[0] as never);
    await store.saveReading(fixtureReading(0, 0));
    expect(connections).toHaveLength(2);
    expect(await store.readingsOf(fixtureRound(0).id)).toEqual([fixtureReading(0, 0)]);
    store.close();
  });
});
