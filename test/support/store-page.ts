/**
 * A blank page that carries the store bundle, for tests and benches that drive the store in real Chromium without
 * the app: the bundle is built with Vite's library mode and served from 127.0.0.1 on a free port.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { createServer } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import { build } from 'vite';
import type * as StoreBundle from './store-bundle';

const root = resolve(import.meta.dirname, '../..');

/** What the page sees: `window.crankhouseStore`. */
export type StoreWindow = Window & { crankhouseStore: typeof StoreBundle };

/** Builds test/support/store-bundle.ts into `outDir/store.js` (IIFE, global `crankhouseStore`). */
export async function buildStoreBundle(outDir = join(root, 'test-output', 'store-bundle')): Promise<string> {
  await build({
    configFile: false,
    root,
    logLevel: 'silent',
    publicDir: false,
    build: {
      outDir,
      emptyOutDir: true,
      target: 'es2022',
      minify: false,
      sourcemap: false,
      lib: {
        entry: join(root, 'test/support/store-bundle.ts'),
        name: 'crankhouseStore',
        formats: ['iife'],
        fileName: () => 'store.js',
      },
    },
  });
  return join(outDir, 'store.js');
}

export interface StorePage {
  origin: string;
  close(): Promise<void>;
}

const PAGE =
  '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>store</title>' +
  '<script src="/store.js"></script></head><body></body></html>';

/** Serves the blank page at `/` and the bundle at `/store.js`. */
export async function serveStorePage(bundleFile: string): Promise<StorePage> {
  const bundle = readFileSync(bundleFile);
  const server = createServer((request, response) => {
    if (request.url === '/store.js') {
      response.writeHead(200, { 'Content-Type': 'text/javascript', 'Cache-Control': 'no-store' });
      response.end(bundle);
    } else if (request.url === '/') {
      response.writeHead(200, { 'Content-Type': 'text/html; charset=utf-8', 'Cache-Control': 'no-store' });
      response.end(PAGE);
    } else {
      response.writeHead(404).end();
    }
  });
  await new Promise<void>((done) => server.listen(0, '127.0.0.1', done));
  const { port } = server.address() as AddressInfo;
  return {
    origin: `http://127.0.0.1:${port}`,
    close: () =>
      new Promise<void>((done) => {
        server.closeAllConnections();
        server.close(() => done());
      }),
  };
}

/**
 * The browser process of a profile: its command line holds `--user-data-dir=<profile>` and no `--type=`
 * (renderers, GPU and utility processes carry `--type=`).
 */
export function browserPids(profileDir: string): number[] {
  const pids: number[] = [];
  for (const entry of readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    let args: string[];
    try {
      args = readFileSync(`/proc/${entry}/cmdline`, 'utf8').split('\0');
    } catch {
      continue;
    }
    if (args.includes(`--user-data-dir=${profileDir}`) && !args.some((arg) => arg.startsWith('--type='))) {
      pids.push(Number(entry));
    }
  }
  return pids;
}
