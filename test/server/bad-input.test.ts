/**
 * The bad input catalogue: generated malformed and hostile bodies against every endpoint that takes a body. Each
 * must get a 4xx (or, for a batch, 200 with every record rejected), never a 5xx; nothing stored may change; and the
 * server must still answer afterwards. source: OWASP ASVS 5.0 2.2.1 and 2.2.2 (input validated against a positive
 * allow-list on the server), 1.2.4 (parameterised queries), 16.3.3 (rejections logged).
 */
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { demoConfig } from '../../src/demo';
import { type ApiFixture, call, countRows, lockoutAck, makeApi, note, signIn } from './api-fixtures';

const RUNS = { records: 600, sessions: 250, config: 250 };

let api: ApiFixture;
let tokens: { operator: string; admin: string };
let before: Record<string, number>;

beforeAll(async () => {
  api = await makeApi();
  tokens = { operator: await signIn(api.app, 'operator'), admin: await signIn(api.app, 'admin') };
  before = countRows(api.db);
});
afterAll(() => api.close());

/** Keys that have hurt JavaScript servers: prototype pollution and names of built-in members. */
const HOSTILE_KEYS = ['__proto__', 'constructor', 'prototype', 'toString', 'hasOwnProperty', 'seq', "id'--", ''];

function deep(levels: number): unknown {
  let value: unknown = [];
  for (let i = 0; i < levels; i += 1) value = [value];
  return value;
}

const hostileString = fc.oneof(
  fc.constantFrom(
    "'; DROP TABLE records; --",
    "1' OR '1'='1",
    '" OR ""="',
    "x'); DELETE FROM sessions; --",
    'NaN',
    'Infinity',
    '-Infinity',
    '1e309',
    '-0',
    'null',
    'undefined',
    'true',
    '__proto__',
    'constructor',
    '../../../etc/passwd',
    '<script>alert(1)</script>',
    '\u0000',
    '\ud800',
    '\u202e',
    '2026-02-30T25:61:00Z',
    '2026-12-01',
    '2026-12-01T08:00:00',
    '00000000-0000-0000-0000-00000000000g',
    '{00000000-0000-4000-8000-000000000000}',
    'not-a-uuid',
    '',
    ' ',
  ),
  fc.string({ maxLength: 40 }),
  fc.string({ unit: 'binary', maxLength: 40 }),
  fc.integer({ min: 5000, max: 70_000 }).map((n) => 'A'.repeat(n)),
);

/** A JSON value whose own key is "__proto__" (an object literal would set the prototype instead). */
const protoObject = fc.constantFrom(
  JSON.parse('{"__proto__": {"polluted": true}}'),
  JSON.parse('{"constructor": {"prototype": {"polluted": true}}}'),
);

const hostileValue: fc.Arbitrary<unknown> = fc.oneof(
  hostileString,
  fc.integer(),
  fc.double(),
  fc.constantFrom(0, -1, 1.5, 2 ** 53, -(2 ** 63), Number.MAX_VALUE, true, false, null),
  fc.array(fc.anything(), { maxLength: 5 }),
  fc.object({ maxDepth: 3 }),
  protoObject,
  fc.integer({ min: 10, max: 80 }).map(deep),
);

type Json = Record<string, unknown>;

/** Paths to every value inside a JSON object (objects and arrays included). */
function paths(value: unknown, prefix: Array<string | number> = []): Array<Array<string | number>> {
  if (value === null || typeof value !== 'object') return [prefix];
  const entries = Array.isArray(value) ? value.map((v, i) => [i, v] as const) : Object.entries(value);
  return [prefix, ...entries.flatMap(([key, child]) => paths(child, [...prefix, key]))];
}

function setAt(root: Json, path: Array<string | number>, change: (parent: Json, key: string | number) => void): Json {
  const copy = structuredClone(root);
  let parent: Json = copy;
  for (const key of path.slice(0, -1)) parent = parent[key as string] as Json;
  const last = path.at(-1);
  if (last !== undefined) change(parent, last);
  return copy;
}

function withKey(target: Json, key: string, value: unknown): Json {
  // defineProperty makes an own "__proto__" key, as JSON.parse would.
  Object.defineProperty(target, key, { value, enumerable: true, configurable: true, writable: true });
  return target;
}

/**
 * A record made invalid one way: a field removed, a field of fixed format replaced by a hostile value, an unknown
 * (hostile) key added, or the whole record replaced. The note's text may also carry SQL.
 */
