import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEMO_SITE_NAME } from '../../src/demo';
import { createApp } from '../../src/server/app';
import { type Database, openDatabase } from '../../src/server/db';
import { latestConfig, recordCount } from '../../src/server/records';
import { seedDemoSite } from '../../src/server/seed';
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

describe('seedDemoSite', () => {
  it('should seed the demo configuration and every demo record once, ending on the day of the first start', () => {
    const result = seedDemoSite(db, new Date('2026-12-01T17:00:00Z'));
    // 90 days × 2 rounds, 3 lockout acknowledgements, 2 valve changes, 1 bearing clearance check
    expect(result).toEqual({ seeded: true, records: 186 });
    expect(latestConfig(db)?.name).toBe(DEMO_SITE_NAME);
    const last = db.prepare("SELECT max(created_at) AS t FROM records WHERE type = 'round'").get() as { t: string };
    expect(last.t < '2026-12-01T00:00:00Z').toBe(true);
    expect(last.t > '2026-11-30T00:00:00Z').toBe(true);
    expect(seedDemoSite(db)).toEqual({ seeded: false, records: 0 });
    expect(recordCount(db)).toBe(186);
  }, 60_000);

  it('should give the shell the configured site name', async () => {
    seedDemoSite(db, new Date('2026-12-01T17:00:00Z'));
    const app = createApp({ db, distDir: temp.path, version: '1.0.0', siteName: 'From the environment' });
    expect(await (await app.request('/api/v1/site')).json()).toEqual({ name: DEMO_SITE_NAME });
  }, 60_000);

  it('should refuse to change or delete a stored record', () => {
    seedDemoSite(db, new Date('2026-12-01T17:00:00Z'));
    expect(() => db.prepare("UPDATE records SET author = 'someone' WHERE seq = 1").run()).toThrow(
      /records are immutable/,
    );
    expect(() => db.prepare('DELETE FROM records WHERE seq = 1').run()).toThrow(/records are immutable/);
    expect(recordCount(db)).toBe(186);
  }, 60_000);
});
