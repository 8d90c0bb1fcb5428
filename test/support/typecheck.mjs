#!/usr/bin/env node
// Type-checks every runtime project listed in tsconfig.json's references, each with its own `lib`,
// so a browser API in the server (or a Node module in the page) fails here.
import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { resolve } from 'node:path';

const root = resolve(import.meta.dirname, '../..');
const solution = JSON.parse(readFileSync(resolve(root, 'tsconfig.json'), 'utf8').replace(/^\s*\/\/.*$/gm, ''));
const tsc = resolve(root, 'node_modules/.bin/tsc');
let failed = 0;
/** A room that has no TypeScript yet (its issue has not landed) has nothing to check; tsc would fail on it. */
function hasSources(dir) {
  return readdirSync(resolve(root, dir), { recursive: true }).some((name) => /\.tsx?$/.test(String(name)));
}

for (const { path } of solution.references) {
  if (!hasSources(path)) {
    console.log(`typecheck skip ${path} (no TypeScript files yet)`);
    continue;
  }
  const result = spawnSync(tsc, ['--noEmit', '-p', path], { cwd: root, stdio: 'inherit' });
  const ok = result.status === 0;
  console.log(`typecheck ${ok ? 'ok  ' : 'FAIL'} ${path}`);
  if (!ok) failed += 1;
}
process.exit(failed ? 1 : 0);
