/**
 * The store: the tablet's IndexedDB behind one object. Every write is validated before its transaction opens,
 * uses strict durability and resolves only after the commit. See README.md for the rules.
 */
import type { Finding, Reading, RecordBodies, Round, SiteConfig } from '../schema';
import { type BackupFile, exportBackup, type ImportResult, importBackup } from './backup';
import { getConfig, putConfig } from './config';
import { DB_NAME, type Db, type OutboxEntry, openDb, type RecordKind } from './db';
import { StoreError } from './errors';
import { deviceId, getMeta, setMeta } from './meta';
import {
  acknowledge,
  markNeedsAttention,
  outboxAttention,
  outboxCounts,
  outboxPending,
  retryAttention,
} from './outbox';
import { applyPulled, type PulledItem, type PullResult, pullCursor } from './pulled';
import { listRecords, saveRecord } from './records';
import {
  type EnvelopeMeta,
  type FinishRoundInput,
  findingsOf,
  finishRound,
  getRound,
  type HistoryOptions,
  listRounds,
  type RoundFilter,
  readingsForPoint,
  readingsOf,
  saveReading,
  startRound,
} from './rounds';
import type { Ctx } from './tx';

export type { BackupFile, ImportResult } from './backup';
export { DB_NAME, DB_VERSION, type OutboxEntry, type OutboxState, type RecordKind } from './db';
export { StoreError, type StoreErrorCode } from './errors';
export type { PulledItem, PullResult } from './pulled';
export type { EnvelopeMeta, FinishRoundInput, HistoryOptions, RoundFilter } from './rounds';

export interface OpenStoreOptions {
  /** Database name; tests use a fresh one each. Default `crankhouse`. */
  name?: string;
  /** An older tab keeps the database open: ask the person to close it. The open completes once it closes. */
  onBlocked?: () => void;
  /** A newer version of the app wants the database: save the draft now; the store closes afterwards. */
  onVersionChange?: () => Promise<void> | void;
  /** The first record was saved on this device (once per device): time to call navigator.storage.persist(). */
  onFirstSave?: () => void;
}

export interface Store {
  /** Stores a site configuration version; the same version with other content is refused (E_IMMUTABLE). */
  putConfig(config: SiteConfig): Promise<'saved' | 'unchanged'>;
  /** The configuration of that version, or the latest one when omitted. */
  getConfig(version?: number): Promise<SiteConfig | undefined>;
  /** Stores a new draft round; repeating the same call is harmless. */
  startRound(round: Round): Promise<void>;
  /** Saves (or replaces, same id) a reading of a draft round; E_IMMUTABLE once the round is finished. */
  saveReading(reading: Reading): Promise<void>;
  /** One round by id. */
  getRound(id: string): Promise<Round | undefined>;
  /** Rounds, newest start first, optionally only one state and/or route. */
  listRounds(filter?: RoundFilter): Promise<Round[]>;
  /** A round's readings in the order they were taken. */
  readingsOf(roundId: string): Promise<Reading[]>;
  /** A finished round's findings, by key. */
  findingsOf(roundId: string): Promise<Finding[]>;
  /** Finishes the round, stores its findings and queues it for the server, in one transaction. */
  finishRound(input: FinishRoundInput): Promise<'finished' | 'unchanged'>;
  /** Readings of finished rounds for one check point, newest first. */
  readingsForPoint(pointId: string, options?: HistoryOptions): Promise<Reading[]>;
  /** Validates and stores a record and its outbox entry in one transaction; identical repeat = no-op. */
  saveRecord<T extends RecordKind>(type: T, body: RecordBodies[T], meta: EnvelopeMeta): Promise<'saved' | 'unchanged'>;
  /** Every record of one type, newest first. */
  listRecords<T extends RecordKind>(type: T): Promise<RecordBodies[T][]>;
  /** Up to `limit` pending outbox entries in enqueue order. */
  outboxPending(limit: number): Promise<OutboxEntry[]>;
  /** Removes the outbox entries of these record ids (the records stay); returns how many were removed. */
  acknowledge(ids: string[]): Promise<number>;
  /** Parks an outbox entry as needing attention with the reason (it is no longer pending). */
  markNeedsAttention(id: string, reason: string): Promise<void>;
  /** Entries parked as needing attention, with the server's reason in `lastError`. */
  outboxAttention(limit: number): Promise<OutboxEntry[]>;
  /** Puts a parked entry back in line to be sent again. */
  retryAttention(id: string): Promise<void>;
  /** How many outbox entries are pending and how many need attention. */
  outboxCounts(): Promise<{ pending: number; attention: number }>;
  /** A stored device fact or sync cursor. */
  getMeta(key: string): Promise<unknown>;
  /** Stores a device fact or sync cursor (not the keys the store keeps itself). */
  setMeta(key: string, value: unknown): Promise<void>;
  /** This device's id, made once and kept. */
  deviceId(): Promise<string>;
  /** Everything on the tablet as one JSON-serialisable object. */
  exportBackup(): Promise<BackupFile>;
  /** Validates a backup file completely, then merges it by id in one transaction. */
  importBackup(data: unknown): Promise<ImportResult>;
  /** Stores records pulled from the server and the new cursor in one transaction (never into the outbox). */
  applyPulled(items: PulledItem[], next: number): Promise<PullResult>;
  /** The last server sequence number pulled (0 before the first pull). */
  pullCursor(): Promise<number>;
  /** Closes the connection; later calls fail with E_CLOSED. */
  close(): void;
}

