/**
 * Bundle figures of the production build: what a tablet downloads for the first screen, compared with an empty
 * Preact page built the same way, and what the service worker stores for offline use.
 */
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { gzipSync } from 'node:zlib';
import preact from '@preact/preset-vite';
import { build } from 'vite';
import type { BenchRow } from './rows';

const root = resolve(import.meta.dirname, '../..');
const KIB = 1024;

interface Size {
  raw: number;
  gzip: number;
  files: string[];
}

/** The files the browser fetches before first paint: the HTML, its entry script, preloads and stylesheets. */
export function initialRouteSize(distDir: string): Size {
  const html = readFileSync(join(distDir, 'index.html'), 'utf8');
  const urls = [
    ...html.matchAll(/<script[^>]+src="([^"]+)"/g),
    ...html.matchAll(/<link[^>]+rel="(?:modulepreload|stylesheet)"[^>]+href="([^"]+)"/g),
    ...html.matchAll(/<link[^>]+href="([^"]+)"[^>]+rel="(?:modulepreload|stylesheet)"/g),
  ].map((match) => match[1] ?? '');
  const files = ['index.html', ...new Set(urls.map((url) => url.replace(/^\//, '')))];
  let raw = 0;
  let gzip = 0;
  for (const file of files) {
    const bytes = readFileSync(join(distDir, file));
    raw += bytes.length;
    gzip += gzipSync(bytes, { level: 9 }).length;
  }
  return { raw, gzip, files };
}

async function buildApp(): Promise<string> {
  await build({ configFile: join(root, 'vite.config.ts'), logLevel: 'silent' });
  return join(root, 'dist');
}

/** An empty Preact page with the same bundler, preset, target and minifier as the app. */
async function buildEmptyPreactPage(): Promise<string> {
  const dir = join(root, 'test-output', 'bench', 'empty-preact');
  rmSync(dir, { recursive: true, force: true });
  mkdirSync(dir, { recursive: true });
  writeFileSync(
    join(dir, 'index.html'),
    '<!doctype html><html lang="en"><head><meta charset="utf-8"><title>empty</title>' +
      '<script type="module" src="/main.tsx"></script></head><body><div id="root"></div></body></html>',
  );
  writeFileSync(
    join(dir, 'main.tsx'),
    "import { render } from 'preact';\nrender(<div />, document.getElementById('root') as HTMLElement);\n",
  );
  await build({
    configFile: false,
    root: dir,
    logLevel: 'silent',
    plugins: [preact()],
    build: { outDir: join(dir, 'dist'), emptyOutDir: true, target: 'es2022', sourcemap: false },
  });
  return join(dir, 'dist');
}

function precacheFigures(distDir: string): { count: number; bytes: number; worker: Size } {
  const worker = readFileSync(join(distDir, 'sw.js'));
  const urls = [...worker.toString('utf8').matchAll(/"?url"?:\s*"([^"]+)"/g)].map((match) => match[1] ?? '');
  const bytes = urls.reduce((sum, url) => sum + readFileSync(join(distDir, url)).length, 0);
  return {
    count: urls.length,
    bytes,
    worker: { raw: worker.length, gzip: gzipSync(worker, { level: 9 }).length, files: ['sw.js'] },
  };
}

export async function bundleSize(): Promise<BenchRow[]> {
  const empty = initialRouteSize(await buildEmptyPreactPage());
  const distDir = await buildApp();
  const app = initialRouteSize(distDir);
  const precache = precacheFigures(distDir);
  const kib = (bytes: number) => Math.round((bytes / KIB) * 100) / 100;
  const ratio = (a: number, b: number) => Math.round((a / b) * 100) / 100;
  return [
    {
      figure: 'initial route, raw',
      value: kib(app.raw),
      unit: 'KiB',
      note: `${ratio(app.raw, empty.raw)}× empty Preact page (${kib(empty.raw)} KiB); ${app.files.join(', ')}`,
    },
    {
      figure: 'initial route, gzip -9',
      value: kib(app.gzip),
      unit: 'KiB',
      note: `${ratio(app.gzip, empty.gzip)}× empty Preact page (${kib(empty.gzip)} KiB)`,
    },
    {
      figure: 'service worker sw.js, gzip -9',
      value: kib(precache.worker.gzip),
      unit: 'KiB',
      note: `${kib(precache.worker.raw)} KiB raw`,
    },
    {
      figure: 'precached for offline use',
      value: kib(precache.bytes),
      unit: 'KiB',
      note: `${precache.count} files, raw`,
    },
  ];
}
