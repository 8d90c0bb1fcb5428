/**
 * The invented demo site and its 90-day history: valid against every schema, the same every time, and carrying the
 * story a supervisor should find (expected values derived by hand from the generator's stated model).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { valveLife } from '../../src/calc';
import {
  CREEP,
  DEMO_DAYS,
  type DemoHistory,
  demoConfig,
  demoEnvelopes,
  demoHistory,
  LEAK,
  OPEN_MACHINE_CAUTIONS,
} from '../../src/demo';
import { parseEnvelope } from '../../src/schema';

let history: DemoHistory;
beforeAll(() => {
  history = demoHistory();
}, 60_000);

const findingsIn = (rounds: DemoHistory['rounds']) => rounds.flatMap((r) => r.findings);

describe('demo site', () => {
  it('should have two 2-stage, 4-throw gas compressors and a hydrogen booster at about 900 m', () => {
    const config = demoConfig();
    expect(config.barometer).toEqual({ kind: 'elevation', elevationM: 900 });
    const [a, b, h] = config.machines;
    for (const machine of [a, b]) {
      expect(machine?.stages).toHaveLength(2);
      expect(machine?.frame.throws).toHaveLength(4);
    }
    expect(h?.stages[0]?.gasStreamId).toBe('hydrogen');
    expect(config.cautionSets[0]?.cautions.at(-1)?.text).toMatch(/never replaces, the site's isolation procedure/);
  });

  it('should read K-102 in psig and °F and K-101 in barg and °C', () => {
    const points = demoConfig().routes[0]?.points ?? [];
    expect(points.find((p) => p.id === 'K-102-S1-PD')?.unit).toBe('psig');
    expect(points.find((p) => p.id === 'K-102-MB1-T')?.unit).toBe('degF');
    expect(points.find((p) => p.id === 'K-101-S1-PD')?.unit).toBe('barg');
  });
});

describe('demo history', () => {
  it('should hold a morning and a night round for each of the 90 days, every record valid', () => {
    expect(history.rounds).toHaveLength(DEMO_DAYS * 2);
    const envelopes = demoEnvelopes(history);
    expect(envelopes).toHaveLength(history.rounds.length + 5 + 4 + 1);
    for (const envelope of envelopes) expect(() => parseEnvelope(envelope)).not.toThrow();
  });

  it('should be the same every time (ids, values and findings)', () => {
    const again = demoHistory();
    expect(again.rounds[17]).toEqual(history.rounds[17]);
    expect(again.valveChanges).toEqual(history.valveChanges);
  });

  it('should show the crank-end suction valve leak on K-101 C3 growing to an alarm', () => {
    const coverFinding = (round: DemoHistory['rounds'][number]) =>
      round.findings.find(
        (f) =>
          f.rule === 'valveCovers' &&
          f.subject.machineId === LEAK.machineId &&
          f.subject.cylinderId === LEAK.cylinderId,
      );
    const early = history.rounds.filter((r, index) => index < LEAK.startDay * 2 && r.round.routeId === 'morning');
    expect(early.every((r) => coverFinding(r)?.severity === 'ok')).toBe(true);
    const last = history.rounds.filter((r) => r.round.routeId === 'morning').at(-1);
    const finding = coverFinding(last as DemoHistory['rounds'][number]);
    expect(finding?.severity).toBe('alarm');
    expect(finding?.subject.valvePositionId).toBe(LEAK.coverId);
    // Model: cover rise 19 K × (89 − 50)/40 = 18.5 K above its peers, with about ±2 K of reading noise.
    expect(finding?.numbers[`${LEAK.coverId}.peerDeltaK`]).toBeGreaterThan(15);
    expect(finding?.numbers[`${LEAK.coverId}.peerDeltaK`]).toBeLessThan(22);
    const discharge = last?.findings.find(
      (f) =>
        f.rule === 'dischargeTemperature' &&
        f.subject.cylinderId === LEAK.cylinderId &&
        f.subject.machineId === LEAK.machineId,
    );
    // Model: 14 K × 0.975 of leak heat plus the 2 K thermometer bias.
    expect(discharge?.numbers.excessK).toBeGreaterThan(12);
    expect(['watch', 'alarm']).toContain(discharge?.severity);
  });

  it('should show the K-102 crosshead pin creeping toward its watch limit', () => {
    const lastTen = history.rounds.slice(-20);
    const trends = findingsIn(lastTen).filter(
      (f) => f.rule === 'trend' && f.subject.pointId === `${CREEP.machineId}-${CREEP.bearingId}-T`,
    );
    expect(trends.length).toBeGreaterThan(0);
    // K-102 reads in °F: the model's 0.35 K a day is 0.63 °F a day.
    expect(trends[0]?.message).toMatch(/rising about 0\.[5-7] °F a day/);
    const before = findingsIn(history.rounds.slice(0, CREEP.startDay * 2)).filter(
      (f) => f.rule === 'trend' && f.subject.pointId === `${CREEP.machineId}-${CREEP.bearingId}-T`,
    );
    expect(before).toEqual([]);
  });

  it('should carry four valve changes and one bearing clearance check, each behind an acknowledged lockout', () => {
    expect(history.valveChanges.map((v) => [v.machineId, v.valvePositionId, v.reason])).toEqual([
      ['K-101', 'C1-HE-D2', 'failure'],
      ['K-101', 'C1-HE-D2', 'failure'],
      ['K-102', 'C2-CE-S1', 'planned'],
      ['K-101', 'C1-HE-D2', 'failure'],
    ]);
    expect(history.bearingClearances[0]?.result.status).toBe('ok');
    const acks = new Map(history.lockoutAcks.map((a) => [a.id, a]));
    for (const record of [...history.valveChanges, ...history.bearingClearances]) {
      const ack = acks.get(record.lockoutAckId);
      expect(ack?.acknowledgements.map((a) => a.cautionId)).toEqual(OPEN_MACHINE_CAUTIONS.cautions.map((c) => c.id));
      expect(Date.parse(ack?.completedAt ?? '')).toBeLessThan(Date.parse(record.at));
    }
  });

  it('should give the K-101 valve position a life that valveLife can read', () => {
    const change = history.valveChanges[0];
    const life = valveLife({
      changes: [{ at: change?.at ?? '', runHours: change?.runHours ?? 0, planned: false }],
      installedRunHours: 0,
      nowRunHours: 45_000,
      now: '2026-11-30T00:00:00Z',
      installedAt: '2020-01-01T00:00:00Z',
    });
    expect(life.intervalsH).toEqual([change?.runHours]);
    expect(life.failures).toBe(1);
  });
});
