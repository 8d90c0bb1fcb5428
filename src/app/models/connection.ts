import { type ProbeResult, probeServer } from '../../sync/health';
import { type Observable, observable } from './observable';

export type ConnectionStatus = 'checking' | 'reachable' | 'unreachable' | 'no-network';

export interface ConnectionState {
  status: ConnectionStatus;
  /** When the server last answered, in ms since the epoch. */
  lastReachableAt: number | null;
  lastProbe: ProbeResult | null;
}

export const INITIAL_CONNECTION: ConnectionState = { status: 'checking', lastReachableAt: null, lastProbe: null };

/** Pure: the next connection state after a probe, or after the browser reports no network at all. */
export function nextConnectionState(
  previous: ConnectionState,
  event: { kind: 'probe'; result: ProbeResult } | { kind: 'no-network' } | { kind: 'checking' },
): ConnectionState {
  switch (event.kind) {
    case 'no-network':
      return { ...previous, status: 'no-network' };
    case 'checking':
      return previous.status === 'checking' || previous.lastProbe === null
        ? { ...previous, status: 'checking' }
        : previous;
    case 'probe':
      return {
        status: event.result.reachable ? 'reachable' : 'unreachable',
        lastReachableAt: event.result.reachable ? event.result.checkedAt : previous.lastReachableAt,
        lastProbe: event.result,
      };
  }
}

/** Pure: the words the shell shows for a connection state. */
export function describeConnection(state: ConnectionState, now: number): { label: string; detail: string } {
  const since =
    state.lastReachableAt === null
      ? 'not reached since the app started'
      : `last reached ${ago(now - state.lastReachableAt)}`;
  switch (state.status) {
    case 'checking':
      return { label: 'Checking server…', detail: 'Asking the site server whether it is there.' };
    case 'reachable': {
      const probe = state.lastProbe;
      if (probe?.reachable && probe.database !== 'ok') {
        return {
          label: 'Server: storage fault',
          detail: 'The site server answers but cannot store records. Keep working; records stay on this tablet.',
        };
      }
      return {
        label: 'Server reachable',
        detail: probe?.reachable ? `Site server version ${probe.serverVersion} answers.` : 'The site server answers.',
      };
    }
    case 'unreachable':
      return { label: 'Server not reachable', detail: `Working offline: readings stay on this tablet (${since}).` };
    case 'no-network':
      return { label: 'No network', detail: `This tablet has no network. Readings stay on this tablet (${since}).` };
  }
}

function ago(ms: number): string {
  const seconds = Math.max(0, Math.round(ms / 1000));
  if (seconds < 60) return `${seconds} s ago`;
  const minutes = Math.round(seconds / 60);
  if (minutes < 120) return `${minutes} min ago`;
  return `${Math.round(minutes / 60)} h ago`;
}

export const PROBE_INTERVAL_MS = 20_000;

export interface ConnectionMonitor {
  state: Observable<ConnectionState>;
  checkNow(): Promise<void>;
  stop(): void;
}

/**
 * Probes the server on start, on the browser's online/offline events, when the app comes back to the foreground,
 * and on a timer while visible.
 */
export function startConnectionMonitor(intervalMs = PROBE_INTERVAL_MS): ConnectionMonitor {
  const state = observable<ConnectionState>(INITIAL_CONNECTION);
  let inFlight: Promise<void> | null = null;

  const checkNow = (): Promise<void> => {
    if (!navigator.onLine) {
      state.set(nextConnectionState(state.get(), { kind: 'no-network' }));
      return Promise.resolve();
    }
    inFlight ??= (async () => {
      state.set(nextConnectionState(state.get(), { kind: 'checking' }));
      const result = await probeServer();
      state.set(nextConnectionState(state.get(), { kind: 'probe', result }));
    })().finally(() => {
      inFlight = null;
    });
    return inFlight;
  };

  const onVisibility = () => {
    if (document.visibilityState === 'visible') void checkNow();
  };
  const onNetworkChange = () => void checkNow();
  window.addEventListener('online', onNetworkChange);
  window.addEventListener('offline', onNetworkChange);
  document.addEventListener('visibilitychange', onVisibility);
  const timer = window.setInterval(() => {
    if (document.visibilityState === 'visible') void checkNow();
  }, intervalMs);
  void checkNow();

  return {
    state,
    checkNow,
    stop() {
      window.clearInterval(timer);
      window.removeEventListener('online', onNetworkChange);
      window.removeEventListener('offline', onNetworkChange);
      document.removeEventListener('visibilitychange', onVisibility);
    },
  };
}
