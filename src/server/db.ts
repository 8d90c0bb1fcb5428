import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import BetterSqlite3 from 'better-sqlite3';

export type Database = BetterSqlite3.Database;

export const DEFAULT_DB_FILE = 'crankhouse.sqlite';
export const DEFAULT_MIGRATIONS_DIR = join(import.meta.dirname, 'migrations');

const MIGRATION_FILE = /^(\d{3})-([a-z0-9]+(?:-[a-z0-9]+)*)\.sql$/;

export interface OpenDatabaseOptions {
  migrationsDir?: string;
  fileName?: string;
}

/**
 * Opens (creating if needed) the server database in `dataDir`, checks its settings and integrity,
 * and applies pending migrations. Any failure closes the connection and throws an Error whose
 * message says what to do.
 */
export function openDatabase(dataDir: string, opts: OpenDatabaseOptions = {}): Database {
  const folder = resolve(dataDir);
  try {
    mkdirSync(folder, { recursive: true });
  } catch (err) {
    throw new Error(
      `Cannot create the data folder ${folder}: ${messageOf(err)}. Set CRANKHOUSE_DATA to a writable folder.`,
      { cause: err },
    );
  }
  const fileName = opts.fileName ?? DEFAULT_DB_FILE;
  const file = join(folder, fileName);
  let db: Database;
  try {
    db = new BetterSqlite3(file);
  } catch (err) {
    throw new Error(`Cannot open the database ${file}: ${messageOf(err)}. Check CRANKHOUSE_DATA.`, { cause: err });
  }
  try {
    try {
      applySettings(db);
    } catch (err) {
      throw new Error(`Cannot use the database ${file}: ${messageOf(err)}`, { cause: err });
    }
    verifyPragmas(db);
    quickCheck(db, file);
    applyMigrations(db, opts.migrationsDir ?? DEFAULT_MIGRATIONS_DIR);
  } catch (err) {
    db.close();
    throw err;
  }
  return db;
}

/** `'ok'` when the connection answers a trivial query; never throws. */
export function databaseHealth(db: Database): 'ok' | 'unavailable' {
  try {
    return db.prepare('SELECT 1').pluck().get() === 1 ? 'ok' : 'unavailable';
  } catch {
    return 'unavailable';
  }
}

function applySettings(db: Database): void {
  db.pragma('journal_mode = WAL');
  // WAL with FULL survives power loss and OS crashes; NORMAL may drop the last commits, which
  // would break "an ack means durable" (sqlite.org/pragma.html#pragma_synchronous).
  db.pragma('synchronous = FULL');
  db.pragma('foreign_keys = ON');
  db.pragma('busy_timeout = 5000');
}

/** Reads the connection settings back and throws if any is not what the server relies on. */
export function verifyPragmas(db: Database): void {
  const problems: string[] = [];
  const journalMode = db.pragma('journal_mode', { simple: true });
  if (journalMode !== 'wal') {
    problems.push(
      `journal_mode is ${JSON.stringify(journalMode)}, expected "wal" (use a local disk, not a network share)`,
    );
  }
  const synchronous = db.pragma('synchronous', { simple: true });
  if (synchronous !== 2) problems.push(`synchronous is ${String(synchronous)}, expected 2 (FULL)`);
  const foreignKeys = db.pragma('foreign_keys', { simple: true });
  if (foreignKeys !== 1) problems.push(`foreign_keys is ${String(foreignKeys)}, expected 1 (ON)`);
  const busyTimeout = db.pragma('busy_timeout', { simple: true });
  if (typeof busyTimeout !== 'number' || busyTimeout <= 0) {
    problems.push(`busy_timeout is ${String(busyTimeout)}, expected more than 0`);
  }
  if (problems.length > 0) {
    throw new Error(`SQLite settings check failed for ${db.name}: ${problems.join('; ')}`);
  }
}

