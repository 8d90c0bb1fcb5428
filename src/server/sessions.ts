/**
 * Bearer tokens (RFC 6750) for signed-in devices. A token is 256 random bits, sent as base64url; the server keeps
 * only its SHA-256 and its first characters, so a copy of the database holds no usable token.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Context, MiddlewareHandler } from 'hono';
import type { Database } from './db';
import { ApiError, type Logger } from './errors';
import { isRole, type Role } from './roles';

const TOKEN_BYTES = 32;
/** 32 bytes in base64url without padding are 43 characters (RFC 4648 section 5). */
const TOKEN_PATTERN = /^[A-Za-z0-9_-]{43}$/;
/** Characters of the token kept to tell sessions apart in the database and logs. */
export const TOKEN_PREFIX_LENGTH = 6;
/** A session unused for this long ends; the tablet signs in again (its unsent records stay in its outbox). */
export const SESSION_IDLE_MS = 30 * 86_400_000;
/** last_used_at is written at most this often per session, so reads do not each cost a disk sync. */
const TOUCH_INTERVAL_MS = 60_000;

export const REALM = 'crankhouse';

export interface Principal {
  userId: string;
  name: string;
  roles: Role[];
  deviceId: string;
  tokenSha256: string;
  tokenPrefix: string;
}

export type AuthEnv = { Variables: { principal: Principal } };

export function newToken(): { token: string; sha256: string; prefix: string } {
  const token = randomBytes(TOKEN_BYTES).toString('base64url');
  return { token, sha256: sha256Hex(token), prefix: token.slice(0, TOKEN_PREFIX_LENGTH) };
}

function sha256Hex(text: string): string {
  return createHash('sha256').update(text).digest('hex');
}

interface SessionRow {
  user_id: string;
  name: string;
  roles: string;
  disabled: number;
  device_id: string;
  token_prefix: string;
  last_used_at: string;
  revoked_at: string | null;
}

type Rejection = 'missing' | 'malformed' | 'unknown' | 'revoked' | 'expired' | 'disabled';

const REJECTION_MESSAGES: Record<Rejection, string> = {
  missing: 'Sign in first: send the token as "Authorization: Bearer <token>"',
  malformed: 'The Authorization header is not a Crankhouse bearer token; sign in again',
  unknown: 'The session is not known here; sign in again',
  revoked: 'The session has ended; sign in again',
  expired: 'The session expired after 30 days without use; sign in again',
  disabled: 'The session has ended; sign in again',
};

/** Sessions in SQLite, with their statements prepared once. */
export class SessionStore {
  private readonly insert;
  private readonly lookup;
  private readonly touch;
  private readonly revoke;

  constructor(db: Database) {
    this.insert = db.prepare(
      `INSERT INTO sessions (token_sha256, token_prefix, user_id, device_id, device_name, created_at, last_used_at)
       VALUES (?, ?, ?, ?, ?, ?, ?)`,
    );
    this.lookup = db.prepare<[string], SessionRow>(
      `SELECT s.user_id, u.name, u.roles, u.disabled, s.device_id, s.token_prefix, s.last_used_at, s.revoked_at
       FROM sessions s JOIN users u ON u.id = s.user_id WHERE s.token_sha256 = ?`,
    );
    this.touch = db.prepare('UPDATE sessions SET last_used_at = ? WHERE token_sha256 = ?');
    this.revoke = db.prepare('UPDATE sessions SET revoked_at = ? WHERE token_sha256 = ? AND revoked_at IS NULL');
  }

  /** Starts a session and returns the token; the token itself is never stored. */
  create(userId: string, device: { id: string; name: string }, now: Date): string {
    const { token, sha256, prefix } = newToken();
    const at = now.toISOString();
    this.insert.run(sha256, prefix, userId, device.id, device.name, at, at);
    return token;
  }

  /** The person behind a presented token, or why it is refused. */
  resolve(token: string, now: Date): Principal | Rejection {
    if (!TOKEN_PATTERN.test(token)) return 'malformed';
    const sha256 = sha256Hex(token);
    const row = this.lookup.get(sha256);
    if (!row) return 'unknown';
    if (row.revoked_at !== null) return 'revoked';
    if (row.disabled === 1) return 'disabled';
    const lastUsed = Date.parse(row.last_used_at);
    if (now.getTime() - lastUsed > SESSION_IDLE_MS) return 'expired';
    if (now.getTime() - lastUsed > TOUCH_INTERVAL_MS) this.touch.run(now.toISOString(), sha256);
    const roles = (JSON.parse(row.roles) as unknown[]).filter(isRole);
    return {
      userId: row.user_id,
      name: row.name,
      roles,
      deviceId: row.device_id,
      tokenSha256: sha256,
      tokenPrefix: row.token_prefix,
    };
  }

