import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { connect, createServer } from 'node:net';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openDatabase } from '../../src/server/db';
import { startServer } from '../../src/server/main';
import { killIfRunning, SEED_WAIT_MS, spawnMain, WAIT_MS, waitForExit, waitForOutput } from './child';
import { FAKE_INDEX_HTML, makeTempDir, writeFakeDist } from './fixtures';

const ROOT = fileURLToPath(new URL('../..', import.meta.url));
const PACKAGE_VERSION = (JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8')) as { version: string }).version;
const SECRET = 'TRAVERSAL-MARKER-51c0';

let temp: ReturnType<typeof makeTempDir>;
let dataDir: string;
let distDir: string;

beforeEach(() => {
  temp = makeTempDir('main');
  dataDir = join(temp.path, 'data');
  distDir = join(temp.path, 'dist');
  writeFakeDist(distDir);
  writeFileSync(join(temp.path, 'package.json'), JSON.stringify({ secret: SECRET }));
});
afterEach(() => {
  temp.remove();
});

/** Sends a request line exactly as written, so no client normalises the path first. */
function rawGet(port: number, target: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, '127.0.0.1');
    let response = '';
    socket.setTimeout(WAIT_MS, () => socket.destroy(new Error(`no answer for ${target}`)));
    socket.on('data', (chunk: Buffer) => {
      response += chunk.toString('latin1');
    });
    socket.on('end', () => resolve(response));
    socket.on('error', reject);
    socket.write(`GET ${target} HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n`);
  });
}

function walSize(): number {
  const wal = join(dataDir, 'crankhouse.sqlite-wal');
  return existsSync(wal) ? statSync(wal).size : 0;
}

describe('main.ts as a process', () => {
  it('should start, answer health, and stop cleanly on SIGTERM leaving no WAL behind', {
    timeout: 60_000,
  }, async () => {
    const child = spawnMain({ PORT: '0', HOST: '127.0.0.1', CRANKHOUSE_DATA: dataDir, CRANKHOUSE_DIST: distDir });
    try {
      const match = await waitForOutput(child, /running at (http:\/\/127\.0\.0\.1:(\d+))\n/);
      await waitForOutput(child, /Version: .*\n/);
      expect(child.stdout()).toContain(`Data folder: ${dataDir}\n`);
      expect(child.stdout()).toContain(`Version: ${PACKAGE_VERSION}\n`);

      const res = await fetch(`${match[1]}/api/v1/health`);
      expect(res.status).toBe(200);
      expect(await res.json()).toEqual({ ok: true, version: PACKAGE_VERSION, database: 'ok' });
      const page = await fetch(`${match[1]}/rounds/42`);
      expect(await page.text()).toBe(FAKE_INDEX_HTML);

      child.process.kill('SIGTERM');
      const exit = await waitForExit(child);
      expect(exit).toEqual({ code: 0, signal: null });
      expect(walSize()).toBe(0);
      expect(existsSync(join(dataDir, 'crankhouse.sqlite'))).toBe(true);
    } finally {
      killIfRunning(child);
    }
  });

  it('should also stop cleanly on SIGINT', { timeout: 60_000 }, async () => {
    const child = spawnMain({ PORT: '0', HOST: '127.0.0.1', CRANKHOUSE_DATA: dataDir, CRANKHOUSE_DIST: distDir });
    try {
      await waitForOutput(child, /Version: .*\n/);
      child.process.kill('SIGINT');
      expect(await waitForExit(child)).toEqual({ code: 0, signal: null });
      expect(walSize()).toBe(0);
    } finally {
      killIfRunning(child);
    }
  });

  it('should exit 1 with one line naming PORT when PORT is bad', { timeout: 60_000 }, async () => {
    const child = spawnMain({ PORT: 'eighty', CRANKHOUSE_DATA: dataDir, CRANKHOUSE_DIST: distDir });
    try {
      const exit = await waitForExit(child);
      expect(exit.code).toBe(1);
      const lines = child.stderr().trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toMatch(/PORT.*"eighty"/);
      expect(existsSync(dataDir)).toBe(false);
    } finally {
      killIfRunning(child);
    }
  });

  it('should exit 1 naming CRANKHOUSE_DATA when the data folder cannot be made', { timeout: 60_000 }, async () => {
    const blocker = join(temp.path, 'a-file');
    writeFileSync(blocker, 'not a folder');
    const child = spawnMain({ PORT: '0', CRANKHOUSE_DATA: join(blocker, 'data'), CRANKHOUSE_DIST: distDir });
    try {
      const exit = await waitForExit(child);
      expect(exit.code).toBe(1);
      expect(child.stderr()).toMatch(/could not start: .*CRANKHOUSE_DATA/);
      expect(child.stdout()).not.toContain('running at');
    } finally {
      killIfRunning(child);
    }
  });
});

