/**
 * People and their passcodes. A passcode is kept only as a scrypt hash with its own random salt; checking one takes
 * the same work whether or not the user exists, so the answer time does not tell which user ids are real.
 */
import { randomBytes, type ScryptOptions, scrypt, timingSafeEqual } from 'node:crypto';
import type { Database } from './db';
import { isRole, ROLES, type Role } from './roles';

/**
 * scrypt cost: N = 2^14, r = 8, p = 5 is one of the equivalent minimum settings in the OWASP Password Storage Cheat
 * Sheet (the others trade memory for passes); it needs 16 MiB per hash, so four sign-ins at once stay small.
 */
export const SCRYPT_COST = { N: 2 ** 14, r: 8, p: 5 } as const;
const KEY_BYTES = 32;
const SALT_BYTES = 16;
/** Passcodes longer than this are refused before any hashing (a guard against very long inputs). */
export const MAX_PASSCODE_LENGTH = 64;

export interface ScryptCost {
  N: number;
  r: number;
  p: number;
}

export interface User {
  id: string;
  name: string;
  roles: Role[];
  disabled: boolean;
}

interface UserRow {
  id: string;
  name: string;
  roles: string;
  passcode_salt: Buffer;
  passcode_hash: Buffer;
  passcode_scrypt: string;
  disabled: number;
}

function derive(passcode: string, salt: Buffer, cost: ScryptCost): Promise<Buffer> {
  const options: ScryptOptions = { N: cost.N, r: cost.r, p: cost.p, maxmem: 256 * cost.N * cost.r + 1024 * 1024 };
  return new Promise((resolve, reject) => {
    scrypt(passcode.normalize('NFC'), salt, KEY_BYTES, options, (err, key) => (err ? reject(err) : resolve(key)));
  });
}

export async function hashPasscode(
  passcode: string,
  cost: ScryptCost = SCRYPT_COST,
): Promise<{ salt: Buffer; hash: Buffer; cost: ScryptCost }> {
  const salt = randomBytes(SALT_BYTES);
  return { salt, hash: await derive(passcode, salt, cost), cost };
}

function parseRoles(text: string): Role[] {
  const value: unknown = JSON.parse(text);
  return Array.isArray(value) ? value.filter(isRole) : [];
}

function toUser(row: UserRow): User {
  return { id: row.id, name: row.name, roles: parseRoles(row.roles), disabled: row.disabled === 1 };
}

export interface NewUser {
  id: string;
  name: string;
  roles: readonly Role[];
  passcode: string;
}

/** Validates a new user; throws an Error saying what is wrong. */
function checkNewUser(user: NewUser): void {
  if (!/^[A-Za-z0-9][A-Za-z0-9._-]{0,63}$/.test(user.id)) {
    throw new Error(`User id "${user.id}" must be 1-64 letters, digits, dot, dash or underscore`);
  }
  if (user.name.trim() === '' || user.name.length > 200) throw new Error('A user name has 1 to 200 characters');
  if (user.roles.length === 0 || !user.roles.every(isRole)) {
    throw new Error(`Roles must be one or more of ${ROLES.join(', ')}`);
  }
  if (user.passcode.length < 6 || user.passcode.length > MAX_PASSCODE_LENGTH) {
    throw new Error(`A passcode has 6 to ${MAX_PASSCODE_LENGTH} characters`);
  }
}

export interface HashedUser {
  id: string;
  name: string;
  roles: Role[];
  salt: Buffer;
  hash: Buffer;
  cost: ScryptCost;
}

/**
 * Checks new users and hashes their passcodes (slow, off the event loop); nothing is written yet. `cost` is for tests
 * and benches that make many users; each hash keeps the cost it was made with.
 */
export async function hashUsers(users: readonly NewUser[], cost: ScryptCost = SCRYPT_COST): Promise<HashedUser[]> {
  users.forEach(checkNewUser);
  return Promise.all(
    users.map(async (user) => ({
      id: user.id,
      name: user.name.trim(),
      roles: [...new Set(user.roles)],
      ...(await hashPasscode(user.passcode, cost)),
    })),
  );
}

/** Inserts hashed users, skipping ids that exist; returns the ids inserted. Call inside a transaction. */
export function insertUsers(db: Database, users: readonly HashedUser[], createdAt: string): string[] {
  const insert = db.prepare(
    `INSERT INTO users (id, name, roles, passcode_salt, passcode_hash, passcode_scrypt, disabled, created_at)
     VALUES (?, ?, ?, ?, ?, ?, 0, ?) ON CONFLICT (id) DO NOTHING`,
  );
  return users
    .filter(
      (user) =>
        insert.run(
          user.id,
          user.name,
          JSON.stringify(user.roles),
          user.salt,
          user.hash,
          JSON.stringify(user.cost),
          createdAt,
        ).changes === 1,
    )
    .map((user) => user.id);
}

/** Creates users in one transaction; throws if any id is taken. */
export async function createUsers(
  db: Database,
  users: readonly NewUser[],
  options: { createdAt?: string; cost?: ScryptCost } = {},
): Promise<void> {
  const hashed = await hashUsers(users, options.cost);
  const createdAt = options.createdAt ?? new Date().toISOString();
  db.transaction(() => {
    const inserted = insertUsers(db, hashed, createdAt);
    if (inserted.length !== hashed.length) {
      throw new Error(`User ${hashed.find((user) => !inserted.includes(user.id))?.id} already exists`);
    }
  })();
}

export function createUser(db: Database, user: NewUser, options: { createdAt?: string; cost?: ScryptCost } = {}) {
  return createUsers(db, [user], options);
}

/** Disables (or enables) a user; disabling ends every session they hold (a trigger in migration 003). */
export function setUserDisabled(db: Database, id: string, disabled: boolean): boolean {
  return db.prepare('UPDATE users SET disabled = ? WHERE id = ?').run(disabled ? 1 : 0, id).changes === 1;
}

export function userCount(db: Database): number {
  return (db.prepare('SELECT count(*) AS n FROM users').get() as { n: number }).n;
}

/** Checks passcodes against stored hashes. One per app: the statement is prepared once. */
export class PasscodeChecker {
  private readonly byId;
  private readonly dummySalt = randomBytes(SALT_BYTES);

  constructor(db: Database) {
    this.byId = db.prepare<[string], UserRow>(
      'SELECT id, name, roles, passcode_salt, passcode_hash, passcode_scrypt, disabled FROM users WHERE id = ?',
    );
  }

  /**
   * The user when the passcode is theirs and they may sign in; otherwise why not. An unknown user costs one scrypt
   * run too, so the time taken does not reveal whether the id exists.
   */
  async check(
    userId: string,
    passcode: string,
  ): Promise<{ ok: true; user: User } | { ok: false; reason: 'unknown-user' | 'wrong-passcode' | 'disabled' }> {
    const row = this.byId.get(userId);
    if (!row) {
      await derive(passcode, this.dummySalt, SCRYPT_COST);
      return { ok: false, reason: 'unknown-user' };
    }
    const cost = JSON.parse(row.passcode_scrypt) as ScryptCost;
    const key = await derive(passcode, row.passcode_salt, cost);
    const stored = row.passcode_hash;
    if (key.length !== stored.length || !timingSafeEqual(key, stored)) return { ok: false, reason: 'wrong-passcode' };
    if (row.disabled === 1) return { ok: false, reason: 'disabled' };
    return { ok: true, user: toUser(row) };
  }
}
