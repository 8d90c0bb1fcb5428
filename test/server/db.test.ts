import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  rmSync,
  statSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { join } from 'node:path';
import BetterSqlite3 from 'better-sqlite3';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { DEFAULT_MIGRATIONS_DIR, databaseHealth, openDatabase, verifyPragmas } from '../../src/server/db';
import { makeTempDir } from './fixtures';

let temp: ReturnType<typeof makeTempDir>;
let dataDir: string;
let migrations: string;

beforeEach(() => {
  temp = makeTempDir('db');
  dataDir = join(temp.path, 'data');
  migrations = join(temp.path, 'migrations');
  mkdirSync(migrations);
});
afterEach(() => {
  temp.remove();
});

function writeMigration(name: string, sql: string): void {
  writeFileSync(join(migrations, name), sql);
}

function tableNames(db: BetterSqlite3.Database): string[] {
  return db.prepare("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name").pluck().all() as string[];
}

describe('openDatabase', () => {
  it('should create the data folder and read back the durability settings', () => {
    const db = openDatabase(dataDir);
    try {
      expect(statSync(dataDir).isDirectory()).toBe(true);
      expect(existsSync(join(dataDir, 'crankhouse.sqlite'))).toBe(true);
      // source: sqlite.org/pragma.html#pragma_journal_mode (returns the new mode as a lower-case string)
      expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
      // source: sqlite.org/pragma.html#pragma_synchronous (0 OFF, 1 NORMAL, 2 FULL, 3 EXTRA)
      expect(db.pragma('synchronous', { simple: true })).toBe(2);
      // source: sqlite.org/foreignkeys.html section 2 (off by default, 1 when enabled)
      expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
      // source: sqlite.org/pragma.html#pragma_busy_timeout (milliseconds)
      expect(db.pragma('busy_timeout', { simple: true })).toBeGreaterThan(0);
    } finally {
      db.close();
    }
  });

  it('should reject a connection whose settings were not applied', () => {
    const raw = new BetterSqlite3(':memory:');
    try {
      raw.pragma('synchronous = NORMAL');
      raw.pragma('foreign_keys = OFF');
      raw.pragma('busy_timeout = 0');
      // source: sqlite.org/pragma.html#pragma_journal_mode (an in-memory database uses MEMORY or OFF, never WAL)
      expect(() => verifyPragmas(raw)).toThrow(
        /journal_mode is "memory", expected "wal".*synchronous is 1.*foreign_keys is 0.*busy_timeout is 0/,
      );
    } finally {
      raw.close();
    }
  });

  it('should name the folder and CRANKHOUSE_DATA when the data folder cannot be created', () => {
    const blocker = join(temp.path, 'not-a-folder');
    writeFileSync(blocker, 'a file where a folder should be');
    const target = join(blocker, 'data');
    expect(() => openDatabase(target)).toThrow(/Cannot create the data folder .*not-a-folder\/data.*CRANKHOUSE_DATA/);
  });

  it('should name the file when it is not a SQLite database', () => {
    mkdirSync(dataDir);
    writeFileSync(join(dataDir, 'crankhouse.sqlite'), 'this is not a database file, just text '.repeat(200));
    expect(() => openDatabase(dataDir)).toThrow(/crankhouse\.sqlite.*not a database/);
  });

  it('should refuse to start on a damaged database file', () => {
    mkdirSync(dataDir);
    const file = join(dataDir, 'crankhouse.sqlite');
    const raw = new BetterSqlite3(file);
    raw.exec('CREATE TABLE t (id INTEGER PRIMARY KEY, v TEXT); CREATE INDEX t_v ON t (v);');
    const insert = raw.prepare('INSERT INTO t (v) VALUES (?)');
    raw.transaction(() => {
      for (let i = 0; i < 2000; i += 1) insert.run(`value-${i}`);
    })();
    raw.close();
    const pageSize = 4096; // source: sqlite.org/pragma.html#pragma_page_size (default page size since 3.12.0)
    expect(statSync(file).size).toBeGreaterThan(pageSize * 8);
    const fd = openSync(file, 'r+');
    writeSync(fd, Buffer.alloc(pageSize, 0x41), 0, pageSize, pageSize * 5);
    closeSync(fd);

    expect(() => openDatabase(dataDir)).toThrow(/crankhouse\.sqlite.*(quick_check|malformed)/);
  });

  it('should apply the shipped migrations once and make reopening a no-op', () => {
    const shipped = readdirSync(DEFAULT_MIGRATIONS_DIR).filter((name) => name.endsWith('.sql'));
    const first = openDatabase(dataDir);
    const before = first
      .prepare('SELECT version, name, sha256, applied_at FROM schema_migrations ORDER BY version')
      .all();
    const instanceId = first.prepare("SELECT value FROM server_meta WHERE key = 'instance_id'").pluck().get();
    first.close();

    const second = openDatabase(dataDir);
    try {
      expect(second.pragma('user_version', { simple: true })).toBe(shipped.length);
      expect(before).toHaveLength(shipped.length);
      expect(
        second.prepare('SELECT version, name, sha256, applied_at FROM schema_migrations ORDER BY version').all(),
      ).toEqual(before);
      expect(instanceId).toMatch(/^[0-9a-f]{32}$/);
      expect(second.prepare("SELECT value FROM server_meta WHERE key = 'instance_id'").pluck().get()).toBe(instanceId);
      const createdAt = second.prepare("SELECT value FROM server_meta WHERE key = 'created_at'").pluck().get();
      expect(Number.isNaN(Date.parse(String(createdAt)))).toBe(false);
    } finally {
      second.close();
    }
  });

  it('should roll back a failing migration completely and name its file', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    writeMigration(
      '002-broken.sql',
      'CREATE TABLE half_made (id INTEGER PRIMARY KEY) STRICT;\nINSERT INTO table_that_does_not_exist VALUES (1);',
    );
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/002-broken\.sql/);

    const raw = new BetterSqlite3(join(dataDir, 'crankhouse.sqlite'));
    try {
      expect(raw.pragma('user_version', { simple: true })).toBe(1);
      expect(tableNames(raw)).toContain('first_table');
      expect(tableNames(raw)).not.toContain('half_made');
      expect(raw.prepare('SELECT name FROM schema_migrations').pluck().all()).toEqual(['001-first.sql']);
    } finally {
      raw.close();
    }
  });

  it('should apply a migration added later and keep the earlier ones', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    openDatabase(dataDir, { migrationsDir: migrations }).close();
    writeMigration('002-second.sql', 'CREATE TABLE second_table (id INTEGER PRIMARY KEY) STRICT;');
    const db = openDatabase(dataDir, { migrationsDir: migrations });
    try {
      expect(db.pragma('user_version', { simple: true })).toBe(2);
      expect(tableNames(db)).toEqual(expect.arrayContaining(['first_table', 'second_table']));
    } finally {
      db.close();
    }
  });

  it('should refuse to open when an applied migration was edited', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    openDatabase(dataDir, { migrationsDir: migrations }).close();
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY, extra TEXT) STRICT;');
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/001-first\.sql.*append-only/);
  });

  it('should refuse to open when an applied migration file is missing', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    writeMigration('002-second.sql', 'CREATE TABLE second_table (id INTEGER PRIMARY KEY) STRICT;');
    openDatabase(dataDir, { migrationsDir: migrations }).close();
    rmSync(join(migrations, '002-second.sql'));
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/002-second\.sql.*missing/);
  });

  it('should refuse a gap in the numbering', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    writeMigration('003-third.sql', 'CREATE TABLE third_table (id INTEGER PRIMARY KEY) STRICT;');
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/Migration 002 is missing/);
  });

  it('should refuse two migrations with the same number', () => {
    writeMigration('001-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    writeMigration('001-other.sql', 'CREATE TABLE other_table (id INTEGER PRIMARY KEY) STRICT;');
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/Two migrations are numbered 001/);
  });

  it('should refuse a migration file name that is not NNN-name.sql', () => {
    writeMigration('1-first.sql', 'CREATE TABLE first_table (id INTEGER PRIMARY KEY) STRICT;');
    expect(() => openDatabase(dataDir, { migrationsDir: migrations })).toThrow(/1-first\.sql.*001-short-name\.sql/);
  });
});