describe('startServer', () => {
  it('should serve on a free port, refuse raw traversal, and close the database on close()', async () => {
    const server = await startServer(
      { port: 0, host: '127.0.0.1', dataDir, distDir, siteName: 'Test Flats', seedDemo: false },
      { version: '0.0.0-test', log: () => {} },
    );
    let closed = false;
    try {
      expect(server.url).toBe(`http://127.0.0.1:${server.port}`);
      const site = await fetch(`${server.url}/api/v1/site`);
      expect(await site.json()).toEqual({ name: 'Test Flats' });

      for (const target of [
        '/../package.json',
        '/../../package.json',
        '/%2e%2e/package.json',
        '/assets/..%2f..%2fpackage.json',
        '/assets/%2e%2e%2f%2e%2e%2fpackage.json',
        '/..\\package.json',
        '/assets/..\\..\\package.json',
      ]) {
        const response = await rawGet(server.port, target);
        expect(response, target).toMatch(/^HTTP\/1\.1 4\d\d /);
        expect(response, target).not.toContain(SECRET);
      }

      // The fetch above left a keep-alive connection open; close() must not wait for it.
      await server.close();
      closed = true;
      expect(walSize()).toBe(0);
      const reopened = openDatabase(dataDir);
      reopened.close();
      await expect(server.close()).resolves.toBeUndefined();
    } finally {
      if (!closed) await server.close();
    }
  });

  it('should fail with a clear message when the port is taken', async () => {
    const blocker = createServer();
    await new Promise<void>((resolve) => blocker.listen(0, '127.0.0.1', resolve));
    const address = blocker.address();
    const port = typeof address === 'object' && address ? address.port : -1;
    try {
      await expect(
        startServer(
          { port, host: '127.0.0.1', dataDir, distDir, siteName: 'Test Flats', seedDemo: false },
          { version: '0.0.0-test' },
        ),
      ).rejects.toThrow(new RegExp(`Port ${port} on 127\\.0\\.0\\.1 is already in use; set PORT`));
      expect(walSize()).toBe(0);
    } finally {
      await new Promise<void>((resolve) => blocker.close(() => resolve()));
    }
  });

  it('should name the TLS variable when a certificate file cannot be read', async () => {
    const certPath = join(temp.path, 'missing-cert.pem');
    await expect(
      startServer(
        {
          port: 0,
          host: '127.0.0.1',
          dataDir,
          distDir,
          siteName: 'Test Flats',
          seedDemo: false,
          tls: { certPath, keyPath: join(temp.path, 'missing-key.pem') },
        },
        { version: '0.0.0-test' },
      ),
    ).rejects.toThrow(/CRANKHOUSE_TLS_CERT file .*missing-cert\.pem/);
  });
});

