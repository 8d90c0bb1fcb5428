/**
 * The tablet's records, as the shell sees them: the store opened once, its state (ready, blocked by an older tab,
 * outdated by a newer one), what it holds, backups, and the demo site on first start.
 */
import { DEMO_SITE_NAME } from '../../demo/name';
import { type ImportResult, openStore, type Store, StoreError } from '../../store';
import { type Observable, observable } from './observable';

export type DataState =
  | { kind: 'opening' }
  | {
      kind: 'ready';
      configName: string | null;
      configVersion: number | null;
      rounds: number;
      pending: number;
      attention: number;
    }
  | { kind: 'importing'; what: string }
  | { kind: 'blocked' }
  | { kind: 'outdated' }
  | { kind: 'failed'; reason: string };

export interface DataModel {
  state: Observable<DataState>;
  /** The open store; rejects when it cannot be opened. */
  store(): Promise<Store>;
  refresh(): Promise<void>;
  /** Everything on this tablet as one JSON file. */
  exportBackup(): Promise<Blob>;
  /** Validates and merges a backup file; nothing changes if it is not valid. */
  importBackup(text: string): Promise<ImportResult>;
  /** First start on the demo site: load its configuration and history, once. */
  importDemoIfNeeded(serverSiteName: string): Promise<boolean>;
}

export function describeStoreError(error: unknown): string {
  if (error instanceof StoreError) return error.message;
  if (error instanceof SyntaxError) return `The file is not JSON: ${error.message}`;
  return error instanceof Error ? error.message : String(error);
}

export function startDataModel(hooks: { onFirstSave: () => void }): DataModel {
  const state = observable<DataState>({ kind: 'opening' });
  const opened = openStore({
    onFirstSave: hooks.onFirstSave,
    onBlocked: () => state.set({ kind: 'blocked' }),
    // A newer version of the app needs the database: this page is out of date and lets go of it.
    onVersionChange: () => state.set({ kind: 'outdated' }),
  });
  opened.catch((error: unknown) => state.set({ kind: 'failed', reason: describeStoreError(error) }));

  const refresh = async () => {
    const store = await opened;
    const [config, rounds, counts] = await Promise.all([store.getConfig(), store.listRounds(), store.outboxCounts()]);
    state.set({
      kind: 'ready',
      configName: config?.name ?? null,
      configVersion: config?.version ?? null,
      rounds: rounds.length,
      pending: counts.pending,
      attention: counts.attention,
    });
  };
  void refresh().catch(() => {});

  let demoImport: Promise<boolean> | null = null;
  return {
    state,
    store: () => opened,
    refresh,
    async exportBackup() {
      const backup = await (await opened).exportBackup();
      return new Blob([JSON.stringify(backup)], { type: 'application/json' });
    },
    async importBackup(text: string) {
      const parsed: unknown = JSON.parse(text);
      const result = await (await opened).importBackup(parsed);
      await refresh();
      return result;
    },
    importDemoIfNeeded(serverSiteName: string) {
      if (serverSiteName !== DEMO_SITE_NAME) return Promise.resolve(false);
      demoImport ??= (async () => {
        const store = await opened;
        if (await store.getConfig()) return false;
        state.set({ kind: 'importing', what: 'the demo site and its 90 days of rounds' });
        // The demo data is its own chunk, loaded only on the first start at the demo site.
        const { demoBackup } = await import('../../demo/backup');
        const end = new Date();
        end.setUTCHours(0, 0, 0, 0);
        await store.importBackup(demoBackup({ end: end.toISOString() }));
        await refresh();
        return true;
      })().catch((error: unknown) => {
        demoImport = null;
        state.set({ kind: 'failed', reason: describeStoreError(error) });
        return false;
      });
      return demoImport;
    },
  };
}
