import { existsSync, readFileSync, realpathSync } from 'node:fs';
import type { Server as HttpServer } from 'node:http';
import { createServer as createHttpsServer } from 'node:https';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { serve } from '@hono/node-server';
import { createApp } from './app';
import { readServerConfig, type ServerConfig } from './config';
import { openDatabase } from './db';
import { type Logger, logToStderr } from './errors';
import { formatSignIns, laterStartSignIns, type SeedResult, seedDemoSite } from './seed';

/** How long shutdown waits for open requests before cutting their connections. */
export const SHUTDOWN_GRACE_MS = 10_000;

export interface StartOptions {
  /** Defaults to the version in package.json. */
  version?: string;
  log?: Logger;
  migrationsDir?: string;
}

export interface RunningServer {
  /** Where a browser on this machine reaches the server, e.g. `http://localhost:8080`. */
  url: string;
  port: number;
  /** Stops accepting, lets open requests finish (cut after 10 s), then closes the database. */
  close(): Promise<void>;
  /**
   * The demo sign-ins: at the start that seeded them, each person's passcode (shown once, never stored); on a later
   * start only a line saying where the passcodes were shown. Null when the demo is off or was never seeded here.
   */
  demo: { signIns: SeedResult['signIns']; message: string } | null;
}

/** The version field of the project's package.json, read at run time. */
export function readPackageVersion(): string {
  const file = join(import.meta.dirname, '..', '..', 'package.json');
  const pkg: unknown = JSON.parse(readFileSync(file, 'utf8'));
  const version = (pkg as { version?: unknown }).version;
  if (typeof version !== 'string' || version === '') throw new Error(`${file} has no "version" string`);
  return version;
}

function readTlsFiles(tls: NonNullable<ServerConfig['tls']>): { cert: Buffer; key: Buffer } {
  const readPem = (path: string, variable: string): Buffer => {
    try {
      return readFileSync(path);
    } catch (err) {
      throw new Error(`Cannot read ${variable} file ${path}: ${(err as Error).message}`, { cause: err });
    }
  };
  return { cert: readPem(tls.certPath, 'CRANKHOUSE_TLS_CERT'), key: readPem(tls.keyPath, 'CRANKHOUSE_TLS_KEY') };
}

function displayUrl(config: ServerConfig, port: number): string {
  const scheme = config.tls ? 'https' : 'http';
  const wildcard = config.host === '0.0.0.0' || config.host === '::';
  const host = wildcard ? 'localhost' : config.host.includes(':') ? `[${config.host}]` : config.host;
  return `${scheme}://${host}:${port}`;
}

