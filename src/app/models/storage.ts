import { type Observable, observable } from './observable';

export interface StorageState {
  /** False where the browser has no Storage API (very old engines, some in-app browsers). */
  supported: boolean;
  persisted: boolean | null;
  usageBytes: number | null;
  quotaBytes: number | null;
}

export const UNKNOWN_STORAGE: StorageState = { supported: true, persisted: null, usageBytes: null, quotaBytes: null };

/** Share of the quota above which the shell warns (reliability plan T2.2). */
export const USAGE_WARNING_FRACTION = 0.8;

export type StorageWarning = { kind: 'not-persistent' | 'nearly-full' | 'unsupported'; message: string };

/** Pure: what the operator must be told about this tablet's storage. */
export function storageWarnings(state: StorageState): StorageWarning[] {
  if (!state.supported) {
    return [
      {
        kind: 'unsupported',
        message: 'This browser cannot report or protect its storage. Use the installed app in Chrome or Edge.',
      },
    ];
  }
  const warnings: StorageWarning[] = [];
  if (state.persisted === false) {
    warnings.push({
      kind: 'not-persistent',
      message:
        'Storage is not persistent: the browser may delete unsynced readings when space runs low. Install the app and allow persistent storage.',
    });
  }
  if (state.usageBytes !== null && state.quotaBytes && state.usageBytes / state.quotaBytes >= USAGE_WARNING_FRACTION) {
    warnings.push({
      kind: 'nearly-full',
      message: `Storage is ${Math.round((100 * state.usageBytes) / state.quotaBytes)} % full. Sync, then free space on this tablet.`,
    });
  }
  return warnings;
}

/** Pure: bytes as a short figure with binary prefixes (1 KiB = 1024 B). */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return '–';
  const units = ['B', 'KiB', 'MiB', 'GiB', 'TiB'];
  let value = bytes;
  let unit = 0;
  while (value >= 1024 && unit < units.length - 1) {
    value /= 1024;
    unit += 1;
  }
  const digits = unit === 0 || value >= 100 ? 0 : value >= 10 ? 1 : 2;
  return `${value.toFixed(digits)} ${units[unit]}`;
}

export async function readStorageState(
  manager: StorageManager | null | undefined = globalThis.navigator?.storage,
): Promise<StorageState> {
  if (!manager?.estimate || !manager.persisted) {
    return { supported: false, persisted: null, usageBytes: null, quotaBytes: null };
  }
  const [persisted, estimate] = await Promise.all([
    manager.persisted().catch(() => null),
    manager.estimate().catch(() => null),
  ]);
  return {
    supported: true,
    persisted,
    usageBytes: estimate?.usage ?? null,
    quotaBytes: estimate?.quota ?? null,
  };
}

export interface StorageMonitor {
  state: Observable<StorageState>;
  refresh(): Promise<void>;
  /** Asks the browser to keep this origin's data; Chromium answers silently from engagement and installation. */
  requestPersistence(): Promise<boolean>;
}

export function startStorageMonitor(): StorageMonitor {
  const state = observable<StorageState>(UNKNOWN_STORAGE);
  const refresh = async () => state.set(await readStorageState());
  void refresh();
  return {
    state,
    refresh,
    async requestPersistence() {
      const granted = (await navigator.storage?.persist?.().catch(() => false)) ?? false;
      await refresh();
      return granted;
    },
  };
}
