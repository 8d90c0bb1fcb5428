/** A fresh app on a fresh temp database with the demo people signed up, and builders for valid records. */
import { randomUUID } from 'node:crypto';
import { join } from 'node:path';
import type { Hono } from 'hono';
import { DEMO_PEOPLE, demoConfig, demoHistory } from '../../src/demo';
import { envelopeFor, type FinishedRound, type TypedEnvelope } from '../../src/schema';
import { createApp } from '../../src/server/app';
import { type Database, openDatabase } from '../../src/server/db';
import type { LogEntry } from '../../src/server/errors';
import { insertConfig } from '../../src/server/records';
import type { Role } from '../../src/server/roles';
import type { SignInThrottle } from '../../src/server/sessions';
import { createUsers, type ScryptCost } from '../../src/server/users';
import { makeTempDir, writeFakeDist } from './fixtures';

/**
 * A cheap scrypt cost for fixture users, so each test can make five of them quickly; the real cost is tested in
 * sessions.test.ts. Each stored hash keeps its own cost, so sign-in works the same way.
 */
export const FIXTURE_COST: ScryptCost = { N: 2 ** 10, r: 8, p: 1 };

export const PASSCODE = '246810';

export interface Person {
  id: string;
  name: string;
  roles: Role[];
}

export const PEOPLE = {
  operator: { ...DEMO_PEOPLE.operator, roles: ['operator'] },
  operator2: { ...DEMO_PEOPLE.operator2, roles: ['operator'] },
  mechanic: { ...DEMO_PEOPLE.mechanic, roles: ['mechanic'] },
  supervisor: { ...DEMO_PEOPLE.supervisor, roles: ['supervisor'] },
  admin: { ...DEMO_PEOPLE.admin, roles: ['admin'] },
} as const satisfies Record<string, Person>;

export type PersonKey = keyof typeof PEOPLE;

/** The device each person signs in from in these tests. */
export const DEVICE: Record<PersonKey, string> = {
  operator: 'tablet-1',
  operator2: 'tablet-3',
  mechanic: 'tablet-2',
  supervisor: 'office-1',
  admin: 'office-2',
};

export interface ApiFixture {
  app: Hono;
  db: Database;
  dataDir: string;
  logged: LogEntry[];
  clock: { now: Date };
  close(): void;
}

export const START = new Date('2026-12-01T08:00:00Z');

export async function makeApi(
  options: { config?: boolean; throttle?: SignInThrottle; people?: boolean } = {},
): Promise<ApiFixture> {
  const temp = makeTempDir('api');
  const distDir = join(temp.path, 'dist');
  writeFakeDist(distDir);
  const dataDir = join(temp.path, 'data');
  const db = openDatabase(dataDir);
  if (options.config !== false) insertConfig(db, demoConfig(), START.toISOString());
  if (options.people !== false) {
    await createUsers(
      db,
      Object.values(PEOPLE).map((person) => ({ ...person, passcode: PASSCODE })),
      { cost: FIXTURE_COST },
    );
  }
  const logged: LogEntry[] = [];
  const clock = { now: START };
  const app = createApp({
    db,
    distDir,
    version: '1.2.3-test',
    siteName: 'Test Flats',
    log: (entry) => logged.push(entry),
    now: () => clock.now,
    ...(options.throttle ? { throttle: options.throttle } : {}),
  });
  return {
    app,
    db,
    dataDir,
    logged,
    clock,
    close: () => {
      if (db.open) db.close();
      temp.remove();
    },
  };
}

export interface CallOptions {
  token?: string;
  body?: unknown;
  /** Sent as is instead of JSON.stringify(body). */
  raw?: string;
  address?: string;
}

/** One API call through app.request; `address` plays the client's socket address. */
export function call(app: Hono, method: string, path: string, options: CallOptions = {}): Promise<Response> {
  const headers: Record<string, string> = {};
  if (options.token !== undefined) headers.Authorization = `Bearer ${options.token}`;
  let body: string | undefined;
  if (options.raw !== undefined) body = options.raw;
  else if (options.body !== undefined) body = JSON.stringify(options.body);
  if (body !== undefined) headers['Content-Type'] = 'application/json';
  const env = options.address ? { incoming: { socket: { remoteAddress: options.address } } } : undefined;
  return Promise.resolve(app.request(`http://localhost${path}`, { method, headers, body }, env));
}

export async function signIn(app: Hono, who: PersonKey, passcode = PASSCODE): Promise<string> {
  const res = await call(app, 'POST', '/api/v1/sessions', {
    body: { user: who, passcode, device: { id: DEVICE[who], name: `${who}'s tablet` } },
  });
  if (res.status !== 201) throw new Error(`sign-in of ${who} answered ${res.status}: ${await res.text()}`);
  return ((await res.json()) as { token: string }).token;
}

export interface PushResult {
  id: string;
  status: 'stored' | 'duplicate' | 'conflict' | 'rejected';
  seq?: number;
  error?: string;
}

export async function push(app: Hono, token: string, records: unknown[]): Promise<PushResult[]> {
  const res = await call(app, 'POST', '/api/v1/records', { token, body: { records } });
  if (res.status !== 200) throw new Error(`push answered ${res.status}: ${await res.text()}`);
  return ((await res.json()) as { results: PushResult[] }).results;
}

