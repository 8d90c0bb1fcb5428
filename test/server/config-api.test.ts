import { afterEach, describe, expect, it } from 'vitest';
import { demoConfig } from '../../src/demo';
import type { SiteConfig } from '../../src/schema';
import { type ApiFixture, call, demoRounds, makeApi, push, roundBy, signIn } from './api-fixtures';

let api: ApiFixture | undefined;
afterEach(() => {
  api?.close();
  api = undefined;
});

const CONFIG = '/api/v1/config';

function version(n: number, changes: Partial<SiteConfig> = {}): SiteConfig {
  return { ...demoConfig(), version: n, publishedAt: `2026-12-0${Math.min(n, 9)}T10:00:00Z`, ...changes };
}

describe('GET /api/v1/config', () => {
  it('should give anyone signed in the current configuration with its version', async () => {
    api = await makeApi();
    for (const who of ['operator', 'mechanic', 'supervisor', 'admin'] as const) {
      const token = await signIn(api.app, who);
      const res = await call(api.app, 'GET', CONFIG, { token });
      expect(res.status).toBe(200);
      expect(await res.json()).toEqual(demoConfig());
    }
  });

  it('should answer 404 with a clear message while no configuration is published', async () => {
    api = await makeApi({ config: false });
    const token = await signIn(api.app, 'operator');
    const res = await call(api.app, 'GET', CONFIG, { token });
    // source: RFC 9110 section 15.5.5 (404 Not Found: no current representation)
    expect(res.status).toBe(404);
    expect(await res.json()).toEqual({
      error: { code: 'E_NOT_FOUND', message: 'No site configuration has been published yet' },
    });
  });
});

