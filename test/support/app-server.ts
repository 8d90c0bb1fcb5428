/**
 * The real site server on a private copy of the production build, for browser tests and benches that drive the
 * whole app. It can be stopped (the tablet is then offline: Playwright's offline switch does not cut the service
 * worker's own requests) and started again on the same port, so the origin, its service worker and IndexedDB stay.
 */
import { cpSync, existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { readServerConfig } from '../../src/server/config';
import { type RunningServer, startServer } from '../../src/server/main';

export const ROOT = resolve(import.meta.dirname, '../..');
export const BUILT_DIST = join(ROOT, 'dist');

export function assertBuilt(): void {
  if (!existsSync(join(BUILT_DIST, 'index.html')) || !existsSync(join(BUILT_DIST, 'sw.js'))) {
    throw new Error('The browser tests run against the production build: run "npm run build" first (npm test does).');
  }
}

export interface AppServer {
  /** `http://127.0.0.1:<port>`; the port stays the same across stop and start. */
  readonly origin: string;
  readonly running: boolean;
  start(): Promise<void>;
  stop(): Promise<void>;
  /** Stops the server and removes its temp folder (database and build copy). */
  close(): Promise<void>;
}

/** Every demo person signs in with this passcode in the tests (invented, for the test server only). */
export const DEMO_PASSCODE = '271828';

/** Starts the server with its own temp data folder and build copy; the demo site is seeded on first start. */
export async function startAppServer(options: { siteName?: string } = {}): Promise<AppServer> {
  assertBuilt();
  const scratch = mkdtempSync(join(tmpdir(), 'crankhouse-app-'));
  try {
    const distDir = join(scratch, 'dist');
    cpSync(BUILT_DIST, distDir, { recursive: true });
    let port = 0;
    let server: RunningServer | null = null;
    const start = async () => {
      if (server) return;
      const config = readServerConfig(
        {
          PORT: String(port),
          HOST: '127.0.0.1',
          CRANKHOUSE_DATA: join(scratch, 'data'),
          CRANKHOUSE_DIST: distDir,
          ...(options.siteName ? { CRANKHOUSE_SITE_NAME: options.siteName } : {}),
          CRANKHOUSE_DEMO_PASSCODE: DEMO_PASSCODE,
        },
        ROOT,
      );
      server = await startServer(config, { log: () => {} });
      port = server.port;
    };
    const stop = async () => {
      const running = server;
      server = null;
      await running?.close();
    };
    await start();
    return {
      get origin() {
        return `http://127.0.0.1:${port}`;
      },
      get running() {
        return server !== null;
      },
      start,
      stop,
      async close() {
        try {
          await stop();
        } finally {
          rmSync(scratch, { recursive: true, force: true });
        }
      },
    };
  } catch (error) {
    rmSync(scratch, { recursive: true, force: true });
    throw error;
  }
}
