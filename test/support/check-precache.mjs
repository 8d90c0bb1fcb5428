#!/usr/bin/env node
// After `vite build`: every file the app may load must be in the service worker's precache list,
// or the app breaks the first time a screen is opened without network. Fails the build otherwise.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative, resolve } from 'node:path';

const dist = resolve(process.argv[2] ?? resolve(import.meta.dirname, '../../dist'));
const NOT_PRECACHED = new Set(['sw.js', 'robots.txt']);

function walk(dir) {
  return readdirSync(dir).flatMap((name) => {
    const file = join(dir, name);
    return statSync(file).isDirectory() ? walk(file) : [relative(dist, file).split('\\').join('/')];
  });
}

let worker;
try {
  worker = readFileSync(join(dist, 'sw.js'), 'utf8');
} catch {
  console.error(`check-precache: ${dist}/sw.js is missing; run the build first.`);
  process.exit(1);
}
const precached = new Set([...worker.matchAll(/"?url"?:\s*"([^"]+)"/g)].map((match) => match[1]));
const missing = walk(dist).filter((file) => !NOT_PRECACHED.has(file) && !precached.has(file));
if (missing.length > 0) {
  console.error(
    `check-precache: not in the precache list of sw.js, so unavailable offline:\n  ${missing.join('\n  ')}`,
  );
  process.exit(1);
}
console.log(`check-precache: all ${precached.size} app files are precached`);