describe('migration 003: users, sessions, conflicts, server findings', () => {
  function columns(db: BetterSqlite3.Database, table: string): string[] {
    return (db.prepare('SELECT name FROM pragma_table_info(?) ORDER BY cid').all(table) as Array<{ name: string }>).map(
      (column) => column.name,
    );
  }

  it('should create its tables on a fresh data folder', () => {
    const db = openDatabase(dataDir);
    try {
      expect(tableNames(db)).toEqual(
        expect.arrayContaining([
          'users',
          'sessions',
          'conflicts',
          'server_rounds',
          'server_findings',
          'finding_mismatches',
          'finding_reviews',
        ]),
      );
      expect(columns(db, 'users')).toEqual([
        'id',
        'name',
        'roles',
        'passcode_salt',
        'passcode_hash',
        'passcode_scrypt',
        'disabled',
        'created_at',
      ]);
      expect(columns(db, 'sessions')).toEqual([
        'token_sha256',
        'token_prefix',
        'user_id',
        'device_id',
        'device_name',
        'created_at',
        'last_used_at',
        'revoked_at',
      ]);
      expect(columns(db, 'finding_mismatches')).toEqual([
        'id',
        'round_id',
        'key',
        'rule',
        'device_severity',
        'server_severity',
      ]);
    } finally {
      db.close();
    }
  });

  it('should end the sessions of a user who is disabled, and refuse a session for an unknown user', () => {
    const db = openDatabase(dataDir);
    try {
      const now = '2026-12-01T08:00:00.000Z';
      db.prepare(
        `INSERT INTO users (id, name, roles, passcode_salt, passcode_hash, passcode_scrypt, created_at)
         VALUES ('kim', 'Kim', '["operator"]', x'00', x'00', '{}', ?)`,
      ).run(now);
      const session = db.prepare(
        `INSERT INTO sessions (token_sha256, token_prefix, user_id, device_id, device_name, created_at, last_used_at)
         VALUES (?, 'abcdef', ?, 'tablet-1', 'Tablet', ?, ?)`,
      );
      session.run('a'.repeat(64), 'kim', now, now);
      session.run('b'.repeat(64), 'kim', now, now);
      // source: sqlite.org/foreignkeys.html (a child row must reference an existing parent when enforcement is on)
      expect(() => session.run('c'.repeat(64), 'nobody', now, now)).toThrow(/FOREIGN KEY/);
      db.prepare("UPDATE users SET disabled = 1 WHERE id = 'kim'").run();
      expect(db.prepare('SELECT count(*) FROM sessions WHERE revoked_at IS NULL').pluck().get()).toBe(0);
      expect(() => db.prepare("UPDATE users SET disabled = 2 WHERE id = 'kim'").run()).toThrow(/CHECK/);
    } finally {
      db.close();
    }
  });
});

describe('databaseHealth', () => {
  it('should answer ok while open and unavailable after close, without throwing', () => {
    const db = openDatabase(dataDir);
    expect(databaseHealth(db)).toBe('ok');
    db.close();
    expect(databaseHealth(db)).toBe('unavailable');
  });
});
