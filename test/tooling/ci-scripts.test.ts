/** The small scripts CI depends on: the closing summary line and the post-build precache check. */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const support = resolve(import.meta.dirname, '../support');
const scratch = mkdtempSync(join(tmpdir(), 'crankhouse-ci-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function run(script: string, ...args: string[]) {
  const result = spawnSync(process.execPath, [join(support, script), ...args], { encoding: 'utf8' });
  const lines = result.stdout.trim().split('\n');
  return { status: result.status, last: lines[lines.length - 1], stderr: result.stderr };
}

function report(name: string, body: object): string {
  const file = join(scratch, name);
  writeFileSync(file, JSON.stringify(body));
  return file;
}

describe('summary.mjs', () => {
  // The closing line format CI reads: "N passed, N failed" with an optional ", N skipped" and one leading word.
  it('should print the plain closing line and pass when every test passed', () => {
    const file = report('ok.json', {
      numPassedTests: 7,
      numFailedTests: 0,
      numPendingTests: 1,
      numTodoTests: 0,
      success: true,
      testResults: [],
    });
    expect(run('summary.mjs', file)).toMatchObject({ status: 0, last: 'vitest: 7 passed, 0 failed, 1 skipped' });
  });

  it('should fail when a test failed', () => {
    const file = report('bad.json', {
      numPassedTests: 6,
      numFailedTests: 1,
      numPendingTests: 0,
      success: false,
      testResults: [],
    });
    expect(run('summary.mjs', file)).toMatchObject({ status: 1, last: 'vitest: 6 passed, 1 failed, 0 skipped' });
  });

  it('should count a test file that failed to load as a failure', () => {
    const file = report('load.json', {
      numPassedTests: 3,
      numFailedTests: 0,
      numPendingTests: 0,
      success: false,
      testResults: [{ name: 'broken.test.ts', status: 'failed', message: 'SyntaxError', assertionResults: [] }],
    });
    expect(run('summary.mjs', file)).toMatchObject({ status: 1, last: 'vitest: 3 passed, 1 failed, 0 skipped' });
  });

  it('should fail when no test ran', () => {
    const file = report('none.json', {
      numPassedTests: 0,
      numFailedTests: 0,
      numPendingTests: 0,
      success: true,
      testResults: [],
    });
    const result = run('summary.mjs', file);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/no test ran/);
  });

  it('should fail when the report is missing', () => {
    const result = run('summary.mjs', join(scratch, 'missing.json'));
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/cannot read the Vitest JSON report/);
  });
});

describe('check-precache.mjs', () => {
  function fakeDist(name: string, precached: string[]): string {
    const dist = join(scratch, name);
    mkdirSync(join(dist, 'assets'), { recursive: true });
    for (const file of ['index.html', 'assets/index-abc.js', 'assets/Lazy-def.js', 'robots.txt']) {
      writeFileSync(join(dist, file), 'x');
    }
    const manifest = precached.map((url) => ({ url, revision: null }));
    writeFileSync(join(dist, 'sw.js'), `precacheAndRoute(${JSON.stringify(manifest)});`);
    return dist;
  }

  it('should pass when every app file is precached', () => {
    const dist = fakeDist('complete', ['index.html', 'assets/index-abc.js', 'assets/Lazy-def.js']);
    expect(run('check-precache.mjs', dist).status).toBe(0);
  });

  it('should fail and name a lazy chunk left out of the precache', () => {
    const dist = fakeDist('incomplete', ['index.html', 'assets/index-abc.js']);
    const result = run('check-precache.mjs', dist);
    expect(result.status).toBe(1);
    expect(result.stderr).toContain('assets/Lazy-def.js');
  });
});
