import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** A fresh folder under the OS temp dir; call `remove()` in afterEach/finally. */
export function makeTempDir(label: string): { path: string; remove: () => void } {
  const path = mkdtempSync(join(tmpdir(), `crankhouse-${label}-`));
  return { path, remove: () => rmSync(path, { recursive: true, force: true }) };
}

export const FAKE_INDEX_HTML =
  '<!doctype html><html><head><title>Crankhouse test shell</title></head><body></body></html>';
export const FAKE_SW_JS = 'self.addEventListener("fetch", () => {});\n';
export const FAKE_ASSET_JS = 'export const answer = 42;\n';
export const FAKE_MANIFEST = '{"name":"Crankhouse test","start_url":"/","display":"standalone"}';
export const FAKE_ASSET_PATH = '/assets/x-abc123.js';

/** A tiny stand-in for the Vite build output. */
export function writeFakeDist(distDir: string, opts: { withIndex?: boolean } = {}): void {
  mkdirSync(join(distDir, 'assets'), { recursive: true });
  mkdirSync(join(distDir, 'icons'), { recursive: true });
  if (opts.withIndex !== false) writeFileSync(join(distDir, 'index.html'), FAKE_INDEX_HTML);
  writeFileSync(join(distDir, 'sw.js'), FAKE_SW_JS);
  writeFileSync(join(distDir, 'app.webmanifest'), FAKE_MANIFEST);
  writeFileSync(join(distDir, FAKE_ASSET_PATH), FAKE_ASSET_JS);
  // The 8-byte PNG signature is enough for a static file server.
  writeFileSync(join(distDir, 'icons', 'icon-192.png'), Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
}