const AT = '2026-12-01T09:00:00Z';

export function note(who: PersonKey, options: { roundId?: string; text?: string; at?: string } = {}): TypedEnvelope {
  const person = PEOPLE[who];
  const id = randomUUID();
  return envelopeFor(
    'note',
    {
      id,
      roundId: options.roundId ?? randomUUID(),
      by: { id: person.id, name: person.name },
      at: options.at ?? AT,
      text: options.text ?? 'Oil sight glass on K-101 frame reads half full; topped up.',
    },
    { author: person.id, device: DEVICE[who], createdAt: options.at ?? AT },
  );
}

export function lockoutAck(who: PersonKey): TypedEnvelope {
  const person = PEOPLE[who];
  return envelopeFor(
    'lockoutAck',
    {
      id: randomUUID(),
      task: { kind: 'valveChange', machineId: 'K-101', ref: 'C1-HE-D2' },
      cautionSetId: 'open-machine',
      configVersion: 1,
      by: { id: person.id, name: person.name },
      acknowledgements: [{ cautionId: 'permit', at: AT }],
      completedAt: AT,
    },
    { author: person.id, device: DEVICE[who], createdAt: AT },
  );
}

export function valveChange(who: PersonKey): TypedEnvelope {
  const person = PEOPLE[who];
  return envelopeFor(
    'valveChange',
    {
      id: randomUUID(),
      machineId: 'K-101',
      valvePositionId: 'C1-HE-D2',
      at: AT,
      by: { id: person.id, name: person.name },
      reason: 'failure',
      removedValveId: 'DV-1',
      installedValveId: 'DV-2',
      asFound: ['broken plate'],
      partsFitted: ['complete valve'],
      lockoutAckId: randomUUID(),
    },
    { author: person.id, device: DEVICE[who], createdAt: AT },
  );
}

export function review(
  who: PersonKey,
  target: { roundId: string; findingKey: string },
  options: { at?: string; disposition?: 'acknowledged' | 'actionRaised' | 'monitor' | 'falseAlarm' } = {},
): TypedEnvelope {
  const person = PEOPLE[who];
  const at = options.at ?? AT;
  return envelopeFor(
    'review',
    {
      id: randomUUID(),
      findingKey: target.findingKey,
      roundId: target.roundId,
      by: { id: person.id, name: person.name },
      disposition: options.disposition ?? 'acknowledged',
      comment: 'Seen; valve change planned for the next stop.',
      at,
    },
    { author: person.id, device: DEVICE[who], createdAt: at },
  );
}

let cachedRounds: FinishedRound[] | undefined;

/** The demo site's rounds (ending 2026-11-30), computed once per test file. */
export function demoRounds(): FinishedRound[] {
  cachedRounds ??= demoHistory({ end: '2026-11-30T00:00:00Z', days: 15 }).rounds;
  return cachedRounds;
}

/** A demo round as made by `who` on their device, with fresh ids for the round and its readings and findings. */
export function roundBy(who: PersonKey, source: FinishedRound): TypedEnvelope<'round'> {
  const person = PEOPLE[who];
  const roundId = randomUUID();
  const body: FinishedRound = {
    round: { ...source.round, id: roundId, by: { id: person.id, name: person.name }, deviceId: DEVICE[who] },
    readings: source.readings.map((reading) => ({ ...reading, id: randomUUID(), roundId })),
    findings: source.findings.map((finding) => ({
      ...finding,
      roundId,
      key: finding.key.replace(source.round.id, roundId),
    })),
  };
  return envelopeFor('round', body, {
    author: person.id,
    device: DEVICE[who],
    createdAt: source.round.finishedAt ?? AT,
  });
}

/**
 * Every table of the server database with a literal query for its rows (SQL cannot bind a table name, and no SQL
 * is built from strings). `tablesOf` lets a test notice a table that is missing here.
 */
export const TABLE_DUMPS: Readonly<Record<string, string>> = {
  conflicts: 'SELECT * FROM conflicts',
  finding_mismatches: 'SELECT * FROM finding_mismatches',
  finding_reviews: 'SELECT * FROM finding_reviews',
  records: 'SELECT * FROM records',
  schema_migrations: 'SELECT * FROM schema_migrations',
  server_findings: 'SELECT * FROM server_findings',
  server_meta: 'SELECT * FROM server_meta',
  server_rounds: 'SELECT * FROM server_rounds',
  sessions: 'SELECT * FROM sessions',
  site_configs: 'SELECT * FROM site_configs',
  sqlite_sequence: 'SELECT * FROM sqlite_sequence',
  users: 'SELECT * FROM users',
};

export function tablesOf(db: Database): string[] {
  return db.prepare("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name").pluck().all() as string[];
}

export function dumpTables(db: Database): Record<string, unknown[]> {
  const dump: Record<string, unknown[]> = {};
  for (const [table, sql] of Object.entries(TABLE_DUMPS)) dump[table] = db.prepare(sql).all();
  return dump;
}

export function countRows(db: Database): Record<string, number> {
  const counts: Record<string, number> = {};
  for (const [table, rows] of Object.entries(dumpTables(db))) counts[table] = rows.length;
  return counts;
}
