import { afterEach, describe, expect, it } from 'vitest';
import type { Finding, TypedEnvelope } from '../../src/schema';
import { compareFindings, HISTORY_FREE_RULES } from '../../src/server/findings';
import { type ApiFixture, call, demoRounds, makeApi, push, review, roundBy, signIn } from './api-fixtures';

let api: ApiFixture | undefined;
afterEach(() => {
  api?.close();
  api = undefined;
});

interface Listed {
  roundId: string;
  key: string;
  rule: string;
  machineId: string;
  severity: string;
  message: string;
  numbers: Record<string, number | null>;
  roundFinishedAt: string;
  author: string;
  reviewState: 'open' | 'reviewed';
  mismatch: { deviceSeverity: string | null; serverSeverity: string } | null;
  latestReview: { id: string; disposition: string; by: { id: string; name: string }; at: string } | null;
}

/** Sets the SI value of one reading of a round (the point must be on the round). */
function setReading(round: TypedEnvelope<'round'>, pointId: string, valueSI: number): void {
  const reading = round.body.readings.find((r) => r.pointId === pointId);
  if (!reading) throw new Error(`${pointId} is not on round ${round.body.round.routeId}`);
  reading.valueSI = valueSI;
}

/**
 * Four demo rounds on consecutive shifts, with oil pressures set to known severities by the demo limits
 * (K-101-LO-P: lowTrip 260 800 Pa, lowAlarm 300 800 Pa, lowWatch 370 800 Pa; K-301-LO-P lowAlarm 290 800 Pa).
 */
async function site() {
  const fixture = await makeApi();
  api = fixture;
  const operator = await signIn(fixture.app, 'operator');
  const operator2 = await signIn(fixture.app, 'operator2');
  const supervisor = await signIn(fixture.app, 'supervisor');
  const rounds = demoRounds()
    .slice(0, 4)
    .map((source, index) => roundBy(index % 2 === 0 ? 'operator' : 'operator2', source));
  const [r0, r1, r2, r3] = rounds as [
    TypedEnvelope<'round'>,
    TypedEnvelope<'round'>,
    TypedEnvelope<'round'>,
    TypedEnvelope<'round'>,
  ];
  setReading(r0, 'K-101-LO-P', 250_000); // below lowTrip: trip
  setReading(r1, 'K-101-LO-P', 290_000); // below lowAlarm: alarm
  setReading(r2, 'K-101-LO-P', 350_000); // below lowWatch: watch
  setReading(r3, 'K-301-LO-P', 280_000); // below K-301's lowAlarm: alarm
  await push(fixture.app, operator, [r0, r2]);
  await push(fixture.app, operator2, [r1, r3]);
  return { fixture, rounds, r0, r1, r2, r3, supervisor };
}

async function list(fixture: ApiFixture, token: string, query = ''): Promise<Listed[]> {
  const res = await call(fixture.app, 'GET', `/api/v1/findings${query}`, { token });
  if (res.status !== 200) throw new Error(`findings answered ${res.status}: ${await res.text()}`);
  const body = (await res.json()) as { findings: Listed[]; more: boolean };
  expect(body.more).toBe(false);
  return body.findings;
}

const oilKey = (round: TypedEnvelope<'round'>, machine: string) => `${round.id}:limits:${machine}/${machine}-LO-P`;