function brokenRecord(fixed: string[]): fc.Arbitrary<unknown> {
  const base = fc.oneof(
    fc.constant(null).map(() => note('operator') as unknown as Json),
    fc.constant(null).map(() => lockoutAck('operator') as unknown as Json),
  );
  return fc.oneof(
    fc.tuple(base, fc.constantFrom(...fixed)).map(([record, path]) =>
      setAt(record, path.split('.'), (parent, key) => {
        delete parent[key as string];
      }),
    ),
    fc
      .tuple(base, fc.constantFrom(...fixed), hostileValue)
      .filter(([, path, value]) => !(path === 'schema' && value === 1))
      .map(([record, path, value]) =>
        setAt(record, path.split('.'), (parent, key) => {
          parent[key as string] = value;
        }),
      ),
    fc
      .tuple(base, fc.constantFrom('', 'body', 'body.by'), fc.constantFrom(...HOSTILE_KEYS), hostileValue)
      .map(([record, where, key, value]) => {
        const copy = structuredClone(record);
        const target = where === '' ? copy : (where.split('.').reduce((o, k) => o[k] as Json, copy) as Json);
        withKey(target, key, value);
        if (copy.type === 'note') (copy.body as Json).text = "Robert'); DROP TABLE records;--";
        return copy;
      }),
    hostileValue,
  );
}

const RECORD_FIELDS = [
  'id',
  'type',
  'schema',
  'author',
  'device',
  'createdAt',
  'body',
  'body.id',
  'body.by',
  'body.by.id',
];

type Sent = { raw: string } | { body: unknown };

const recordsBody: fc.Arbitrary<Sent> = fc.oneof(
  {
    weight: 6,
    arbitrary: fc
      .array(brokenRecord(RECORD_FIELDS), { minLength: 1, maxLength: 5 })
      .map((records) => ({ body: { records } })),
  },
  { weight: 1, arbitrary: hostileValue.map((records) => ({ body: { records } })) },
  { weight: 1, arbitrary: fc.anything().map((body) => ({ body })) },
  {
    weight: 1,
    arbitrary: fc.tuple(fc.constantFrom(...HOSTILE_KEYS), hostileValue).map(([key, value]) => ({
      body: withKey({ records: [] }, key === '' ? 'records ' : key, value),
    })),
  },
  {
    weight: 1,
    arbitrary: fc.oneof(
      hostileString.map((raw) => ({ raw })),
      fc.constantFrom(
        { raw: '{"records": [' },
        { raw: '{"records": [], "records": 5}' },
        { raw: `{"records": ${JSON.stringify(deep(200))}}` },
        { raw: '{"records": [NaN]}' },
      ),
    ),
  },
);

const sessionBody: fc.Arbitrary<Sent> = fc.oneof(
  fc
    .record({
      user: fc.oneof(hostileString, hostileValue),
      passcode: fc.oneof(hostileString, hostileValue),
      device: hostileValue,
    })
    .map((body) => ({ body })),
  fc
    .tuple(
      fc.constantFrom('user', 'passcode', 'device', 'device.id', 'device.name'),
      fc.oneof(hostileValue, fc.constant(undefined)),
    )
    .map(([path, value]) => ({
      body: setAt(
        { user: 'operator', passcode: 'wrong-1', device: { id: 'tablet-1', name: 'T' } },
        path.split('.'),
        (p, k) => {
          if (value === undefined) delete p[k as string];
          else p[k as string] = value;
        },
      ),
    })),
  fc.tuple(fc.constantFrom(...HOSTILE_KEYS), hostileValue).map(([key, value]) => ({
    body: withKey({ user: 'operator', passcode: 'wrong-1', device: { id: 'tablet-1', name: 'T' } }, key, value),
  })),
  fc.anything().map((body) => ({ body })),
  hostileString.map((raw) => ({ raw })),
);

const config = demoConfig() as unknown as Json;
const configPaths = paths(config).filter((path) => path.length > 0);