/** Opens the store (creating or upgrading the database). */
export async function openStore(options: OpenStoreOptions = {}): Promise<Store> {
  const name = options.name ?? DB_NAME;
  let state: 'open' | 'handedOver' | 'closed' = 'open';
  let connection: Db | null = null;
  let reopening: Promise<Db> | null = null;

  const connect = () =>
    openDb({
      name,
      ...(options.onBlocked ? { onBlocked: options.onBlocked } : {}),
      ...(options.onVersionChange ? { onVersionChange: options.onVersionChange } : {}),
      onHandedOver: () => {
        if (state === 'open') state = 'handedOver';
        connection = null;
      },
      onTerminated: () => {
        connection = null;
      },
    });

  const ctx: Ctx = {
    firstSaveKnown: false,
    ...(options.onFirstSave ? { onFirstSave: options.onFirstSave } : {}),
    async db() {
      if (state === 'closed') throw new StoreError('E_CLOSED', 'The store was closed; open it again.');
      if (state === 'handedOver') {
        throw new StoreError(
          'E_BLOCKED',
          'A newer version of the app opened the database in another tab, so this tab let go of it. Reload this tab.',
        );
      }
      if (connection) return connection;
      // The browser dropped the connection (reliability P6): open it again once, shared by concurrent callers.
      reopening ??= connect().finally(() => {
        reopening = null;
      });
      connection = await reopening;
      return connection;
    },
  };

  connection = await connect();

  return {
    putConfig: (config) => putConfig(ctx, config),
    getConfig: (version) => getConfig(ctx, version),
    startRound: (round) => startRound(ctx, round),
    saveReading: (reading) => saveReading(ctx, reading),
    getRound: (id) => getRound(ctx, id),
    listRounds: (filter) => listRounds(ctx, filter),
    readingsOf: (roundId) => readingsOf(ctx, roundId),
    findingsOf: (roundId) => findingsOf(ctx, roundId),
    finishRound: (input) => finishRound(ctx, input),
    readingsForPoint: (pointId, history) => readingsForPoint(ctx, pointId, history),
    saveRecord: (type, body, meta) => saveRecord(ctx, type, body, meta),
    listRecords: (type) => listRecords(ctx, type),
    outboxPending: (limit) => outboxPending(ctx, limit),
    acknowledge: (ids) => acknowledge(ctx, ids),
    markNeedsAttention: (id, reason) => markNeedsAttention(ctx, id, reason),
    outboxCounts: () => outboxCounts(ctx),
    outboxAttention: (limit) => outboxAttention(ctx, limit),
    retryAttention: (id) => retryAttention(ctx, id),
    getMeta: (key) => getMeta(ctx, key),
    setMeta: (key, value) => setMeta(ctx, key, value),
    deviceId: () => deviceId(ctx),
    exportBackup: () => exportBackup(ctx),
    importBackup: (data) => importBackup(ctx, data),
    applyPulled: (items, next) => applyPulled(ctx, items, next),
    pullCursor: () => pullCursor(ctx),
    close() {
      state = 'closed';
      connection?.close();
      connection = null;
    },
  };
}
