import { Workbox } from 'workbox-window';
import { type Observable, observable } from './models/observable';
import { hasUnsavedInput } from './unsaved-input';

export type WorkerState =
  | { kind: 'unsupported'; reason: string }
  | { kind: 'registering' }
  | { kind: 'ready-offline' }
  | { kind: 'update-waiting' }
  | { kind: 'failed'; reason: string };

/** How often an open app asks the server for a new version, besides each navigation and return to the foreground. */
export const UPDATE_CHECK_INTERVAL_MS = 60 * 60 * 1000;

const workerState = observable<WorkerState>({ kind: 'registering' });
let workbox: Workbox | null = null;
let updateAccepted = false;

/** The service worker's state as the shell shows it. */
export const serviceWorker: Observable<WorkerState> = workerState;

/** Registers /sw.js (production builds only). The worker caches the whole app so it starts with no network. */
export function startServiceWorker(): void {
  if (!import.meta.env.PROD) {
    workerState.set({ kind: 'unsupported', reason: 'The development server runs without the service worker.' });
    return;
  }
  if (!('serviceWorker' in navigator)) {
    workerState.set({
      kind: 'unsupported',
      reason: 'This browser has no service workers: the app cannot work offline.',
    });
    return;
  }
  const wb = new Workbox('/sw.js', { scope: '/', type: 'classic' });
  workbox = wb;
  wb.addEventListener('waiting', () => workerState.set({ kind: 'update-waiting' }));
  wb.addEventListener('activated', (event) => {
    if (!event.isUpdate) workerState.set({ kind: 'ready-offline' });
  });
  // Reload only after the person agreed (applyUpdate) and the new worker has taken control. workbox-window's own
  // `isUpdate` flag is false when the page had no controller at registration (first visit), so keep our own.
  navigator.serviceWorker.addEventListener('controllerchange', () => {
    if (updateAccepted) window.location.reload();
  });
  wb.register()
    .then(async (registration) => {
      if (!registration) return;
      if (registration.waiting) workerState.set({ kind: 'update-waiting' });
      else if (registration.active) {
        await navigator.serviceWorker.ready;
        if (workerState.get().kind === 'registering') workerState.set({ kind: 'ready-offline' });
      }
    })
    .catch((error: unknown) =>
      workerState.set({ kind: 'failed', reason: error instanceof Error ? error.message : String(error) }),
    );
  const checkForUpdate = () => {
    if (document.visibilityState === 'visible') void wb.update().catch(() => {});
  };
  document.addEventListener('visibilitychange', checkForUpdate);
  window.setInterval(checkForUpdate, UPDATE_CHECK_INTERVAL_MS);
}

export type UpdateOutcome = 'reloading' | 'blocked-unsaved-input' | 'no-update';

/**
 * Activates the waiting version. Refuses while any screen holds unsaved input: the person saves or discards first.
 * The page reloads on `controlling`, never before the new worker is in charge.
 */
export function applyUpdate(): UpdateOutcome {
  if (!workbox || workerState.get().kind !== 'update-waiting') return 'no-update';
  if (hasUnsavedInput()) return 'blocked-unsaved-input';
  updateAccepted = true;
  workbox.messageSkipWaiting();
  return 'reloading';
}
