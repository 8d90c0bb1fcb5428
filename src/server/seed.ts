/**
 * First start: an empty database gets the invented demo site, its history (with the server's own findings of every
 * round) and five demo people who can sign in, so that a new installation shows something to explore. Skipped when
 * a configuration exists, or when CRANKHOUSE_DEMO=0.
 */
import { randomInt } from 'node:crypto';
import { DEMO_PEOPLE, demoEnvelopes, demoHistory } from '../demo';
import type { Database } from './db';
import type { Logger } from './errors';
import { Ingestor } from './ingest';
import { insertConfig, latestConfig } from './records';
import type { Role } from './roles';
import { hashUsers, insertUsers, type NewUser, PasscodeChecker } from './users';

export interface DemoSignIn {
  user: string;
  name: string;
  roles: Role[];
  passcode: string;
}

export interface SeedResult {
  seeded: boolean;
  records: number;
  /** The demo people created now, with their passcodes (shown once, never stored). */
  signIns: DemoSignIn[];
}

export interface SeedOptions {
  now?: Date;
  /** One passcode for every demo person (CRANKHOUSE_DEMO_PASSCODE); otherwise a random 6-digit one each. */
  passcode?: string;
  log?: Logger;
}

/** The demo people and their roles, in the order they are printed. */
export const DEMO_USERS: ReadonlyArray<{ id: string; name: string; roles: Role[] }> = [
  { ...DEMO_PEOPLE.operator, roles: ['operator'] },
  { ...DEMO_PEOPLE.operator2, roles: ['operator'] },
  { ...DEMO_PEOPLE.mechanic, roles: ['mechanic'] },
  { ...DEMO_PEOPLE.supervisor, roles: ['supervisor'] },
  { ...DEMO_PEOPLE.admin, roles: ['admin'] },
];

const META_SEEDED_AT = 'demo_seeded_at';

/** A random 6-digit passcode from the CSPRNG (leading zeros kept). */
export function randomPasscode(): string {
  return String(randomInt(0, 1_000_000)).padStart(6, '0');
}

/**
 * Seeds the demo site with a history that ends at the start of `now`'s day (UTC), and the demo people. Passcodes
 * are hashed first; then everything is written in one transaction.
 */
export async function seedDemoSite(db: Database, options: SeedOptions = {}): Promise<SeedResult> {
  const unseeded: SeedResult = { seeded: false, records: 0, signIns: [] };
  if (latestConfig(db)) return unseeded;
  const now = options.now ?? new Date();
  const end = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate())).toISOString();
  const history = demoHistory({ end });
  const people: NewUser[] = DEMO_USERS.map((person) => ({
    ...person,
    passcode: options.passcode ?? randomPasscode(),
  }));
  const hashed = await hashUsers(people);
  const receivedAt = now.toISOString();
  const ingestor = new Ingestor(db, options.log ?? (() => {}));
  return db.transaction((): SeedResult => {
    if (latestConfig(db)) return unseeded;
    insertConfig(db, history.config, receivedAt);
    // Everything is validated exactly as if a device had sent it; each round gets the server's findings.
    const results = ingestor.ingestTrusted(demoEnvelopes(history), receivedAt);
    const inserted = insertUsers(db, hashed, receivedAt);
    db.prepare('INSERT INTO server_meta (key, value) VALUES (?, ?) ON CONFLICT (key) DO NOTHING').run(
      META_SEEDED_AT,
      receivedAt,
    );
    return {
      seeded: true,
      records: results.filter((result) => result.status === 'stored').length,
      signIns: people
        .filter((person) => inserted.includes(person.id))
        .map((person) => ({ user: person.id, name: person.name, roles: [...person.roles], passcode: person.passcode })),
    };
  })();
}

/** `Demo sign-ins: operator / 123456, …` for the first start. */
export function formatSignIns(signIns: readonly DemoSignIn[]): string {
  return `Demo sign-ins: ${signIns.map((s) => `${s.user} / ${s.passcode}`).join(', ')}`;
}

/**
 * What a later start says about the demo sign-ins: that the passcodes were shown at the first start, or, when
 * `passcode` (CRANKHOUSE_DEMO_PASSCODE) still opens the first demo account, that it is the one to use. Null when
 * the demo people were never seeded here.
 */
export async function laterStartSignIns(db: Database, passcode: string | undefined): Promise<string | null> {
  const seededAt = db.prepare('SELECT value FROM server_meta WHERE key = ?').pluck().get(META_SEEDED_AT);
  if (typeof seededAt !== 'string') return null;
  const ids = DEMO_USERS.map((user) => user.id).join(', ');
  if (passcode !== undefined) {
    const first = DEMO_USERS[0]?.id ?? 'operator';
    const check = await new PasscodeChecker(db).check(first, passcode);
    if (check.ok) return `Demo sign-ins: ${ids}, with the passcode set in CRANKHOUSE_DEMO_PASSCODE`;
  }
  return `Demo sign-ins: ${ids}; their passcodes were shown when the demo was seeded at first start (${seededAt})`;
}