describe('GET /api/v1/findings', () => {
  it('should list server findings of watch and above, newest round first, with round, author and numbers', async () => {
    const { fixture, r0, r1, r2, r3, supervisor } = await site();
    const all = await list(fixture, supervisor);
    expect(all.length).toBeGreaterThanOrEqual(4);
    expect(all.every((f) => f.severity !== 'ok')).toBe(true);
    const times = all.map((f) => Date.parse(f.roundFinishedAt));
    expect(times).toEqual([...times].sort((a, b) => b - a));
    const byKey = new Map(all.map((f) => [f.key, f]));
    expect(byKey.get(oilKey(r0, 'K-101'))).toMatchObject({
      roundId: r0.id,
      rule: 'limits',
      machineId: 'K-101',
      severity: 'trip',
      author: 'operator',
      roundFinishedAt: r0.body.round.finishedAt,
      reviewState: 'open',
      latestReview: null,
    });
    expect(byKey.get(oilKey(r0, 'K-101'))?.message).toMatch(/oil/i);
    expect(byKey.get(oilKey(r1, 'K-101'))).toMatchObject({ severity: 'alarm', author: 'operator2' });
    expect(byKey.get(oilKey(r2, 'K-101'))).toMatchObject({ severity: 'watch' });
    expect(byKey.get(oilKey(r3, 'K-301'))).toMatchObject({ severity: 'alarm', machineId: 'K-301' });
    expect(Object.keys(byKey.get(oilKey(r0, 'K-101'))?.numbers ?? {}).length).toBeGreaterThan(0);
  });

  it("should mark the findings where the server's recomputation disagreed with the device", async () => {
    const { fixture, r0, r1, supervisor } = await site();
    const all = await list(fixture, supervisor);
    const byKey = new Map(all.map((f) => [f.key, f]));
    // The fixture changed the oil pressures after the device had evaluated the round, so the device's own finding
    // (as sent in the record) no longer matches what the server computes from the readings.
    for (const [round, serverSeverity] of [
      [r0, 'trip'],
      [r1, 'alarm'],
    ] as const) {
      const sent = round.body.findings.find((f) => f.key === oilKey(round, 'K-101'));
      expect(sent?.severity).not.toBe(serverSeverity);
      expect(byKey.get(oilKey(round, 'K-101'))?.mismatch).toEqual({
        deviceSeverity: sent?.severity ?? null,
        serverSeverity,
      });
    }
    // Findings the device computed the same way carry no mark.
    const agreed = all.filter((f) => {
      const sent = [r0, r1].find((r) => r.id === f.roundId)?.body.findings.find((d) => d.key === f.key);
      return sent !== undefined && sent.severity === f.severity;
    });
    expect(agreed.length).toBeGreaterThan(0);
    expect(agreed.every((f) => f.mismatch === null)).toBe(true);
  });

  it('should filter by minimum severity and by machine', async () => {
    const { fixture, r0, r1, r3, supervisor } = await site();
    const all = await list(fixture, supervisor);
    const trips = await list(fixture, supervisor, '?severity=trip');
    expect(trips).toEqual(all.filter((f) => f.severity === 'trip'));
    expect(trips.map((f) => f.key)).toContain(oilKey(r0, 'K-101'));
    const alarms = await list(fixture, supervisor, '?severity=alarm');
    expect(alarms).toEqual(all.filter((f) => f.severity === 'alarm' || f.severity === 'trip'));
    expect(alarms.map((f) => f.key)).toEqual(expect.arrayContaining([oilKey(r1, 'K-101'), oilKey(r3, 'K-301')]));
    expect(await list(fixture, supervisor, '?severity=watch')).toEqual(all);
    const booster = await list(fixture, supervisor, '?machine=K-301');
    expect(booster).toEqual(all.filter((f) => f.machineId === 'K-301'));
    expect(booster.map((f) => f.key)).toContain(oilKey(r3, 'K-301'));
    const boosterAlarms = await list(fixture, supervisor, '?machine=K-301&severity=alarm');
    expect(boosterAlarms).toEqual(booster.filter((f) => f.severity !== 'watch'));
    expect(await list(fixture, supervisor, '?machine=K-999')).toEqual([]);
  });

  it('should filter by the round finish time, from and to inclusive, in any zone', async () => {
    const { fixture, r1, r2, supervisor } = await site();
    const all = await list(fixture, supervisor);
    const from = r1.body.round.finishedAt as string;
    const to = r2.body.round.finishedAt as string;
    const window = await list(fixture, supervisor, `?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`);
    expect(window).toEqual(
      all.filter(
        (f) => Date.parse(f.roundFinishedAt) >= Date.parse(from) && Date.parse(f.roundFinishedAt) <= Date.parse(to),
      ),
    );
    expect(new Set(window.map((f) => f.roundId))).toEqual(new Set([r1.id, r2.id]));
    // The same instant written with an offset selects the same findings.
    const shifted = new Date(Date.parse(from)).toISOString().replace('Z', '+00:00');
    expect(
      await list(fixture, supervisor, `?from=${encodeURIComponent(shifted)}&to=${encodeURIComponent(to)}`),
    ).toEqual(window);
    const onlyAfter = await list(fixture, supervisor, `?from=${encodeURIComponent(to)}`);
    expect(onlyAfter.every((f) => Date.parse(f.roundFinishedAt) >= Date.parse(to))).toBe(true);
  });

  it('should show the review state from the latest review of each finding key', async () => {
    const { fixture, r0, r1, supervisor } = await site();
    const key = oilKey(r0, 'K-101');
    const first = review('supervisor', { roundId: r0.id, findingKey: key }, { at: '2026-12-01T10:00:00Z' });
    const latest = review(
      'supervisor',
      { roundId: r0.id, findingKey: key },
      { at: '2026-12-01T11:00:00Z', disposition: 'actionRaised' },
    );
    // Sent newest first: the review time decides, not the arrival order.
    await push(fixture.app, supervisor, [latest, first]);
    const reviewed = await list(fixture, supervisor, '?state=reviewed');
    expect(reviewed.map((f) => f.key)).toEqual([key]);
    expect(reviewed[0]).toMatchObject({
      reviewState: 'reviewed',
      latestReview: {
        id: latest.id,
        disposition: 'actionRaised',
        by: { id: 'supervisor' },
        at: '2026-12-01T11:00:00Z',
      },
    });
    const open = await list(fixture, supervisor, '?state=open');
    expect(open.map((f) => f.key)).not.toContain(key);
    expect(open.map((f) => f.key)).toContain(oilKey(r1, 'K-101'));
    const all = await list(fixture, supervisor);
    expect(open.length + reviewed.length).toBe(all.length);
  });

  it('should cap the list with limit and say more remain', async () => {
    const { fixture, supervisor } = await site();
    const all = await list(fixture, supervisor);
    const res = await call(fixture.app, 'GET', '/api/v1/findings?limit=2', { token: supervisor });
    const body = (await res.json()) as { findings: Listed[]; more: boolean };
    expect(body.findings).toEqual(all.slice(0, 2));
    expect(body.more).toBe(true);
  });

  it.each([
    '?severity=ok',
    '?severity=high',
    '?state=closed',
    '?from=yesterday',
    '?to=2026-13-01T00:00:00Z',
    '?from=2026-12-02T00:00:00Z&to=2026-12-01T00:00:00Z',
    '?machine=K%20101',
    '?rule=limits',
    '?limit=0',
    '?limit=1001',
    '?machine=K-101&machine=K-102',
  ])('should answer 400 for %s', async (query) => {
    api = await makeApi();
    const token = await signIn(api.app, 'supervisor');
    const res = await call(api.app, 'GET', `/api/v1/findings${query}`, { token });
    expect(res.status).toBe(400);
    expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/^The query is not valid: /);
  });

  it('should be for supervisors and admins only', async () => {
    api = await makeApi();
    for (const [who, status] of [
      ['operator', 403],
      ['mechanic', 403],
      ['supervisor', 200],
      ['admin', 200],
    ] as const) {
      const token = await signIn(api.app, who);
      expect((await call(api.app, 'GET', '/api/v1/findings', { token })).status).toBe(status);
    }
  });
});