function quickCheck(db: Database, file: string): void {
  let messages: string[];
  try {
    const rows = db.pragma('quick_check') as Array<{ quick_check: string }>;
    messages = rows.map((row) => row.quick_check);
  } catch (err) {
    messages = [messageOf(err)];
  }
  if (messages.length !== 1 || messages[0] !== 'ok') {
    throw new Error(
      `The database ${file} failed PRAGMA quick_check: ${messages.slice(0, 5).join('; ')}. ` +
        'Stop the server and restore the latest backup (never copy a live database file).',
    );
  }
}

interface MigrationFile {
  version: number;
  name: string;
  sql: string;
  sha256: string;
}

interface AppliedMigration {
  version: number;
  name: string;
  sha256: string;
}

/** Reads `NNN-name.sql` files and checks they number 1, 2, 3… with no gap or duplicate. */
export function readMigrations(dir: string): MigrationFile[] {
  if (!existsSync(dir)) throw new Error(`Migrations folder ${dir} does not exist`);
  const files: MigrationFile[] = [];
  for (const name of readdirSync(dir).sort()) {
    if (!name.endsWith('.sql')) continue;
    const match = MIGRATION_FILE.exec(name);
    if (!match?.[1]) {
      throw new Error(`Migration file name ${name} in ${dir} must look like 001-short-name.sql (lower case)`);
    }
    const sql = readFileSync(join(dir, name), 'utf8');
    files.push({ version: Number(match[1]), name, sql, sha256: createHash('sha256').update(sql).digest('hex') });
  }
  files.forEach((file, index) => {
    const expected = index + 1;
    if (file.version === expected) return;
    if (file.version < expected) {
      throw new Error(`Two migrations are numbered ${pad(file.version)} in ${dir}: each number must be used once`);
    }
    throw new Error(`Migration ${pad(expected)} is missing in ${dir} (found ${file.name} in its place)`);
  });
  return files;
}

function applyMigrations(db: Database, dir: string): void {
  const files = readMigrations(dir);
  db.exec(`CREATE TABLE IF NOT EXISTS schema_migrations (
    version INTEGER PRIMARY KEY,
    name TEXT NOT NULL,
    sha256 TEXT NOT NULL,
    applied_at TEXT NOT NULL
  ) STRICT`);
  const applied = db
    .prepare('SELECT version, name, sha256 FROM schema_migrations ORDER BY version')
    .all() as AppliedMigration[];
  const userVersion = db.pragma('user_version', { simple: true });
  if (userVersion !== applied.length) {
    throw new Error(
      `Database ${db.name} has user_version ${String(userVersion)} but ${applied.length} recorded migrations; ` +
        'it was changed outside Crankhouse. Restore the latest backup.',
    );
  }
  for (const record of applied) {
    const file = files[record.version - 1];
    if (!file) {
      throw new Error(
        `Migration ${record.name} was applied to this database but is missing from ${dir}. ` +
          'The database is newer than this version of Crankhouse; run the version that created it.',
      );
    }
    if (file.name !== record.name || file.sha256 !== record.sha256) {
      throw new Error(
        `Migration ${file.name} differs from ${record.name} as applied (sha256 ${record.sha256.slice(0, 12)}… recorded, ` +
          `${file.sha256.slice(0, 12)}… now). Migrations are append-only: restore the original file and add a new numbered migration instead.`,
      );
    }
  }

  const record = db.prepare('INSERT INTO schema_migrations (version, name, sha256, applied_at) VALUES (?, ?, ?, ?)');
  for (const file of files.slice(applied.length)) {
    const apply = db.transaction(() => {
      db.exec(file.sql);
      record.run(file.version, file.name, file.sha256, new Date().toISOString());
      // PRAGMA takes no bound parameters; `version` is an integer parsed from a three-digit file name.
      db.pragma(`user_version = ${file.version}`);
    });
    try {
      apply.immediate();
    } catch (err) {
      throw new Error(`Migration ${file.name} failed and was rolled back: ${messageOf(err)}`, { cause: err });
    }
  }
}

function pad(version: number): string {
  return String(version).padStart(3, '0');
}

function messageOf(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}
