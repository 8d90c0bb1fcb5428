/**
 * `npm run bench`: prints a table of speed and size figures and writes them to test-output/bench/results.json.
 * Targets are judged here, never by timed assertions inside tests. Add a bench by appending to BENCHES.
 * `npm run bench -- <name> …` runs only the benches named (e.g. `npm run bench -- findings trend`).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { bundleSize } from './bundle-size';
import { calcSpeed } from './calc-speed';
import { checksSpeed } from './checks-speed';
import { findingsQuery } from './findings-query';
import { roundEntry } from './round-entry';
import type { Bench, BenchRow } from './rows';
import { serverIngest } from './server-ingest';
import { storeSpeed } from './store-speed';
import { trendRender } from './trend-render';

const BENCHES: Array<[string, Bench]> = [
  ['bundle', bundleSize],
  ['calc', calcSpeed],
  ['checks', checksSpeed],
  ['store', storeSpeed],
  ['server', serverIngest],
  ['round entry', roundEntry],
  ['findings', findingsQuery],
  ['trend', trendRender],
];

const chosen = process.argv.slice(2);
const unknown = chosen.filter((name) => !BENCHES.some(([bench]) => bench === name));
if (unknown.length > 0) {
  throw new Error(`No bench named ${unknown.join(', ')}; the benches are: ${BENCHES.map(([name]) => name).join(', ')}`);
}
const rows: Array<BenchRow & { bench: string }> = [];
for (const [name, bench] of BENCHES) {
  if (chosen.length > 0 && !chosen.includes(name)) continue;
  for (const row of await bench()) rows.push({ bench: name, ...row });
}

const header = ['bench', 'figure', 'value', 'unit', 'note'];
const cells = rows.map((row) => [row.bench, row.figure, String(row.value), row.unit, row.note]);
const widths = header.map((title, column) =>
  Math.max(title.length, ...cells.map((line) => (line[column] ?? '').length)),
);
const line = (values: string[]) =>
  `| ${values.map((value, column) => (column === 2 ? value.padStart(widths[column] ?? 0) : value.padEnd(widths[column] ?? 0))).join(' | ')} |`;
console.log(line(header));
console.log(`|${widths.map((width) => '-'.repeat(width + 2)).join('|')}|`);
for (const values of cells) console.log(line(values));

const outDir = resolve(import.meta.dirname, '../../test-output/bench');
mkdirSync(outDir, { recursive: true });
writeFileSync(
  join(outDir, 'results.json'),
  `${JSON.stringify({ measuredAt: new Date().toISOString(), rows }, null, 2)}\n`,
);
