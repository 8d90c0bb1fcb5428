/**
 * The one way anything reaches the server: push the outbox, take a newer site configuration, pull what others
 * recorded. Every trigger (start, server reachable again, round finished, timer, "sync now", the service worker's
 * background sync) calls `run`, which is idempotent and never runs twice at once. Failures that may pass are retried
 * with back-off; a lost sign-in stops sync until the person signs in again.
 */
import type { SignedInUser } from '../schema';
import type { Store } from '../store';
import { type SyncApi, SyncError } from './api';
import { backoffDelayMs } from './backoff';
import { pullAll } from './pull';
import { pushOutbox } from './push';

export const SESSION_KEY = 'session';

export interface StoredSession {
  token: string;
  user: SignedInUser;
  device: { id: string; name: string };
  signedInAt: string;
}

export type SyncPhase = 'idle' | 'pushing' | 'pulling' | 'waiting' | 'signed-out' | 'error';

export interface SyncStatus {
  phase: SyncPhase;
  user: SignedInUser | null;
  pending: number;
  attention: number;
  lastSuccessAt: string | null;
  lastError: string | null;
  /** Counts of the running push or pull, for a progress bar. */
  progress: { label: string; done: number; total: number | null } | null;
  nextAttemptAt: string | null;
}

export interface EngineOptions {
  /** Schedules a retry; returns a cancel function. */
  schedule?: (ms: number, run: () => void) => () => void;
  now?: () => number;
  random?: () => number;
}

export async function readSession(store: Store): Promise<StoredSession | null> {
  const value = await store.getMeta(SESSION_KEY);
  return value && typeof value === 'object' && 'token' in value ? (value as StoredSession) : null;
}

export class SyncEngine {
  private current: SyncStatus = {
    phase: 'idle',
    user: null,
    pending: 0,
    attention: 0,
    lastSuccessAt: null,
    lastError: null,
    progress: null,
    nextAttemptAt: null,
  };
  private readonly listeners = new Set<(status: SyncStatus) => void>();
  private running: Promise<void> | null = null;
  private again = false;
  private attempt = 0;
  private cancelRetry: (() => void) | null = null;
  private readonly schedule: NonNullable<EngineOptions['schedule']>;
  private readonly now: () => number;
  private readonly random: () => number;

  constructor(
    private readonly store: Store,
    private readonly api: SyncApi,
    options: EngineOptions = {},
  ) {
    this.schedule =
      options.schedule ??
      ((ms, run) => {
        const timer = setTimeout(run, ms);
        return () => clearTimeout(timer);
      });
    this.now = options.now ?? Date.now;
    this.random = options.random ?? Math.random;
  }

  get status(): SyncStatus {
    return this.current;
  }

  subscribe(listener: (status: SyncStatus) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  private update(change: Partial<SyncStatus>): void {
    this.current = { ...this.current, ...change };
    for (const listener of [...this.listeners]) listener(this.current);
  }

  /** Reads the stored session and the outbox counts (no network). */
  async refresh(): Promise<void> {
    const [session, counts, last] = await Promise.all([
      readSession(this.store),
      this.store.outboxCounts(),
      this.store.getMeta('lastSyncAt'),
    ]);
    this.update({
      user: session?.user ?? null,
      pending: counts.pending,
      attention: counts.attention,
      lastSuccessAt: typeof last === 'string' ? last : this.current.lastSuccessAt,
      ...(session
        ? this.current.phase === 'signed-out'
          ? { phase: 'idle' as const }
          : {}
        : { phase: 'signed-out' as const }),
    });
  }

  async signIn(user: string, passcode: string, deviceName: string): Promise<SignedInUser> {
    const device = { id: await this.store.deviceId(), name: deviceName };
    const response = await this.api.signIn({ user, passcode, device });
    const session: StoredSession = {
      token: response.token,
      user: response.user,
      device,
      signedInAt: new Date(this.now()).toISOString(),
    };
    await this.store.setMeta(SESSION_KEY, session);
    this.update({ user: response.user, phase: 'idle', lastError: null });
    void this.run('signed in');
    return response.user;
  }

  /** Signing out clears this tablet's sign-in; refused while records are still waiting to be sent (ASVS 14.3.1 vs no loss). */
  async signOut(): Promise<void> {
    const counts = await this.store.outboxCounts();
    if (counts.pending + counts.attention > 0) {
      throw new Error(
        `${counts.pending + counts.attention} records are still on this tablet only. Sync them (and resolve the ones needing attention) before signing out.`,
      );
    }
    try {
      await this.api.signOut();
    } catch (error) {
      // Offline or already revoked: the tablet forgets the token either way; the server expires or revokes it later.
      if (!(error instanceof SyncError)) throw error;
    }
    await this.store.setMeta(SESSION_KEY, null);
    this.update({ user: null, phase: 'signed-out' });
  }

  /** Runs one sync now, or once more right after the one in progress. */
  run(reason: string): Promise<void> {
    if (this.running) {
      this.again = true;
      return this.running;
    }
    this.cancelRetry?.();
    this.cancelRetry = null;
    this.running = (async () => {
      do {
        this.again = false;
        await this.cycle(reason);
      } while (this.again);
    })().finally(() => {
      this.running = null;
    });
    return this.running;
  }

  private async cycle(_reason: string): Promise<void> {
    const session = await readSession(this.store);
    if (!session) {
      await this.refresh();
      return;
    }
    try {
      this.update({
        phase: 'pushing',
        lastError: null,
        nextAttemptAt: null,
        progress: { label: 'Sending', done: 0, total: null },
      });
      await pushOutbox(this.store, this.api, {
        onProgress: (p) =>
          this.update({
            progress: { label: 'Sending', done: p.sent, total: p.total },
            pending: Math.max(0, p.total - p.sent),
          }),
      });
      this.update({ phase: 'pulling', progress: { label: 'Receiving', done: 0, total: null } });
      const config = await this.api.config();
      const local = await this.store.getConfig();
      if (!local || config.version > local.version) await this.store.putConfig(config);
      await pullAll(this.store, this.api, {
        onProgress: (p) => this.update({ progress: { label: 'Receiving', done: p.added, total: null } }),
      });
      const at = new Date(this.now()).toISOString();
      await this.store.setMeta('lastSyncAt', at);
      this.attempt = 0;
      this.update({ phase: 'idle', progress: null, lastSuccessAt: at });
    } catch (error) {
      const message = error instanceof Error ? error.message : String(error);
      if (error instanceof SyncError && error.code === 'unauthorized') {
        await this.store.setMeta(SESSION_KEY, null);
        this.update({
          phase: 'signed-out',
          user: null,
          progress: null,
          lastError: 'The sign-in ended: sign in again to send your records.',
        });
      } else if (error instanceof SyncError && error.retryable) {
        this.attempt += 1;
        const delay = backoffDelayMs(this.attempt, this.random);
        this.cancelRetry = this.schedule(delay, () => void this.run('retry'));
        this.update({
          phase: 'waiting',
          progress: null,
          lastError: message,
          nextAttemptAt: new Date(this.now() + delay).toISOString(),
        });
      } else {
        this.update({ phase: 'error', progress: null, lastError: message });
      }
    }
    const counts = await this.store.outboxCounts();
    this.update({ pending: counts.pending, attention: counts.attention });
  }

  /** Stops retries (page closing, tests). */
  stop(): void {
    this.cancelRetry?.();
    this.cancelRetry = null;
  }
}
