/**
 * The two ways this room touches IndexedDB. Callbacks passed here must await only requests of the transaction
 * they are given (reliability P1): no fetch, timers or crypto.subtle, or the transaction commits early.
 */
import type { IDBPTransaction, StoreNames } from 'idb';
import type { CrankhouseDB, Db } from './db';
import { StoreError, storeErrorFrom } from './errors';

type Name = StoreNames<CrankhouseDB>;
export type WriteTx = IDBPTransaction<CrankhouseDB, Name[], 'readwrite'>;
export type ReadTx = IDBPTransaction<CrankhouseDB, Name[], 'readonly'>;

export const FIRST_SAVE_KEY = 'firstSaveAt';

/** What the repositories need from an open store. */
export interface Ctx {
  /** The live connection (reopened after the browser terminated it). */
  db(): Promise<Db>;
  /** Whether the first-save marker is known to exist on this device. */
  firstSaveKnown: boolean;
  onFirstSave?: () => void;
}

export interface WriteOptions<T> {
  /** The write stores a person's data: it counts for the once-per-device first-save signal. */
  userData?: (result: T) => boolean;
}

/** Aborts the transaction; false if it had already ended (aborted or committed) before this call. */
function abortQuietly(tx: { abort(): void }): boolean {
  try {
    tx.abort();
    return true;
  } catch {
    return false;
  }
}

/**
 * Runs `fn` in one readwrite transaction with strict durability and resolves only after `complete`
 * (`tx.done`, reliability P2/P3). If `fn` throws, the transaction is aborted, so nothing of it is stored.
 */
export async function write<T>(
  ctx: Ctx,
  names: Name[],
  fn: (tx: WriteTx) => Promise<T>,
  options: WriteOptions<T> = {},
): Promise<T> {
  const db = await ctx.db();
  const markFirstSave = options.userData !== undefined && !ctx.firstSaveKnown;
  const stores = markFirstSave && !names.includes('meta') ? [...names, 'meta' as const] : names;
  const now = new Date().toISOString();
  let tx: WriteTx;
  try {
    tx = db.transaction(stores, 'readwrite', { durability: 'strict' });
  } catch (error) {
    throw storeErrorFrom(error, true);
  }
  const done = tx.done;
  // Observed below; without this an abort after a failed request would surface as an unhandled rejection (P5).
  done.catch(() => {});
  let result: T;
  let firstSave = false;
  try {
    result = await fn(tx);
    if (markFirstSave && options.userData?.(result)) {
      const meta = tx.objectStore('meta');
      if ((await meta.get(FIRST_SAVE_KEY)) === undefined) {
        await meta.put(now, FIRST_SAVE_KEY);
        firstSave = true;
      }
    }
  } catch (error) {
    if (error instanceof StoreError) {
      abortQuietly(tx);
      throw error;
    }
    if (abortQuietly(tx)) throw storeErrorFrom(error, true);
    // The transaction ended before our code failed. Aborted from outside with no request error is how a full
    // disk shows up in some engines (P4); committed early means an await on something other than IndexedDB (P1).
    const committed = await done.then(
      () => true,
      () => false,
    );
    if (committed) {
      throw new StoreError('E_STORAGE', `The write was cut short and may be incomplete: ${String(error)}`, {
        cause: error,
      });
    }
    throw storeErrorFrom(tx.error, false);
  }
  try {
    await done;
  } catch (error) {
    throw storeErrorFrom(error ?? tx.error, false);
  }
  if (markFirstSave && options.userData?.(result)) ctx.firstSaveKnown = true;
  if (firstSave) {
    try {
      ctx.onFirstSave?.();
    } catch {
      // The record is committed; a failing listener must not turn the save into an error.
    }
  }
  return result;
}

/** Runs `fn` in one readonly transaction (a consistent snapshot of the named stores). */
export async function read<T>(ctx: Ctx, names: Name[], fn: (tx: ReadTx) => Promise<T>): Promise<T> {
  const db = await ctx.db();
  let tx: ReadTx;
  try {
    tx = db.transaction(names, 'readonly');
  } catch (error) {
    throw storeErrorFrom(error, true);
  }
  const done = tx.done;
  done.catch(() => {});
  try {
    const result = await fn(tx);
    await done;
    return result;
  } catch (error) {
    abortQuietly(tx);
    throw storeErrorFrom(error, true);
  }
}
