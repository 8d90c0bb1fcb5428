/**
 * The tablet's sync, wired to the page: one engine, run on app start, whenever the server becomes reachable again,
 * after a round is finished, on a timer while reachable, on "Sync now", and when the service worker's background
 * sync fires (where the browser has it). All of these call the same idempotent run.
 */
import { createApi, SyncEngine, type SyncStatus } from '../../sync';
import type { ConnectionMonitor } from './connection';
import type { DataModel } from './data';
import { type Observable, observable } from './observable';

export const SYNC_INTERVAL_MS = 5 * 60_000;

export interface SyncModel {
  status: Observable<SyncStatus | null>;
  engine(): Promise<SyncEngine>;
  run(reason: string): Promise<void>;
}

export function startSyncModel(data: DataModel, connection: ConnectionMonitor): SyncModel {
  const status = observable<SyncStatus | null>(null);
  const ready = data.store().then(async (store) => {
    const api = createApi({
      token: async () => {
        const session = (await store.getMeta('session')) as { token?: string } | null | undefined;
        return session?.token ?? null;
      },
    });
    const engine = new SyncEngine(store, api);
    engine.subscribe((s) => {
      status.set(s);
      // The counts on "This tablet" follow every sync.
      void data.refresh();
    });
    await engine.refresh();
    return engine;
  });
  const run = async (reason: string) => {
    const engine = await ready;
    if (connection.state.get().status !== 'reachable' && reason !== 'manual') return;
    await engine.run(reason);
  };

  let wasReachable = false;
  connection.state.subscribe((state) => {
    const reachable = state.status === 'reachable';
    if (reachable && !wasReachable) void run('reachable');
    wasReachable = reachable;
  });
  window.setInterval(() => void run('timer'), SYNC_INTERVAL_MS);
  navigator.serviceWorker?.addEventListener('message', (event: MessageEvent) => {
    if ((event.data as { type?: unknown } | null)?.type === 'SYNC_NOW') void run('background sync');
  });
  void run('start');

  return {
    status,
    engine: () => ready,
    run,
  };
}

/** Asks the browser to wake the service worker for a sync when it can (Chromium's Background Sync); a bonus only. */
export async function requestBackgroundSync(): Promise<void> {
  try {
    const registration = (await navigator.serviceWorker?.ready) as
      | (ServiceWorkerRegistration & { sync?: { register(tag: string): Promise<void> } })
      | undefined;
    await registration?.sync?.register('crankhouse-sync');
  } catch {
    // Not supported or refused: the page's own triggers still sync.
  }
}