  end(tokenSha256: string, now: Date): void {
    this.revoke.run(now.toISOString(), tokenSha256);
  }
}

/** The token from `Authorization: Bearer <token>` (the scheme name is case-insensitive, RFC 9110 section 11.1). */
function bearerToken(header: string | undefined): string | null | undefined {
  if (header === undefined) return undefined;
  const match = /^Bearer +(\S+) *$/i.exec(header);
  return match?.[1] ?? null;
}

export function clientAddress(c: Context): string {
  const env = c.env as { incoming?: { socket?: { remoteAddress?: string } } } | undefined;
  return env?.incoming?.socket?.remoteAddress ?? 'unknown';
}

export interface AuthOptions {
  sessions: SessionStore;
  log: Logger;
  now: () => Date;
}

/**
 * Requires a valid bearer token, and when `roles` is given, at least one of those roles. 401 carries a
 * WWW-Authenticate challenge (RFC 6750 section 3); 403 says which roles may. Both are logged with a UTC time.
 */
export function requireAuth(options: AuthOptions, roles?: readonly Role[]): MiddlewareHandler<AuthEnv> {
  return async (c, next) => {
    const now = options.now();
    const token = bearerToken(c.req.header('Authorization'));
    const result: Principal | Rejection =
      token === undefined ? 'missing' : token === null ? 'malformed' : options.sessions.resolve(token, now);
    if (typeof result === 'string') {
      options.log({
        time: now.toISOString(),
        level: 'warn',
        event: 'auth-refused',
        reason: result,
        method: c.req.method,
        path: c.req.path,
        address: clientAddress(c),
      });
      const challenge =
        result === 'missing' ? `Bearer realm="${REALM}"` : `Bearer realm="${REALM}", error="invalid_token"`;
      throw new ApiError(401, 'E_UNAUTHORIZED', REJECTION_MESSAGES[result], {
        headers: { 'WWW-Authenticate': challenge },
      });
    }
    if (roles && !result.roles.some((role) => roles.includes(role))) {
      options.log({
        time: now.toISOString(),
        level: 'warn',
        event: 'forbidden',
        user: result.userId,
        roles: result.roles,
        method: c.req.method,
        path: c.req.path,
      });
      throw new ApiError(
        403,
        'E_FORBIDDEN',
        `${c.req.method} ${c.req.path} is for ${roles.join(' or ')}; you are signed in as ${result.roles.join(', ') || 'no role'}`,
      );
    }
    c.set('principal', result);
    await next();
  };
}

/** Counts failed sign-ins per user id and per client address in a sliding window, in memory. */
export class SignInThrottle {
  private readonly failures = new Map<string, number[]>();

  constructor(
    readonly limits: { perUser: number; perAddress: number; windowMs: number } = {
      perUser: 5,
      perAddress: 20,
      windowMs: 15 * 60_000,
    },
    private readonly maxKeys = 10_000,
  ) {}

  private recent(key: string, nowMs: number): number[] {
    const times = (this.failures.get(key) ?? []).filter((t) => nowMs - t < this.limits.windowMs);
    if (times.length === 0) this.failures.delete(key);
    else this.failures.set(key, times);
    return times;
  }

  /** Milliseconds until another try is allowed, or 0 when it is allowed now. */
  retryAfterMs(userId: string, address: string, nowMs: number): number {
    let wait = 0;
    for (const [key, limit] of [
      [`user:${userId}`, this.limits.perUser],
      [`address:${address}`, this.limits.perAddress],
    ] as const) {
      const times = this.recent(key, nowMs);
      if (times.length >= limit) {
        const oldest = times[times.length - limit] ?? nowMs;
        wait = Math.max(wait, oldest + this.limits.windowMs - nowMs);
      }
    }
    return wait;
  }

  fail(userId: string, address: string, nowMs: number): void {
    for (const key of [`user:${userId}`, `address:${address}`]) {
      const times = this.recent(key, nowMs);
      times.push(nowMs);
      this.failures.delete(key);
      this.failures.set(key, times);
    }
    // Oldest keys go first when an attacker sprays many names: the map stays bounded.
    while (this.failures.size > this.maxKeys) {
      const first = this.failures.keys().next().value;
      if (first === undefined) break;
      this.failures.delete(first);
    }
  }

  /** A correct passcode clears the user's count (not the address's, which one account could otherwise reset). */
  succeed(userId: string): void {
    this.failures.delete(`user:${userId}`);
  }
}