/** The demo configuration (version 1, so a valid copy would be stale: 409) with one value broken. */
const configBody: fc.Arbitrary<Sent> = fc.oneof(
  fc
    .tuple(fc.constantFrom(...configPaths), hostileValue)
    // A whole-number version above 1 would make a valid, newer configuration: not bad input.
    .filter(([path, value]) => !(path.join('.') === 'version' && Number.isInteger(value) && (value as number) > 1))
    .map(([path, value]) => ({
      body: setAt(config, path, (p, k) => ((p as Record<string | number, unknown>)[k] = value)),
    })),
  fc.constantFrom(...configPaths).map((path) => ({
    body: setAt(config, path, (p, k) => {
      if (Array.isArray(p)) p.splice(k as number, 1);
      else delete p[k as string];
    }),
  })),
  fc
    .tuple(
      fc.constantFrom(...configPaths.filter((path) => path.length < 4)),
      fc.constantFrom(...HOSTILE_KEYS),
      hostileValue,
    )
    .map(([path, key, value]) => ({
      body: setAt(config, path, (p, k) => {
        const target = (p as Record<string | number, unknown>)[k];
        if (target && typeof target === 'object' && !Array.isArray(target)) withKey(target as Json, key, value);
        else withKey(p, key, value);
      }),
    })),
  fc.anything().map((body) => ({ body })),
  hostileString.map((raw) => ({ raw })),
);

function send(path: string, method: string, token: string | undefined, sent: Sent): Promise<Response> {
  const payload = 'raw' in sent ? { raw: sent.raw } : { raw: JSON.stringify(sent.body) ?? 'undefined' };
  return call(api.app, method, path, { ...(token === undefined ? {} : { token }), ...payload });
}

const statuses: Record<string, Record<number, number>> = {};
function count(endpoint: string, status: number): void {
  statuses[endpoint] ??= {};
  const seen = statuses[endpoint];
  seen[status] = (seen[status] ?? 0) + 1;
}

describe('bad input catalogue', () => {
  it(`should reject ${RUNS.records} hostile batches on POST /records without a 5xx or a stored row`, async () => {
    await fc.assert(
      fc.asyncProperty(recordsBody, async (sent) => {
        const res = await send('/api/v1/records', 'POST', tokens.operator, sent);
        count('records', res.status);
        if (res.status === 200) {
          const { results } = (await res.json()) as { results: Array<{ status: string; error?: string }> };
          // An empty batch is the one well-formed body here; then there is nothing to reject.
          for (const result of results) {
            expect(result.status).toBe('rejected');
            expect(result.error?.length).toBeGreaterThan(10);
          }
        } else {
          expect(res.status).toBeGreaterThanOrEqual(400);
          expect(res.status).toBeLessThan(500);
          const body = (await res.json()) as { error: { code: string; message: string } };
          expect(body.error.code).toMatch(/^E_/);
        }
      }),
      { numRuns: RUNS.records },
    );
    expect(countRows(api.db)).toEqual(before);
  }, 120_000);

  it(`should reject ${RUNS.sessions} hostile sign-ins on POST /sessions with a 4xx`, async () => {
    await fc.assert(
      fc.asyncProperty(sessionBody, async (sent) => {
        const res = await send('/api/v1/sessions', 'POST', undefined, sent);
        count('sessions', res.status);
        expect([400, 401, 413, 429]).toContain(res.status);
      }),
      { numRuns: RUNS.sessions },
    );
    expect(countRows(api.db)).toEqual(before);
  }, 120_000);

  it(`should reject ${RUNS.config} hostile configurations on PUT /config with a 4xx`, async () => {
    await fc.assert(
      fc.asyncProperty(configBody, async (sent) => {
        const res = await send('/api/v1/config', 'PUT', tokens.admin, sent);
        count('config', res.status);
        expect([400, 409, 413]).toContain(res.status);
      }),
      { numRuns: RUNS.config },
    );
    expect(countRows(api.db)).toEqual(before);
  }, 120_000);

  it('should still answer, hold the same rows, log no internal error, and leave Object.prototype alone', async () => {
    const health = await api.app.request('/api/v1/health');
    expect(health.status).toBe(200);
    expect(countRows(api.db)).toEqual(before);
    expect(api.db.pragma('integrity_check', { simple: true })).toBe('ok');
    expect(api.logged.filter((entry) => entry.level === 'error')).toEqual([]);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    // Every status seen, for the record of what the catalogue exercised.
    const total = Object.values(statuses).reduce(
      (sum, seen) => sum + Object.values(seen).reduce((a, b) => a + b, 0),
      0,
    );
    expect(total).toBeGreaterThanOrEqual(1000);
    console.info(`bad input catalogue: ${total} bodies; statuses ${JSON.stringify(statuses)}`);
  });
});
