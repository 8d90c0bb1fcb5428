import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO_SITE_NAME, demoConfig } from '../../src/demo';
import { createApp } from '../../src/server/app';
import { type Database, openDatabase } from '../../src/server/db';
import { insertConfig, latestConfig, recordCount } from '../../src/server/records';
import { laterStartSignIns, seedDemoSite } from '../../src/server/seed';
import { PasscodeChecker, userCount } from '../../src/server/users';
import { makeTempDir } from './fixtures';

let temp: ReturnType<typeof makeTempDir>;
let db: Database;

beforeEach(() => {
  temp = makeTempDir('seed');
  db = openDatabase(temp.path);
});
afterEach(() => {
  db.close();
  temp.remove();
});

const FIRST_START = new Date('2026-12-01T17:00:00Z');

describe('seedDemoSite', () => {
  it('should seed the demo configuration and every demo record once, ending on the day of the first start', async () => {
    const result = await seedDemoSite(db, { now: FIRST_START, passcode: 'demo-pass-1' });
    // 90 days × 2 rounds, 5 lockout acknowledgements, 4 valve changes, 1 bearing clearance check
    expect(result.seeded).toBe(true);
    expect(result.records).toBe(190);
    expect(latestConfig(db)?.name).toBe(DEMO_SITE_NAME);
    const last = db.prepare("SELECT max(created_at) AS t FROM records WHERE type = 'round'").get() as { t: string };
    expect(last.t < '2026-12-01T00:00:00Z').toBe(true);
    expect(last.t > '2026-11-30T00:00:00Z').toBe(true);
    expect(await seedDemoSite(db)).toEqual({ seeded: false, records: 0, signIns: [] });
    expect(recordCount(db)).toBe(190);
  }, 60_000);

  it('should create the five demo people with their roles and the configured passcode', async () => {
    const result = await seedDemoSite(db, { now: FIRST_START, passcode: 'demo-pass-1' });
    expect(result.signIns).toEqual([
      { user: 'operator', name: 'Mara Oyelaran', roles: ['operator'], passcode: 'demo-pass-1' },
      { user: 'operator2', name: 'Tomás Lindqvist', roles: ['operator'], passcode: 'demo-pass-1' },
      { user: 'mechanic', name: 'Priya Nandakumar', roles: ['mechanic'], passcode: 'demo-pass-1' },
      { user: 'supervisor', name: 'Dale Whitford', roles: ['supervisor'], passcode: 'demo-pass-1' },
      { user: 'admin', name: 'Sun-hee Park', roles: ['admin'], passcode: 'demo-pass-1' },
    ]);
    expect(userCount(db)).toBe(5);
    const checker = new PasscodeChecker(db);
    expect(await checker.check('admin', 'demo-pass-1')).toMatchObject({ ok: true, user: { roles: ['admin'] } });
    expect(await checker.check('admin', 'demo-pass-2')).toEqual({ ok: false, reason: 'wrong-passcode' });
    expect(await laterStartSignIns(db, 'demo-pass-1')).toBe(
      'Demo sign-ins: operator, operator2, mechanic, supervisor, admin, with the passcode set in CRANKHOUSE_DEMO_PASSCODE',
    );
    expect(await laterStartSignIns(db, undefined)).toBe(
      'Demo sign-ins: operator, operator2, mechanic, supervisor, admin; their passcodes were shown when the demo was seeded at first start (2026-12-01T17:00:00.000Z)',
    );
  }, 60_000);

  it('should give every seeded round its server findings, agreeing with the device on every comparable key', async () => {
    await seedDemoSite(db, { now: FIRST_START, passcode: 'demo-pass-1' });
    expect(db.prepare('SELECT evaluation, count(*) AS n FROM server_rounds GROUP BY evaluation').all()).toEqual([
      { evaluation: 'done', n: 180 },
    ]);
    const perRound = db.prepare('SELECT count(DISTINCT round_id) FROM server_findings').pluck().get();
    expect(perRound).toBe(180);
    // The demo story: the leaking K-101 C3 suction valve shows as a valve cover alarm in the last weeks.
    const leak = db
      .prepare(
        "SELECT count(*) FROM server_findings WHERE rule = 'valveCovers' AND machine_id = 'K-101' AND severity_rank >= 2",
      )
      .pluck()
      .get() as number;
    expect(leak).toBeGreaterThan(0);
    expect(db.prepare('SELECT count(*) FROM finding_mismatches').pluck().get()).toBe(0);
  }, 60_000);

  it('should not seed over an existing configuration, and say nothing about demo sign-ins then', async () => {
    insertConfig(db, { ...demoConfig(), name: 'North Yard' }, FIRST_START.toISOString());
    expect(await seedDemoSite(db, { now: FIRST_START })).toEqual({ seeded: false, records: 0, signIns: [] });
    expect(userCount(db)).toBe(0);
    expect(recordCount(db)).toBe(0);
    expect(await laterStartSignIns(db, 'whatever')).toBeNull();
  });

  it('should give the shell the configured site name', async () => {
    await seedDemoSite(db, { now: FIRST_START });
    const app = createApp({ db, distDir: temp.path, version: '1.0.0', siteName: 'From the environment' });
    expect(await (await app.request('/api/v1/site')).json()).toEqual({ name: DEMO_SITE_NAME });
  }, 60_000);

  it('should refuse to change or delete a stored record', async () => {
    await seedDemoSite(db, { now: FIRST_START });
    expect(() => db.prepare("UPDATE records SET author = 'someone' WHERE seq = 1").run()).toThrow(
      /records are immutable/,
    );
    expect(() => db.prepare('DELETE FROM records WHERE seq = 1').run()).toThrow(/records are immutable/);
    expect(recordCount(db)).toBe(190);
  }, 60_000);
});
