import 'fake-indexeddb/auto';
import { beforeEach, describe, expect, it } from 'vitest';
import { RoundSession } from '../../../src/app/models/round-session';
import { demoConfig, OPEN_MACHINE_CAUTIONS } from '../../../src/demo';
import type { CheckPoint } from '../../../src/schema';
import { openStore, type Store } from '../../../src/store';
import { SESSION_KEY } from '../../../src/sync';

const config = demoConfig();
let store: Store;
let session: RoundSession;
const point = (id: string) => session.route.points.find((p) => p.id === id) as CheckPoint;

beforeEach(async () => {
  store = await openStore({ name: `round-session-${Math.random().toString(36).slice(2)}` });
  await store.putConfig(config);
  const person = { id: 'operator', name: 'Mara Oyelaran' };
  await store.setMeta(SESSION_KEY, {
    token: 'x'.repeat(43),
    user: { ...person, roles: ['operator'] },
    device: { id: 'tablet', name: 'Tablet' },
    signedInAt: '2026-03-01T05:00:00Z',
  });
  const id = crypto.randomUUID();
  await store.startRound({
    id,
    siteName: config.name,
    routeId: 'morning',
    configVersion: 1,
    by: person,
    deviceId: await store.deviceId(),
    startedAt: '2026-03-01T06:00:00.000Z',
    finishedAt: null,
    state: 'draft',
  });
  session = await RoundSession.open(store, id);
});

describe('RoundSession', () => {
  it('should save a reading as entered and show it saved only once the store has it', async () => {
    const pending = session.enter(point('K-101-S1-PS'), '3.1');
    expect(session.draftFor(point('K-101-S1-PS')).save.kind).toBe('saving');
    await pending;
    expect(session.draftFor(point('K-101-S1-PS')).save.kind).toBe('saved');
    const stored = await store.readingsOf(session.round.id);
    expect(stored.map((r) => [r.pointId, r.entered?.text, r.entered?.unit])).toEqual([['K-101-S1-PS', '3.1', 'barg']]);
  });

  it('should keep an invalid entry unsaved, with its message, and count it as unsaved input', async () => {
    await session.enter(point('K-101-S1-PS'), 'abc');
    expect(session.draftFor(point('K-101-S1-PS')).save).toEqual({
      kind: 'invalid',
      message: 'Enter a number, like 12.5.',
    });
    expect(session.hasUnsavedInput()).toBe(true);
    expect(await store.readingsOf(session.round.id)).toEqual([]);
  });

  it('should remember a unit switched on a point, and convert the value already entered', async () => {
    await session.enter(point('K-101-S1-PS'), '3.2');
    await session.switchUnit(point('K-101-S1-PS'), 'psig');
    // source: 3.2 barg at the demo barometer (900 m, U.S. Standard Atmosphere 1976) ≈ 46.4 psig
    expect(Number(session.draftFor(point('K-101-S1-PS')).text)).toBeCloseTo(46.41, 1);
    expect(await store.getMeta('unitOverrides')).toEqual({ 'K-101-S1-PS': 'psig' });
    const reopened = await RoundSession.open(store, session.round.id);
    expect(reopened.unitFor(point('K-101-S1-PS'))).toBe('psig');
  });

  it('should show the checks as soon as their inputs exist', async () => {
    await session.enter(point('K-101-MB2-T'), '96');
    const bearing = session.findings.find((f) => f.rule === 'bearingTemperature' && f.subject.bearingId === 'MB2');
    // source: demo limits, main bearing alarm at 93 °C (placeholder for the frame maker's value, common practice)
    expect(bearing?.severity).toBe('alarm');
  });

  it('should not let a lockout-related step be entered before every caution is confirmed', async () => {
    const inspection = point('K-101-XH-INSP');
    expect(session.needsLockout(inspection)).toBe(true);
    await session.enter(inspection, 'yes');
    expect(session.draftFor(inspection).save).toEqual({
      kind: 'invalid',
      message: 'Acknowledge the cautions before this step.',
    });
    await session.acknowledgeLockout(
      inspection,
      OPEN_MACHINE_CAUTIONS.cautions.map((c, index) => ({
        cautionId: c.id,
        at: new Date(Date.UTC(2026, 2, 1, 7, index)).toISOString(),
      })),
    );
    await session.enter(inspection, 'yes');
    expect(session.draftFor(inspection).save.kind).toBe('saved');
    const [ack] = await store.listRecords('lockoutAck');
    expect(ack?.by.name).toBe('Mara Oyelaran');
    expect(ack?.task).toEqual({
      kind: 'checkPoint',
      machineId: 'K-101',
      ref: 'K-101-XH-INSP',
      roundId: session.round.id,
    });
    expect(ack?.acknowledgements).toHaveLength(OPEN_MACHINE_CAUTIONS.cautions.length);
  });

  it('should refuse to finish while an alarm has no note, then freeze the round and queue it', async () => {
    await session.enter(point('K-101-MB2-T'), '96');
    await expect(session.finish()).rejects.toThrow('Every alarm or trip needs a note before the round is finished.');
    await session.setNote(point('K-101-MB2-T'), 'Checked oil flow to MB2; told the shift lead.');
    await session.finish();
    expect(session.finished).toBe(true);
    const readings = await store.readingsOf(session.round.id);
    expect(readings).toHaveLength(session.route.points.length);
    expect(readings.filter((r) => r.skipped?.reason === 'Not read on this round')).toHaveLength(
      session.route.points.length - 1,
    );
    expect(await store.outboxCounts()).toEqual({ pending: 1, attention: 0 });
    await session.enter(point('K-101-MB2-T'), '50');
    expect((await store.readingsOf(session.round.id)).find((r) => r.pointId === 'K-101-MB2-T')?.entered?.text).toBe(
      '96',
    );
    await session.addNote('Bearing MB2 inspected next morning: oil line was kinked.');
    expect((await store.listRecords('note'))[0]?.text).toMatch(/oil line was kinked/);
  });
});