describe('demo sign-ins', () => {
  it('should print the sign-ins at the first start and only say where they were on later starts', {
    timeout: 180_000,
  }, async () => {
    const env = {
      PORT: '0',
      HOST: '127.0.0.1',
      CRANKHOUSE_DATA: dataDir,
      CRANKHOUSE_DIST: distDir,
      CRANKHOUSE_DEMO: '1',
      CRANKHOUSE_DEMO_PASSCODE: 'cedar-flats-7',
    };
    const first = spawnMain(env);
    try {
      const line = await waitForOutput(first, /Demo sign-ins: (.*)\n/, SEED_WAIT_MS);
      expect(line[1]).toBe(
        'operator / cedar-flats-7, operator2 / cedar-flats-7, mechanic / cedar-flats-7, supervisor / cedar-flats-7, admin / cedar-flats-7',
      );
      const url = (await waitForOutput(first, /running at (http:\/\/\S+)\n/))[1];
      const res = await fetch(`${url}/api/v1/sessions`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({
          user: 'supervisor',
          passcode: 'cedar-flats-7',
          device: { id: 'office-1', name: 'Office' },
        }),
        signal: AbortSignal.timeout(WAIT_MS),
      });
      expect(res.status).toBe(201);
      expect(((await res.json()) as { user: unknown }).user).toEqual({
        id: 'supervisor',
        name: 'Dale Whitford',
        roles: ['supervisor'],
      });
      // The log (stderr) never carries a passcode.
      expect(first.stderr()).not.toContain('cedar-flats-7');
      first.process.kill('SIGTERM');
      expect(await waitForExit(first)).toEqual({ code: 0, signal: null });
    } finally {
      killIfRunning(first);
    }

    const second = spawnMain(env);
    try {
      const line = await waitForOutput(second, /Demo sign-ins: (.*)\n/);
      expect(line[1]).toBe(
        'operator, operator2, mechanic, supervisor, admin, with the passcode set in CRANKHOUSE_DEMO_PASSCODE',
      );
      expect(second.stdout()).not.toContain('cedar-flats-7');
      second.process.kill('SIGTERM');
      await waitForExit(second);
    } finally {
      killIfRunning(second);
    }

    const third = spawnMain({ ...env, CRANKHOUSE_DEMO_PASSCODE: 'another-one-8' });
    try {
      const line = await waitForOutput(third, /Demo sign-ins: (.*)\n/);
      expect(line[1]).toMatch(
        /^operator, operator2, mechanic, supervisor, admin; their passcodes were shown when the demo was seeded at first start \(\d{4}-\d{2}-\d{2}T[\d:.]+Z\)$/,
      );
      third.process.kill('SIGTERM');
      await waitForExit(third);
    } finally {
      killIfRunning(third);
    }
  });

  it('should give each demo person a random 6-digit passcode when none is configured', {
    timeout: 120_000,
  }, async () => {
    const logged: string[] = [];
    const server = await startServer(
      { port: 0, host: '127.0.0.1', dataDir, distDir, siteName: 'Test Flats', seedDemo: true },
      { version: '0.0.0-test', log: (entry) => logged.push(JSON.stringify(entry)) },
    );
    try {
      const signIns = server.demo?.signIns ?? [];
      expect(signIns.map((s) => [s.user, s.roles])).toEqual([
        ['operator', ['operator']],
        ['operator2', ['operator']],
        ['mechanic', ['mechanic']],
        ['supervisor', ['supervisor']],
        ['admin', ['admin']],
      ]);
      for (const s of signIns) expect(s.passcode).toMatch(/^\d{6}$/);
      expect(server.demo?.message).toBe(`Demo sign-ins: ${signIns.map((s) => `${s.user} / ${s.passcode}`).join(', ')}`);
      const mechanic = signIns.find((s) => s.user === 'mechanic');
      const res = await fetch(`${server.url}/api/v1/sessions`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({
          user: 'mechanic',
          passcode: mechanic?.passcode,
          device: { id: 'tablet-2', name: 'T2' },
        }),
        signal: AbortSignal.timeout(WAIT_MS),
      });
      expect(res.status).toBe(201);
      expect(logged.some((line) => line.includes('demo-seeded'))).toBe(true);
      for (const s of signIns) expect(logged.join('\n')).not.toContain(`"${s.passcode}"`);
    } finally {
      await server.close();
    }
  });
});