describe('PUT /api/v1/config', () => {
  it('should publish a newer version for a supervisor or admin and keep the older ones', async () => {
    api = await makeApi();
    const supervisor = await signIn(api.app, 'supervisor');
    const admin = await signIn(api.app, 'admin');
    const v2 = version(2, { name: 'Cedar Flats, after the K-301 overhaul' });
    const res = await call(api.app, 'PUT', CONFIG, { token: supervisor, body: v2 });
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual(v2);
    const current = await call(api.app, 'GET', CONFIG, { token: admin });
    expect(((await current.json()) as SiteConfig).version).toBe(2);
    expect((await call(api.app, 'PUT', CONFIG, { token: admin, body: version(5) })).status).toBe(200);
    expect(api.db.prepare('SELECT version FROM site_configs ORDER BY version').pluck().all()).toEqual([1, 2, 5]);
    // The site name the shell shows follows the published configuration.
    expect(await (await api.app.request('/api/v1/site')).json()).toEqual({ name: demoConfig().name });
    expect(api.logged.some((e) => e.event === 'config-published' && e.version === 5 && e.user === 'admin')).toBe(true);
  });

  it('should answer 409 for a version that is not newer, and keep the current one', async () => {
    api = await makeApi();
    const token = await signIn(api.app, 'admin');
    expect((await call(api.app, 'PUT', CONFIG, { token, body: version(3) })).status).toBe(200);
    for (const stale of [3, 2, 1]) {
      const res = await call(api.app, 'PUT', CONFIG, { token, body: version(stale, { name: 'Stale copy' }) });
      // source: RFC 9110 section 15.5.10 (409 Conflict with the current state of the resource)
      expect(res.status).toBe(409);
      expect(await res.json()).toEqual({
        error: {
          code: 'E_CONFLICT',
          message: `Version ${stale} is not newer than the current version 3; publish it as version 4 or later`,
        },
      });
    }
    expect(api.db.prepare('SELECT count(*) FROM site_configs').pluck().get()).toBe(2);
    const current = (await (await call(api.app, 'GET', CONFIG, { token })).json()) as SiteConfig;
    expect(current.name).toBe(demoConfig().name);
  });

  it('should answer 400 naming each wrong field and publish nothing', async () => {
    api = await makeApi();
    const token = await signIn(api.app, 'supervisor');
    const config = version(2) as unknown as Record<string, unknown>;
    const machines = structuredClone(config.machines) as Array<{ frame: { strokeM: number } }>;
    if (!machines[0]) throw new Error('demo has no machine');
    machines[0].frame.strokeM = -1;
    const bad = { ...config, name: '', machines, barometer: { kind: 'fixed', pressurePa: 5 }, colour: 'teal' };
    const res = await call(api.app, 'PUT', CONFIG, { token, body: bad });
    expect(res.status).toBe(400);
    const { error } = (await res.json()) as { error: { code: string; message: string } };
    expect(error.code).toBe('E_VALIDATION');
    expect(error.message).toMatch(/^The site configuration is not valid: /);
    expect(error.message).toContain('name: must not be empty');
    expect(error.message).toContain('machines.0.frame.strokeM: must be above 0');
    expect(error.message).toContain('barometer.pressurePa: must be between 40000 Pa and 110000 Pa');
    expect(error.message).toMatch(/Unrecognized key: "colour"/);
    expect(api.db.prepare('SELECT count(*) FROM site_configs').pluck().get()).toBe(1);
  });

  it('should answer 400 for a body that is not JSON and 403 for an operator or mechanic', async () => {
    api = await makeApi();
    const supervisor = await signIn(api.app, 'supervisor');
    expect((await call(api.app, 'PUT', CONFIG, { token: supervisor, raw: 'version: 2' })).status).toBe(400);
    for (const who of ['operator', 'mechanic'] as const) {
      const token = await signIn(api.app, who);
      const res = await call(api.app, 'PUT', CONFIG, { token, body: version(9) });
      // source: RFC 9110 section 15.5.4 (403 Forbidden: authenticated but not allowed)
      expect(res.status).toBe(403);
      expect(((await res.json()) as { error: { message: string } }).error.message).toMatch(/supervisor or admin/);
    }
    expect(api.db.prepare('SELECT max(version) FROM site_configs').pluck().get()).toBe(1);
    expect(api.logged.filter((e) => e.event === 'forbidden').map((e) => e.user)).toEqual(['operator', 'mechanic']);
  });

  it('should still evaluate a round with the configuration version it names', async () => {
    api = await makeApi();
    const admin = await signIn(api.app, 'admin');
    // Version 2 trips K-101's oil pressure far above what the demo reads; version 1 does not.
    const v2 = version(2);
    for (const route of v2.routes) {
      for (const point of route.points) if (point.id === 'K-101-LO-P') point.limits = { lowTrip: 900_000 };
    }
    expect((await call(api.app, 'PUT', CONFIG, { token: admin, body: v2 })).status).toBe(200);
    const operator = await signIn(api.app, 'operator');
    const round = roundBy('operator', demoRounds()[0] ?? expect.fail('no demo round'));
    expect(round.body.round.configVersion).toBe(1);
    const [result] = await push(api.app, operator, [round]);
    expect(result?.status).toBe('stored');
    expect(api.db.prepare('SELECT config_version, evaluation FROM server_rounds').get()).toEqual({
      config_version: 1,
      evaluation: 'done',
    });
    const oil = api.db
      .prepare("SELECT severity FROM server_findings WHERE rule = 'limits' AND key LIKE '%K-101-LO-P'")
      .pluck()
      .all();
    expect(oil).toEqual(['ok']);
    // The same readings under version 2 trip.
    const later = roundBy('operator', demoRounds()[0] ?? expect.fail('no demo round'));
    later.body.round.configVersion = 2;
    expect((await push(api.app, operator, [later]))[0]?.status).toBe('stored');
    const tripped = api.db
      .prepare("SELECT severity FROM server_findings WHERE round_id = ? AND key LIKE '%K-101-LO-P'")
      .pluck()
      .all(later.id);
    expect(tripped).toEqual(['trip']);
  });
});
