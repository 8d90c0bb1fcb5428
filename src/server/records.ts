/** Server-side storage of site configurations and records (SQLite, prepared statements only). */
import { hash } from 'node:crypto';
import { SiteConfig, type TypedEnvelope } from '../schema';
import type { Database } from './db';

/**
 * JSON with object keys sorted at every level (by UTF-16 code unit), so equal content gives equal text. Keys whose
 * value is undefined are left out, as JSON.stringify does; an undefined array item becomes null.
 */
export function canonicalJson(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value);
  if (Array.isArray(value)) {
    let text = '[';
    for (let i = 0; i < value.length; i += 1) {
      if (i > 0) text += ',';
      const item: unknown = value[i];
      text += item === undefined ? 'null' : canonicalJson(item);
    }
    return `${text}]`;
  }
  const record = value as Record<string, unknown>;
  const keys = Object.keys(record);
  if (keys.length > 1) keys.sort();
  let text = '{';
  let first = true;
  for (const key of keys) {
    const item = record[key];
    if (item === undefined) continue;
    text += `${first ? '' : ','}${quotedKey(key)}${typeof item === 'string' ? JSON.stringify(item) : canonicalJson(item)}`;
    first = false;
  }
  return `${text}}`;
}

/** `"key":` for an object key; the few hundred keys records use are quoted once (bounded, so input cannot grow it). */
const QUOTED_KEYS = new Map<string, string>();
function quotedKey(key: string): string {
  let quoted = QUOTED_KEYS.get(key);
  if (quoted === undefined) {
    quoted = `${JSON.stringify(key)}:`;
    if (QUOTED_KEYS.size < 4096) QUOTED_KEYS.set(key, quoted);
  }
  return quoted;
}

/**
 * The canonical text of an envelope's content (everything but its id) built around the canonical text of its body,
 * and its SHA-256. The keys of the content, sorted, are author, body, createdAt, device, schema, type.
 */
export function canonicalContent(envelope: TypedEnvelope, bodyText: string): { text: string; hash: string } {
  const text =
    `{"author":${JSON.stringify(envelope.author)},"body":${bodyText},"createdAt":${JSON.stringify(envelope.createdAt)},` +
    `"device":${JSON.stringify(envelope.device)},"schema":${JSON.stringify(envelope.schema)},"type":${JSON.stringify(envelope.type)}}`;
  // crypto.hash (Node 20.12+) is the one-shot form of createHash(…).update(…).digest('hex'), without a Hash object.
  return { text, hash: hash('sha256', text, 'hex') };
}

/** SHA-256 of an envelope's content (everything but its id). */
export function contentHash(envelope: TypedEnvelope): string {
  const { id: _id, ...content } = envelope;
  return hash('sha256', canonicalJson(content), 'hex');
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

export function recordCount(db: Database): number {
  return (db.prepare('SELECT count(*) AS n FROM records').get() as { n: number }).n;
}

/** At most this many records per pull page, and the page size when none is asked for. */
export const MAX_PULL_LIMIT = 1000;
export const DEFAULT_PULL_LIMIT = 500;

interface PulledRow {
  seq: number;
  id: string;
  type: string;
  schema: number;
  author: string;
  device: string;
  created_at: string;
  body: string;
}

/**
 * Records after a sequence number that a reader may see, in sequence order. What each role may read is decided
 * here, in SQL: supervisors and admins everything; mechanics maintenance records and lockout acknowledgements of
 * everyone; operators reviews and notes on their own rounds; everyone their own records.
 */
export class RecordsPull {
  private readonly select;
  private readonly lastSeq;

  constructor(private readonly db: Database) {
    this.select = db.prepare<Record<string, string | number>, PulledRow>(
      `SELECT seq, id, type, schema, author, device, created_at, body FROM records
       WHERE seq > @after AND (
         @all = 1
         OR author = @user
         OR (@maintenance = 1 AND type IN ('valveChange', 'bearingClearance', 'rodDrop', 'lockoutAck'))
         OR (@notes = 1 AND type IN ('review', 'note')
             AND json_extract(body, '$.roundId') IN (SELECT round_id FROM server_rounds WHERE author = @user))
       )
       ORDER BY seq LIMIT @limit`,
    );
    this.lastSeq = db.prepare<[], { seq: number | null }>('SELECT max(seq) AS seq FROM records');
  }

  /**
   * The page as JSON text `{ records, next, more }`. `next` is the last sequence number scanned, usable as the next
   * `after`: past the last record returned when more follow, else past every stored record, readable or not. Both
   * reads run in one transaction, so they see the same snapshot.
   */
  page(
    reader: { userId: string; scope: { all: boolean; maintenance: boolean; notesOnOwnRounds: boolean } },
    after: number,
    limit: number,
  ): string {
    return this.db.transaction(() => {
      const rows = this.select.all({
        after,
        all: reader.scope.all ? 1 : 0,
        maintenance: reader.scope.maintenance ? 1 : 0,
        notes: reader.scope.notesOnOwnRounds ? 1 : 0,
        user: reader.userId,
        limit: limit + 1,
      });
      const more = rows.length > limit;
      const page = more ? rows.slice(0, limit) : rows;
      const next = more ? (page.at(-1)?.seq ?? after) : Math.max(after, this.lastSeq.get()?.seq ?? 0);
      // Stored bodies are JSON this server wrote after validation; they go out as they are, without a re-parse.
      const records = page.map(
        (row) =>
          `{"seq":${row.seq},"id":${JSON.stringify(row.id)},"type":${JSON.stringify(row.type)},"schema":${row.schema},` +
          `"author":${JSON.stringify(row.author)},"device":${JSON.stringify(row.device)},` +
          `"createdAt":${JSON.stringify(row.created_at)},"body":${row.body}}`,
      );
      return `{"records":[${records.join(',')}],"next":${next},"more":${more}}`;
    })();
  }
}
