/**
 * The rooms of DEVELOPERS.md are enforced by tools, not by goodwill: Biome's noRestrictedImports fences heavy
 * dependencies and cross-room imports, and each runtime's tsconfig `lib` rejects APIs of another runtime.
 * These tests put a probe file in each room and check that the tools really say no (and yes where allowed).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = resolve(import.meta.dirname, '../..');
const probeName = `__fence-probe-${process.pid}.ts`;

interface FenceCase {
  room: string;
  specifier: string;
  allowed: boolean;
}

const CASES: FenceCase[] = [
  { room: 'src/calc', specifier: 'zod', allowed: false },
  { room: 'src/calc', specifier: '../schema/health', allowed: false },
  { room: 'src/calc', specifier: './units', allowed: true },
  { room: 'src/schema', specifier: 'zod', allowed: true },
  { room: 'src/schema', specifier: 'idb', allowed: false },
  { room: 'src/checks', specifier: '../calc/index', allowed: true },
  { room: 'src/checks', specifier: '../store/db', allowed: false },
  { room: 'src/demo', specifier: '../checks/index', allowed: true },
  { room: 'src/demo', specifier: '../store/db', allowed: false },
  { room: 'src/store', specifier: 'idb', allowed: true },
  { room: 'src/sync', specifier: 'idb', allowed: false },
  { room: 'src/app', specifier: 'idb', allowed: false },
  { room: 'src/app', specifier: 'uplot', allowed: false },
  { room: 'src/app/components/TrendChart', specifier: 'uplot', allowed: true },
  { room: 'src/app', specifier: 'better-sqlite3', allowed: false },
  { room: 'src/app', specifier: 'node:fs', allowed: false },
  { room: 'src/app', specifier: '../server/app', allowed: false },
  { room: 'src/sw', specifier: 'preact', allowed: false },
  { room: 'src/sw', specifier: 'workbox-routing', allowed: true },
  { room: 'src/server', specifier: 'better-sqlite3', allowed: true },
  { room: 'src/server', specifier: 'idb', allowed: false },
  { room: 'src/server', specifier: '../store/db', allowed: false },
];

const probes = CASES.map((fence, index) => ({
  ...fence,
  file: join(fence.room, probeName.replace('.ts', `-${index}.ts`)),
}));
const createdDirs: string[] = [];

describe('room fences (Biome noRestrictedImports)', () => {
  let diagnosticsByFile = new Map<string, string[]>();

  beforeAll(() => {
    for (const probe of probes) {
      const dir = join(root, probe.room);
      if (!existsSync(dir)) {
        mkdirSync(dir, { recursive: true });
        createdDirs.push(dir);
      }
      writeFileSync(
        join(root, probe.file),
        `import * as fenced from '${probe.specifier}';\n\nexport const probe = fenced;\n`,
      );
    }
    const result = spawnSync(
      join(root, 'node_modules/.bin/biome'),
      ['lint', '--reporter=json', '--max-diagnostics=none', ...probes.map((probe) => probe.file)],
      { cwd: root, encoding: 'utf8' },
    );
    const report = JSON.parse(result.stdout) as {
      diagnostics: Array<{ category: string; message: string; location: { path: string } }>;
    };
    diagnosticsByFile = new Map();
    for (const diagnostic of report.diagnostics) {
      if (diagnostic.category !== 'lint/style/noRestrictedImports') continue;
      const list = diagnosticsByFile.get(diagnostic.location.path) ?? [];
      list.push(diagnostic.message);
      diagnosticsByFile.set(diagnostic.location.path, list);
    }
  }, 60_000);

  afterAll(() => {
    for (const probe of probes) rmSync(join(root, probe.file), { force: true });
    for (const dir of createdDirs.reverse()) rmSync(dir, { recursive: true, force: true });
  });

  for (const probe of probes) {
    it(`should ${probe.allowed ? 'allow' : 'refuse'} ${probe.specifier} in ${probe.room}`, () => {
      const messages = diagnosticsByFile.get(probe.file) ?? [];
      if (probe.allowed) expect(messages).toEqual([]);
      else expect(messages).toHaveLength(1);
    });
  }
});

describe('runtime type checks (one tsconfig per runtime)', () => {
  // Inside the project (an ignored folder) so that type packages resolve from node_modules as they do for src/.
  mkdirSync(join(root, 'test-output'), { recursive: true });
  const scratch = mkdtempSync(join(root, 'test-output', 'tsc-probe-'));
  afterAll(() => rmSync(scratch, { recursive: true, force: true }));

  function typecheck(project: string, source: string): { ok: boolean; output: string } {
    const dir = mkdtempSync(join(scratch, 'p-'));
    writeFileSync(join(dir, 'probe.ts'), source);
    writeFileSync(
      join(dir, 'tsconfig.json'),
      JSON.stringify({ extends: join(root, project, 'tsconfig.json'), include: [], files: [join(dir, 'probe.ts')] }),
    );
    const result = spawnSync(join(root, 'node_modules/.bin/tsc'), ['--noEmit', '-p', join(dir, 'tsconfig.json')], {
      cwd: root,
      encoding: 'utf8',
    });
    return { ok: result.status === 0, output: `${result.stdout}${result.stderr}` };
  }

  it('should reject the DOM in the server', () => {
    const result = typecheck('src/server', 'export const title = document.title;\n');
    expect(result.ok).toBe(false);
    expect(result.output).toMatch(/document/);
  });

  it('should reject Node globals in pure calculation code', () => {
    const result = typecheck('src/calc', "export const cwd = process.cwd();\nexport const b = Buffer.from('x');\n");
    expect(result.ok).toBe(false);
    expect(result.output).toMatch(/process|Buffer/);
  });

  it('should reject the DOM document in the service worker', () => {
    const result = typecheck('src/sw', 'export const el = document.createElement("div");\n');
    expect(result.ok).toBe(false);
  });

  it('should accept what each runtime really has', () => {
    expect(
      typecheck('src/server', "import { readFileSync } from 'node:fs';\nexport const f = readFileSync;\n").ok,
    ).toBe(true);
    expect(typecheck('src/app', 'export const title = document.title;\n').ok).toBe(true);
    expect(typecheck('src/store', "export const open = indexedDB.open('x');\n").ok).toBe(true);
    expect(typecheck('src/calc', 'export const r = Math.hypot(3, 4);\n').ok).toBe(true);
  });
});
