import { HealthResponse } from '../schema/health';

export const HEALTH_PATH = '/api/v1/health';
export const DEFAULT_PROBE_TIMEOUT_MS = 5000;

export type ProbeResult =
  | { reachable: true; checkedAt: number; serverVersion: string; database: HealthResponse['database'] }
  | { reachable: false; checkedAt: number; reason: 'network' | 'timeout' | 'http' | 'malformed'; detail: string };

export interface ProbeOptions {
  fetch?: typeof fetch;
  baseUrl?: string;
  timeoutMs?: number;
  now?: () => number;
}

/**
 * Asks the site server whether it is there. `navigator.onLine` only says a network interface is up, not that the
 * server answers (plant Wi-Fi without uplink), so sync and the shell decide on this probe.
 * Never throws: every failure is a `reachable: false` result with a reason.
 */
export async function probeServer(options: ProbeOptions = {}): Promise<ProbeResult> {
  const fetchImpl = options.fetch ?? globalThis.fetch.bind(globalThis);
  const now = options.now ?? Date.now;
  const timeoutMs = options.timeoutMs ?? DEFAULT_PROBE_TIMEOUT_MS;
  const url = `${options.baseUrl ?? ''}${HEALTH_PATH}`;
  const controller = new AbortController();
  const timer = setTimeout(() => controller.abort(), timeoutMs);
  try {
    const response = await fetchImpl(url, {
      cache: 'no-store',
      headers: { Accept: 'application/json' },
      signal: controller.signal,
    });
    let body: unknown;
    try {
      body = await response.json();
    } catch {
      return { reachable: false, checkedAt: now(), reason: 'malformed', detail: `HTTP ${response.status}, not JSON` };
    }
    const parsed = HealthResponse.safeParse(body);
    if (!parsed.success) {
      return {
        reachable: false,
        checkedAt: now(),
        reason: 'malformed',
        detail: `HTTP ${response.status}, unexpected body`,
      };
    }
    // A 503 with a valid body is a server that answers but cannot store: reachable, database unavailable.
    if (!response.ok && response.status !== 503) {
      return { reachable: false, checkedAt: now(), reason: 'http', detail: `HTTP ${response.status}` };
    }
    return {
      reachable: true,
      checkedAt: now(),
      serverVersion: parsed.data.version,
      database: parsed.data.database,
    };
  } catch (error) {
    const timedOut = controller.signal.aborted;
    return {
      reachable: false,
      checkedAt: now(),
      reason: timedOut ? 'timeout' : 'network',
      detail: timedOut ? `no answer within ${timeoutMs} ms` : error instanceof Error ? error.message : String(error),
    };
  } finally {
    clearTimeout(timer);
  }
}
