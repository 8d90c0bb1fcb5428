/**
 * The site server's sync API as the tablet calls it (page or service worker). Every failure becomes a SyncError
 * whose code says whether trying again later can help.
 */
import {
  PullResponse,
  PushResponse,
  type SessionRequest,
  SessionResponse,
  type SignedInUser,
  SiteConfig,
  type TypedEnvelope,
} from '../schema';

export type SyncErrorCode =
  | 'network'
  | 'timeout'
  | 'unauthorized'
  | 'forbidden'
  | 'throttled'
  | 'too-large'
  | 'bad-request'
  | 'conflict'
  | 'server'
  | 'malformed';

/** Network trouble, timeouts, throttling and server faults pass; the rest need a person or a change first. */
export const RETRYABLE: ReadonlySet<SyncErrorCode> = new Set([
  'network',
  'timeout',
  'throttled',
  'server',
  'malformed',
]);

export class SyncError extends Error {
  override readonly name = 'SyncError';
  constructor(
    readonly code: SyncErrorCode,
    message: string,
    readonly status?: number,
  ) {
    super(message);
  }

  get retryable(): boolean {
    return RETRYABLE.has(this.code);
  }
}

export interface ApiOptions {
  baseUrl?: string;
  fetch?: typeof fetch;
  /** The signed-in session's token, or null. */
  token: () => Promise<string | null>;
  timeoutMs?: number;
}

export interface SyncApi {
  signIn(request: SessionRequest): Promise<SessionResponse>;
  signOut(): Promise<void>;
  push(envelopes: TypedEnvelope[]): Promise<PushResponse>;
  pull(after: number, limit: number): Promise<PullResponse>;
  config(): Promise<SiteConfig>;
}

const STATUS_CODES: Record<number, SyncErrorCode> = {
  400: 'bad-request',
  401: 'unauthorized',
  403: 'forbidden',
  409: 'conflict',
  413: 'too-large',
  429: 'throttled',
};

async function serverMessage(response: Response): Promise<string> {
  try {
    const body = (await response.json()) as { error?: { message?: unknown } };
    if (typeof body.error?.message === 'string') return body.error.message;
  } catch {
    // Not JSON: the status says enough.
  }
  return `HTTP ${response.status}`;
}

export function createApi(options: ApiOptions): SyncApi {
  const fetchImpl = options.fetch ?? globalThis.fetch.bind(globalThis);
  const base = options.baseUrl ?? '';
  const timeoutMs = options.timeoutMs ?? 30_000;

  async function call(method: string, path: string, body?: unknown, auth = true): Promise<unknown> {
    const headers: Record<string, string> = { Accept: 'application/json' };
    if (body !== undefined) headers['Content-Type'] = 'application/json';
    if (auth) {
      const token = await options.token();
      if (!token) throw new SyncError('unauthorized', 'Not signed in on this tablet.');
      headers.Authorization = `Bearer ${token}`;
    }
    const controller = new AbortController();
    const timer = setTimeout(() => controller.abort(), timeoutMs);
    let response: Response;
    try {
      response = await fetchImpl(`${base}${path}`, {
        method,
        headers,
        cache: 'no-store',
        signal: controller.signal,
        ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      });
    } catch (error) {
      if (controller.signal.aborted)
        throw new SyncError('timeout', `The server did not answer within ${timeoutMs / 1000} s.`);
      throw new SyncError(
        'network',
        `The server cannot be reached: ${error instanceof Error ? error.message : String(error)}`,
      );
    } finally {
      clearTimeout(timer);
    }
    if (response.status === 204) return null;
    if (!response.ok) {
      const code = STATUS_CODES[response.status] ?? (response.status >= 500 ? 'server' : 'bad-request');
      throw new SyncError(code, await serverMessage(response), response.status);
    }
    try {
      return await response.json();
    } catch {
      throw new SyncError('malformed', `The server's answer to ${method} ${path} is not JSON.`, response.status);
    }
  }

  function checked<T>(
    schema: { safeParse: (v: unknown) => { success: true; data: T } | { success: false } },
    value: unknown,
    what: string,
  ): T {
    const result = schema.safeParse(value);
    if (!result.success) throw new SyncError('malformed', `The server's ${what} does not have the expected shape.`);
    return result.data;
  }

  return {
    async signIn(request) {
      return checked(SessionResponse, await call('POST', '/api/v1/sessions', request, false), 'sign-in answer');
    },
    async signOut() {
      await call('DELETE', '/api/v1/sessions/current');
    },
    async push(envelopes) {
      return checked(PushResponse, await call('POST', '/api/v1/records', { records: envelopes }), 'answer to the push');
    },
    async pull(after, limit) {
      return checked(PullResponse, await call('GET', `/api/v1/records?after=${after}&limit=${limit}`), 'records');
    },
    async config() {
      return checked(SiteConfig, await call('GET', '/api/v1/config'), 'site configuration');
    },
  };
}

export type { SignedInUser };
