/**
 * The IndexedDB schema and its versions. Each shipped version has its own upgrade step; `openDb` runs the steps from
 * the stored version up to the requested one inside the single upgrade transaction, so a failure leaves the
 * database at its previous version (W3C IndexedDB: an aborted upgrade transaction keeps the old version).
 */
import { type DBSchema, type IDBPDatabase, type IDBPTransaction, openDB, type StoreNames } from 'idb';
import type { Finding, Reading, Round, SiteConfig } from '../schema';
import type { RecordBodies, RecordType, TypedEnvelope } from '../schema/envelope';
import { StoreError, storeErrorFrom } from './errors';

export const DB_NAME = 'crankhouse';
/** v1: the first shipped schema. v2: readings.byPointAt (history per check point), outbox.byState. */
export const DB_VERSION = 2;

/** Record types kept in the `records` store; rounds have their own stores. */
export type RecordKind = Exclude<RecordType, 'round'>;

export interface StoredRecord<T extends RecordKind = RecordKind> {
  id: string;
  type: T;
  body: RecordBodies[T];
}

export type OutboxState = 'pending' | 'attention';

export interface OutboxEntry {
  /** Enqueue order, assigned by IndexedDB (autoIncrement). */
  seq?: number;
  /** The record id, which is also the envelope id. */
  id: string;
  type: RecordType;
  envelope: TypedEnvelope;
  state: OutboxState;
  attempts: number;
  lastError?: string;
  enqueuedAt: string;
}

export interface CrankhouseDB extends DBSchema {
  /** Out-of-line keys: device id, first-save marker, sync cursors. */
  meta: { key: string; value: unknown };
  configs: { key: number; value: SiteConfig };
  rounds: { key: string; value: Round; indexes: { byState: string } };
  readings: { key: string; value: Reading; indexes: { byRound: string; byPointAt: [string, string] } };
  findings: { key: string; value: Finding; indexes: { byRound: string } };
  records: { key: string; value: StoredRecord; indexes: { byType: string } };
  outbox: { key: number; value: OutboxEntry; indexes: { byRecordId: string; byState: string } };
}

export type Db = IDBPDatabase<CrankhouseDB>;
export type UpgradeTx = IDBPTransaction<CrankhouseDB, StoreNames<CrankhouseDB>[], 'versionchange'>;

/** Version 1, exactly as shipped. Kept as its own function so tests can build a genuine v1 database. */
export function upgradeToV1(db: Db): void {
  db.createObjectStore('meta');
  db.createObjectStore('configs', { keyPath: 'version' });
  db.createObjectStore('rounds', { keyPath: 'id' }).createIndex('byState', 'state');
  db.createObjectStore('readings', { keyPath: 'id' }).createIndex('byRound', 'roundId');
  db.createObjectStore('findings', { keyPath: 'key' }).createIndex('byRound', 'roundId');
  db.createObjectStore('records', { keyPath: 'id' }).createIndex('byType', 'type');
  db.createObjectStore('outbox', { keyPath: 'seq', autoIncrement: true }).createIndex('byRecordId', 'id', {
    unique: true,
  });
}

/** Version 2: indexes only; no value is rewritten or removed. */
export function upgradeToV2(tx: UpgradeTx, progress?: (step: string) => void): void {
  tx.objectStore('readings').createIndex('byPointAt', ['pointId', 'at']);
  progress?.('readings.byPointAt');
  tx.objectStore('outbox').createIndex('byState', 'state');
  progress?.('outbox.byState');
}

/** Runs every step between the stored version and the target, in order, synchronously (reliability P9). */
export function upgrade(
  db: Db,
  oldVersion: number,
  targetVersion: number,
  tx: UpgradeTx,
  progress?: (step: string) => void,
): void {
  if (oldVersion < 1 && targetVersion >= 1) upgradeToV1(db);
  if (oldVersion < 2 && targetVersion >= 2) upgradeToV2(tx, progress);
}

export interface OpenDbOptions {
  name?: string;
  /** Tests only: open (and create) an older shipped version. */
  version?: number;
  /** An older tab holds the database open; the open waits until it closes. */
  onBlocked?: () => void;
  /** A newer version wants the database: save what must be saved; the connection is closed afterwards. */
  onVersionChange?: () => Promise<void> | void;
  /** Called once this connection has been closed for a newer version. */
  onHandedOver?: () => void;
  /** The browser closed the connection abnormally (storage cleared, WebKit "connection lost"). */
  onTerminated?: () => void;
  /** Tests only: called after each step of an upgrade; throwing aborts the upgrade. */
  upgradeProgress?: (step: string) => void;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** Opens (creating or upgrading) the database. Rejects with StoreError E_UPGRADE if the upgrade fails. */
export async function openDb(options: OpenDbOptions = {}): Promise<Db> {
  const name = options.name ?? DB_NAME;
  const version = options.version ?? DB_VERSION;
  if (!Number.isInteger(version) || version < 1 || version > DB_VERSION) {
    throw new StoreError('E_INVALID', `version: must be a shipped version from 1 to ${DB_VERSION}, not ${version}`);
  }
  let upgradeFailure: unknown;
  let fromVersion = 0;
  try {
    return await openDB<CrankhouseDB>(name, version, {
      upgrade(db, oldVersion, _newVersion, tx) {
        fromVersion = oldVersion;
        // idb makes a done promise for the upgrade transaction; a failed upgrade is reported through openDB.
        tx.done.catch(() => {});
        try {
          upgrade(db, oldVersion, version, tx, options.upgradeProgress);
        } catch (error) {
          upgradeFailure = error;
          tx.abort();
        }
      },
      blocked() {
        options.onBlocked?.();
      },
      blocking(_current, _blocked, event) {
        const connection = event.target as IDBDatabase;
        const handOver = async () => {
          try {
            await options.onVersionChange?.();
          } finally {
            connection.close();
            options.onHandedOver?.();
          }
        };
        handOver().catch(() => {});
      },
      terminated() {
        options.onTerminated?.();
      },
    });
  } catch (error) {
    if (upgradeFailure !== undefined) {
      throw new StoreError(
        'E_UPGRADE',
        `Updating the tablet's database from version ${fromVersion} to ${version} failed and was undone; ` +
          `the data is unchanged. Reload the app to try again. Cause: ${messageOf(upgradeFailure)}`,
        { cause: upgradeFailure },
      );
    }
    if (error instanceof Error && error.name === 'VersionError') {
      throw new StoreError(
        'E_UPGRADE',
        `The database on this tablet was written by a newer version of the app than this one (schema ${version}); ` +
          'reload the app to get the newer version.',
        { cause: error },
      );
    }
    const storeError = storeErrorFrom(error, true);
    throw new StoreError(
      storeError.code === 'E_QUOTA' ? 'E_QUOTA' : 'E_UPGRADE',
      `The tablet's database could not be opened: ${storeError.message}`,
      { cause: error },
    );
  }
}