/** Opens the database, builds the app and listens. Used by `main()` and by the browser tests. */
export async function startServer(config: ServerConfig, opts: StartOptions = {}): Promise<RunningServer> {
  const version = opts.version ?? readPackageVersion();
  const tlsFiles = config.tls ? readTlsFiles(config.tls) : undefined;
  const db = openDatabase(config.dataDir, opts.migrationsDir ? { migrationsDir: opts.migrationsDir } : {});
  let demo: RunningServer['demo'] = null;
  if (config.seedDemo) {
    const log = opts.log ?? logToStderr;
    try {
      const seeded = await seedDemoSite(db, {
        log,
        ...(config.demoPasscode === undefined ? {} : { passcode: config.demoPasscode }),
      });
      if (seeded.seeded) {
        // The passcodes are for the person starting the server (stdout), never for the log.
        log({ time: new Date().toISOString(), event: 'demo-seeded', records: seeded.records });
        if (seeded.signIns.length > 0) demo = { signIns: seeded.signIns, message: formatSignIns(seeded.signIns) };
      } else {
        const message = await laterStartSignIns(db, config.demoPasscode);
        if (message) demo = { signIns: [], message };
      }
    } catch (err) {
      db.close();
      throw err;
    }
  }
  const app = createApp({ db, distDir: config.distDir, version, siteName: config.siteName, log: opts.log });

  let server: HttpServer;
  let port: number;
  try {
    ({ server, port } = await new Promise<{ server: HttpServer; port: number }>((resolve, reject) => {
      const base = { fetch: app.fetch, port: config.port, hostname: config.host };
      const onListening = (info: { port: number }) => resolve({ server: created, port: info.port });
      // serve() is typed for HTTP/2 servers too; this server only ever creates HTTP/1.1 ones.
      const created = (
        tlsFiles
          ? serve({ ...base, createServer: createHttpsServer, serverOptions: tlsFiles }, onListening)
          : serve(base, onListening)
      ) as HttpServer;
      created.once('error', (err: NodeJS.ErrnoException) => {
        const where = `${config.host}:${config.port}`;
        reject(
          err.code === 'EADDRINUSE'
            ? new Error(`Port ${config.port} on ${config.host} is already in use; set PORT to a free port`)
            : new Error(`Cannot listen on ${where}: ${err.message}`, { cause: err }),
        );
      });
    }));
  } catch (err) {
    db.close();
    throw err;
  }

  let stopping = false;
  // Keep-alive sockets that finish a request after shutdown began would otherwise stay open until
  // their keep-alive timeout.
  server.on('request', (_req, res) => {
    res.once('finish', () => {
      if (stopping) setImmediate(() => server.closeIdleConnections());
    });
  });

  let closed: Promise<void> | undefined;
  const close = (): Promise<void> => {
    closed ??= new Promise<void>((resolve, reject) => {
      stopping = true;
      const force = setTimeout(() => server.closeAllConnections(), SHUTDOWN_GRACE_MS);
      force.unref();
      server.close((err) => {
        clearTimeout(force);
        try {
          // Closing the last connection checkpoints the WAL into the main file and removes it.
          db.close();
        } catch (dbErr) {
          reject(dbErr);
          return;
        }
        if (err) reject(err);
        else resolve();
      });
      server.closeIdleConnections();
    });
    return closed;
  };

  return { url: displayUrl(config, port), port, close, demo };
}

function oneLine(err: unknown): string {
  return (err instanceof Error ? err.message : String(err)).replace(/\s*\n\s*/g, ' ');
}

async function main(): Promise<void> {
  let running: RunningServer | undefined;
  let stopSignal: NodeJS.Signals | undefined;

  const stop = (signal: NodeJS.Signals): void => {
    stopSignal = signal;
    // A signal during start-up is acted on once the server is up (below).
    if (!running) return;
    process.stdout.write(`${signal} received, stopping…\n`);
    // A second signal means "now": skip waiting for open requests.
    process.once(signal, () => process.exit(1));
    running.close().then(
      () => {
        process.stdout.write('Stopped.\n');
        process.exit(0);
      },
      (err: unknown) => {
        process.stderr.write(`Crankhouse did not stop cleanly: ${oneLine(err)}\n`);
        process.exit(1);
      },
    );
  };
  // Registered before anything is printed: whoever reads "running at" may signal at once.
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);

  let config: ServerConfig;
  let version: string;
  try {
    config = readServerConfig(process.env, process.cwd());
    version = readPackageVersion();
    running = await startServer(config, { version });
  } catch (err) {
    process.stderr.write(`Crankhouse could not start: ${oneLine(err)}\n`);
    process.exit(1);
  }
  process.stdout.write(`Crankhouse is running at ${running.url}\n`);
  process.stdout.write(`Data folder: ${config.dataDir}\n`);
  process.stdout.write(`Version: ${version}\n`);
  if (running.demo) process.stdout.write(`${running.demo.message}\n`);
  if (!existsSync(join(config.distDir, 'index.html'))) {
    process.stdout.write(`Warning: ${join(config.distDir, 'index.html')} is missing; run npm run build\n`);
  }
  if (stopSignal) stop(stopSignal);
}

function isEntryPoint(): boolean {
  const entry = process.argv[1];
  if (!entry) return false;
  try {
    return realpathSync(entry) === realpathSync(fileURLToPath(import.meta.url));
  } catch {
    return false;
  }
}

if (isEntryPoint()) await main();
