/**
 * The role matrix: every API endpoint for each role and for an anonymous caller, and every record type for each
 * role. source: OWASP ASVS 5.0 8.2.1-8.2.3 (authorization enforced on the server, per function and per data).
 */
import { randomUUID } from 'node:crypto';
import { afterEach, describe, expect, it } from 'vitest';
import { demoConfig, demoHistory } from '../../src/demo';
import { envelopeFor, type RecordType, type TypedEnvelope } from '../../src/schema';
import {
  type ApiFixture,
  call,
  DEVICE,
  demoRounds,
  lockoutAck,
  makeApi,
  note,
  PASSCODE,
  PEOPLE,
  type PersonKey,
  review,
  roundBy,
  signIn,
  valveChange,
} from './api-fixtures';

let api: ApiFixture | undefined;
afterEach(() => {
  api?.close();
  api = undefined;
});

type Caller = 'operator' | 'mechanic' | 'supervisor' | 'admin' | 'anonymous';

interface Endpoint {
  name: string;
  method: string;
  path: string;
  body?: (who: Caller) => unknown;
  /** Expected status per caller; source: RFC 9110 sections 15.3 and 15.5 (200, 201, 204, 401, 403). */
  expect: Record<Caller, number>;
}

const signedIn = (ok: number, forbidden: Caller[] = []): Record<Caller, number> => ({
  operator: forbidden.includes('operator') ? 403 : ok,
  mechanic: forbidden.includes('mechanic') ? 403 : ok,
  supervisor: forbidden.includes('supervisor') ? 403 : ok,
  admin: forbidden.includes('admin') ? 403 : ok,
  anonymous: 401,
});

const ENDPOINTS: Endpoint[] = [
  {
    name: 'health',
    method: 'GET',
    path: '/api/v1/health',
    expect: { operator: 200, mechanic: 200, supervisor: 200, admin: 200, anonymous: 200 },
  },
  {
    name: 'site',
    method: 'GET',
    path: '/api/v1/site',
    expect: { operator: 200, mechanic: 200, supervisor: 200, admin: 200, anonymous: 200 },
  },
  {
    name: 'sign in',
    method: 'POST',
    path: '/api/v1/sessions',
    body: (who) => ({
      user: who === 'anonymous' ? 'operator' : who,
      passcode: PASSCODE,
      device: { id: 'tablet-9', name: 'Spare tablet' },
    }),
    expect: { operator: 201, mechanic: 201, supervisor: 201, admin: 201, anonymous: 201 },
  },
  { name: 'sign out', method: 'DELETE', path: '/api/v1/sessions/current', expect: signedIn(204) },
  { name: 'push', method: 'POST', path: '/api/v1/records', body: () => ({ records: [] }), expect: signedIn(200) },
  { name: 'pull', method: 'GET', path: '/api/v1/records?after=0&limit=10', expect: signedIn(200) },
  { name: 'read config', method: 'GET', path: '/api/v1/config', expect: signedIn(200) },
  {
    name: 'publish config',
    method: 'PUT',
    path: '/api/v1/config',
    body: () => ({ ...demoConfig(), version: 2 }),
    expect: signedIn(200, ['operator', 'mechanic']),
  },
  {
    name: 'findings',
    method: 'GET',
    path: '/api/v1/findings?severity=alarm',
    expect: signedIn(200, ['operator', 'mechanic']),
  },
];

const CALLERS: Caller[] = ['operator', 'mechanic', 'supervisor', 'admin', 'anonymous'];
const CASES = ENDPOINTS.flatMap((endpoint) =>
  CALLERS.map((caller) => [endpoint.name, caller, endpoint.expect[caller], endpoint] as const),
);