describe('compareFindings', () => {
  const base: Finding = {
    key: 'r:limits:K-101/P',
    roundId: '00000000-0000-4000-8000-000000000000',
    rule: 'limits',
    subject: { machineId: 'K-101' },
    severity: 'ok',
    message: 'fine',
    numbers: {},
    inputs: {},
  };
  const f = (key: string, rule: Finding['rule'], severity: Finding['severity']): Finding => ({
    ...base,
    key,
    rule,
    severity,
  });

  it('should compare history-free rules on every key and history rules only where both sides have them', () => {
    expect([...HISTORY_FREE_RULES].sort()).toEqual(
      ['answer', 'dischargeTemperature', 'limits', 'rodLoad', 'stagePerformance', 'valveCovers'].sort(),
    );
    const device = [
      f('a', 'limits', 'ok'),
      f('b', 'valveCovers', 'alarm'),
      f('c', 'trend', 'watch'),
      f('d', 'bearingTemperature', 'watch'),
      f('e', 'rodLoad', 'ok'),
    ];
    const server = [
      f('a', 'limits', 'ok'),
      f('b', 'valveCovers', 'watch'),
      f('d', 'bearingTemperature', 'ok'),
      f('g', 'bearingTemperature', 'alarm'),
      f('h', 'answer', 'watch'),
    ];
    expect(compareFindings(device, server)).toEqual([
      { key: 'b', rule: 'valveCovers', device: 'alarm', server: 'watch' },
      { key: 'd', rule: 'bearingTemperature', device: 'watch', server: 'ok' },
      { key: 'e', rule: 'rodLoad', device: 'ok', server: null },
      { key: 'h', rule: 'answer', device: null, server: 'watch' },
    ]);
  });

  it('should take the worst severity when one key has two findings', () => {
    const device = [f('t', 'trend', 'watch')];
    const server = [f('t', 'trend', 'ok'), f('t', 'trend', 'watch')];
    expect(compareFindings(device, server)).toEqual([]);
  });
});
