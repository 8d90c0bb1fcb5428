import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { type Database, openDatabase } from '../../src/server/db';
import { FindingsQuery } from '../../src/server/findings';
import { makeTempDir } from './fixtures';

let temp: ReturnType<typeof makeTempDir>;
let db: Database;

beforeEach(() => {
  temp = makeTempDir('findings-index');
  db = openDatabase(join(temp.path, 'data'));
});
afterEach(() => {
  db.close();
  temp.remove();
});

describe('migration 004: the index of listed findings', () => {
  it('should apply on a fresh data folder and create the partial index of watch-or-worse findings', () => {
    expect(db.prepare('SELECT name FROM schema_migrations WHERE version = 4').pluck().get()).toBe(
      '004-listed-findings-index.sql',
    );
    const index = db
      .prepare("SELECT tbl_name, sql FROM sqlite_schema WHERE type = 'index' AND name = 'server_findings_listed'")
      .get() as { tbl_name: string; sql: string } | undefined;
    expect(index?.tbl_name).toBe('server_findings');
    expect(index?.sql).toMatch(/\(round_finished_ms, id\) WHERE severity_rank >= 1$/);
  });

  it('should be the index the findings query walks, whatever the filters', () => {
    // The statement the findings route runs (better-sqlite3 keeps its SQL text as `source`).
    const { source } = (new FindingsQuery(db) as unknown as { select: { source: string } }).select;
    const explain = db.prepare(`EXPLAIN QUERY PLAN ${source}`);
    for (const filter of [
      { minRank: 1, machine: null, fromMs: null, toMs: null, state: null },
      { minRank: 2, machine: 'K-101', fromMs: null, toMs: null, state: 'open' },
      { minRank: 3, machine: null, fromMs: 0, toMs: 86_400_000, state: 'reviewed' },
    ]) {
      const plan = explain.all({ ...filter, limit: 501 }) as Array<{ detail: string }>;
      expect(plan.map((row) => row.detail).join(' / ')).toContain('SCAN f USING INDEX server_findings_listed');
    }
  });
});