describe('role matrix: endpoint × caller', () => {
  it('should list every API route the app has', async () => {
    api = await makeApi();
    const routes = api.app.routes
      .filter((route) => route.path.startsWith('/api/v1/') && route.method !== 'ALL')
      .map((route) => `${route.method} ${route.path}`);
    const listed = ENDPOINTS.map((endpoint) => `${endpoint.method} ${endpoint.path.split('?')[0]}`);
    expect([...new Set(routes)].sort()).toEqual([...new Set(listed)].sort());
  });

  it.each(CASES)('%s as %s → %i', async (_name, caller, status, endpoint) => {
    api = await makeApi();
    const token = caller === 'anonymous' ? undefined : await signIn(api.app, caller);
    const body = endpoint.body?.(caller);
    const res = await call(api.app, endpoint.method, endpoint.path, {
      ...(token === undefined ? {} : { token }),
      ...(body === undefined ? {} : { body }),
    });
    expect(res.status).toBe(status);
    expect(res.headers.get('Cache-Control')).toBe('no-store');
    if (status >= 400) {
      const error = ((await res.json()) as { error: { code: string } }).error;
      expect(error.code).toBe(status === 401 ? 'E_UNAUTHORIZED' : 'E_FORBIDDEN');
    }
  });
});

function rodDrop(who: PersonKey): TypedEnvelope {
  const person = PEOPLE[who];
  return envelopeFor(
    'rodDrop',
    {
      id: randomUUID(),
      machineId: 'K-101',
      cylinderId: 'C1',
      at: '2026-12-01T09:00:00Z',
      by: { id: person.id, name: person.name },
      entered: { text: '0.31', unit: 'mm' },
      readingM: 0.31e-3,
      newBandReadingM: 0.1e-3,
      wearM: 0.21e-3,
      usedFraction: 0.3,
    },
    { author: person.id, device: DEVICE[who], createdAt: '2026-12-01T09:00:00Z' },
  );
}

function bearingClearance(who: PersonKey): TypedEnvelope {
  const person = PEOPLE[who];
  const source = demoHistory({ days: 50 }).bearingClearances[0];
  if (!source) throw new Error('the demo has no bearing clearance record');
  return envelopeFor(
    'bearingClearance',
    { ...source, id: randomUUID(), by: { id: person.id, name: person.name } },
    { author: person.id, device: DEVICE[who], createdAt: source.at },
  );
}

const MAKERS: Record<RecordType, (who: PersonKey) => TypedEnvelope> = {
  round: (who) => roundBy(who, demoRounds()[0] ?? expect.fail('no demo round')),
  valveChange,
  bearingClearance,
  rodDrop,
  lockoutAck,
  review: (who) => review(who, { roundId: randomUUID(), findingKey: 'x:limits:K-101/K-101-LO-P' }),
  note: (who) => note(who),
};

/** source: the wire contract's list of record types per role. */
const ALLOWED: Record<Exclude<Caller, 'anonymous'>, RecordType[]> = {
  operator: ['round', 'note', 'lockoutAck'],
  mechanic: ['valveChange', 'bearingClearance', 'rodDrop', 'lockoutAck', 'note'],
  supervisor: ['review', 'note', 'round'],
  admin: ['round', 'valveChange', 'bearingClearance', 'rodDrop', 'lockoutAck', 'review', 'note'],
};

describe('role matrix: record type × role', () => {
  it.each(['operator', 'mechanic', 'supervisor', 'admin'] as const)(
    'should store exactly the types a %s may record',
    async (who) => {
      api = await makeApi();
      const token = await signIn(api.app, who);
      const types = Object.keys(MAKERS) as RecordType[];
      const records = types.map((type) => MAKERS[type](who));
      const res = await call(api.app, 'POST', '/api/v1/records', { token, body: { records } });
      expect(res.status).toBe(200);
      const { results } = (await res.json()) as { results: Array<{ status: string; error?: string }> };
      const stored = types.filter((_type, index) => results[index]?.status === 'stored');
      expect(stored).toEqual(types.filter((type) => ALLOWED[who].includes(type)));
      for (const [index, type] of types.entries()) {
        if (!ALLOWED[who].includes(type)) expect(results[index]?.error).toMatch(new RegExp(`may not record ${type}`));
      }
    },
  );
});
