/** Server-side storage of site configurations and records (SQLite, prepared statements only). */
import { createHash } from 'node:crypto';
import { SiteConfig, type TypedEnvelope } from '../schema';
import type { Database } from './db';

/** JSON with object keys sorted at every level, so equal content gives equal text. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(',')}}`;
  }
  return JSON.stringify(value);
}

/** SHA-256 of an envelope's content (everything but its id). */
export function contentHash(envelope: TypedEnvelope): string {
  const { id: _id, ...content } = envelope;
  return createHash('sha256').update(canonicalJson(content)).digest('hex');
}

export function latestConfig(db: Database): SiteConfig | null {
  const row = db.prepare('SELECT body FROM site_configs ORDER BY version DESC LIMIT 1').get() as
    | { body: string }
    | undefined;
  return row ? SiteConfig.parse(JSON.parse(row.body)) : null;
}

export function insertConfig(db: Database, config: SiteConfig, storedAt: string): void {
  db.prepare('INSERT INTO site_configs (version, published_at, body, stored_at) VALUES (?, ?, ?, ?)').run(
    config.version,
    config.publishedAt,
    JSON.stringify(config),
    storedAt,
  );
}

/** Inserts one already-validated envelope; returns its sequence number, or null when that id is already stored. */
export function insertRecord(db: Database, envelope: TypedEnvelope, receivedAt: string): number | null {
  const result = db
    .prepare(
      `INSERT INTO records (id, type, schema, author, device, created_at, received_at, body, content_hash)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`,
    )
    .run(
      envelope.id,
      envelope.type,
      envelope.schema,
      envelope.author,
      envelope.device,
      envelope.createdAt,
      receivedAt,
      JSON.stringify(envelope.body),
      contentHash(envelope),
    );
  return result.changes === 1 ? Number(result.lastInsertRowid) : null;
}

export function recordCount(db: Database): number {
  return (db.prepare('SELECT count(*) AS n FROM records').get() as { n: number }).n;
}
