#!/usr/bin/env node
// Prints the plain closing line CI reads, from Vitest's JSON report:
//   vitest: N passed, N failed, N skipped
// Exits 1 when the report is missing, unreadable or holds no test at all.
import { readFileSync } from 'node:fs';

const file = process.argv[2] ?? 'test-results.json';
let report;
try {
  report = JSON.parse(readFileSync(file, 'utf8'));
} catch (error) {
  console.error(`summary: cannot read the Vitest JSON report ${file}: ${error.message}`);
  console.log('vitest: 0 passed, 1 failed, 0 skipped');
  process.exit(1);
}
const passed = report.numPassedTests ?? 0;
const failed = report.numFailedTests ?? 0;
const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
const suiteErrors = (report.testResults ?? []).filter(
  (suite) => suite.status === 'failed' && suite.assertionResults?.length === 0,
);
const total = passed + failed + skipped;
if (suiteErrors.length > 0) {
  for (const suite of suiteErrors)
    console.error(`summary: ${suite.name} failed to load: ${suite.message ?? 'no message'}`);
}
console.log(`vitest: ${passed} passed, ${failed + suiteErrors.length} failed, ${skipped} skipped`);
if (total === 0) {
  console.error('summary: no test ran');
  process.exit(1);
}
process.exit(failed + suiteErrors.length > 0 || report.success === false ? 1 : 0);
