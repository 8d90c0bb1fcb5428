/**
 * Storing a batch of records from a device. Every record is validated on its own (a bad one is `rejected` and the
 * rest still go in); then the whole batch is written in ONE transaction in which the id is claimed by the unique
 * constraint itself (INSERT … ON CONFLICT DO NOTHING), so two concurrent retries cannot both store it.
 */
import { parseEnvelope, RecordError, type RecordType, type TypedEnvelope } from '../schema';
import type { Database } from './db';
import type { Logger } from './errors';
import { RoundEvaluator } from './findings';
import { canonicalContent, canonicalJson } from './records';
import { mayRecord, type Role, typesFor } from './roles';

/** At most this many records per request. */
export const MAX_BATCH_RECORDS = 500;
/** At most this many bytes per request body (2 MiB); a longer backlog is sent in several batches. */
export const MAX_BATCH_BYTES = 2 * 1024 * 1024;

export type IngestStatus = 'stored' | 'duplicate' | 'conflict' | 'rejected';

export interface IngestResult {
  id: string;
  status: IngestStatus;
  seq?: number;
  error?: string;
}

/** Who is sending: from the session, never from the body. */
export interface Sender {
  userId: string;
  deviceId: string;
  roles: readonly Role[];
}

/** A record that passed validation, ready to write. */
interface Accepted {
  index: number;
  envelope: TypedEnvelope;
  body: string;
  hash: string;
}

/** The person a record's body names as its maker. */
function bodyAuthor(envelope: TypedEnvelope): string {
  return envelope.type === 'round'
    ? (envelope as TypedEnvelope<'round'>).body.round.by.id
    : (envelope.body as { by: { id: string } }).by.id;
}

/** What to call a record in a result when it is too broken to have an id. */
function idOf(raw: unknown): string {
  if (raw && typeof raw === 'object' && !Array.isArray(raw)) {
    const id = (raw as { id?: unknown }).id;
    if (typeof id === 'string') return id.slice(0, 100);
  }
  return '';
}

export const CONFLICT_MESSAGE =
  'A record with this id is already stored with other content; the stored record is kept and this version was set aside for review. Send a correction as a new record.';

export class Ingestor {
  private readonly insertRecord;
  private readonly storedById;
  private readonly insertConflict;
  private readonly insertReview;
  private readonly evaluator: RoundEvaluator;

  constructor(
    private readonly db: Database,
    private readonly log: Logger,
  ) {
    this.insertRecord = db.prepare(
      `INSERT INTO records (id, type, schema, author, device, created_at, received_at, body, content_hash)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?) ON CONFLICT (id) DO NOTHING`,
    );
    this.storedById = db.prepare<[string], { seq: number; content_hash: string }>(
      'SELECT seq, content_hash FROM records WHERE id = ?',
    );
    this.insertConflict = db.prepare(
      `INSERT INTO conflicts (record_id, received_at, author, device, envelope, content_hash, stored_content_hash)
       VALUES (?, ?, ?, ?, ?, ?, ?) ON CONFLICT (record_id, content_hash) DO NOTHING`,
    );
    this.insertReview = db.prepare(
      `INSERT INTO finding_reviews (record_seq, finding_key, round_id, disposition, by_id, by_name, comment, at, at_ms)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)`,
    );
    this.evaluator = new RoundEvaluator(db, log);
  }

  /** Validates one record for `sender`: the accepted record, or the reason it is rejected. */
  private check(raw: unknown, index: number, sender: Sender | null): Accepted | string {
    let envelope: TypedEnvelope;
    try {
      envelope = parseEnvelope(raw);
    } catch (err) {
      if (err instanceof RecordError) return err.message;
      throw err;
    }
    if (sender) {
      if (envelope.author !== sender.userId || bodyAuthor(envelope) !== sender.userId) {
        return `The record claims another author ("${envelope.author === sender.userId ? bodyAuthor(envelope) : envelope.author}"); records are accepted only as the signed-in user "${sender.userId}"`;
      }
      const bodyDevice =
        envelope.type === 'round' ? (envelope as TypedEnvelope<'round'>).body.round.deviceId : envelope.device;
      if (envelope.device !== sender.deviceId || bodyDevice !== sender.deviceId) {
        return `The record claims another device ("${envelope.device === sender.deviceId ? bodyDevice : envelope.device}"); this session is for device "${sender.deviceId}"`;
      }
      if (!mayRecord(sender.roles, envelope.type)) {
        return `Your role (${sender.roles.join(', ')}) may not record ${envelope.type} records; it may send ${typesFor(sender.roles).join(', ') || 'none'}`;
      }
    }
    // The body is stored as its canonical text, which is also the heart of the content hash: one walk for both.
    const body = canonicalJson(envelope.body);
    return { index, envelope, body, hash: canonicalContent(envelope, body).hash };
  }

  /** Writes accepted records; runs inside the caller's transaction. */
  private write(accepted: readonly Accepted[], results: IngestResult[], receivedAt: string): void {
    for (const item of accepted) {
      const { envelope } = item;
      const inserted = this.insertRecord.run(
        envelope.id,
        envelope.type,
        envelope.schema,
        envelope.author,
        envelope.device,
        envelope.createdAt,
        receivedAt,
        item.body,
        item.hash,
      );
      if (inserted.changes === 1) {
        const seq = Number(inserted.lastInsertRowid);
        results[item.index] = { id: envelope.id, status: 'stored', seq };
        this.afterStore(envelope, seq, receivedAt);
        continue;
      }
      const stored = this.storedById.get(envelope.id);
      if (!stored) throw new Error(`record ${envelope.id} was neither inserted nor found`);
      if (stored.content_hash === item.hash) {
        results[item.index] = { id: envelope.id, status: 'duplicate', seq: stored.seq };
        continue;
      }
      this.insertConflict.run(
        envelope.id,
        receivedAt,
        envelope.author,
        envelope.device,
        canonicalJson(envelope),
        item.hash,
        stored.content_hash,
      );
      results[item.index] = { id: envelope.id, status: 'conflict', error: CONFLICT_MESSAGE };
    }
  }

  private afterStore(envelope: TypedEnvelope, seq: number, at: string): void {
    const type: RecordType = envelope.type;
    if (type === 'round') {
      this.evaluator.evaluate(envelope as TypedEnvelope<'round'>, seq, at);
    } else if (type === 'review') {
      const review = (envelope as TypedEnvelope<'review'>).body;
      this.insertReview.run(
        seq,
        review.findingKey,
        review.roundId,
        review.disposition,
        review.by.id,
        review.by.name,
        review.comment,
        review.at,
        Date.parse(review.at),
      );
    }
  }

  private commit(accepted: readonly Accepted[], results: IngestResult[], receivedAt: string): void {
    if (accepted.length === 0) return;
    try {
      this.db.transaction(() => this.write(accepted, results, receivedAt))();
    } catch (err) {
      this.evaluator.forgetUncommitted();
      throw err;
    }
  }

  /** One result per record, in order. Throws only when the database fails (then nothing of the batch is stored). */
  ingest(records: readonly unknown[], sender: Sender, receivedAt: string): IngestResult[] {
    const results: IngestResult[] = new Array(records.length);
    const accepted: Accepted[] = [];
    const rejected: Array<{ index: number; id: string; error: string }> = [];
    records.forEach((raw, index) => {
      let checked: Accepted | string;
      try {
        checked = this.check(raw, index, sender);
      } catch (err) {
        // A schema refinement or hash that throws is a bug to fix, but the record is still only refused.
        this.log({
          time: receivedAt,
          level: 'error',
          event: 'record-check-failed',
          error: err instanceof Error ? `${err.name}: ${err.message}` : String(err),
        });
        checked = 'The record could not be read; check its fields against the record schema';
      }
      if (typeof checked === 'string') {
        results[index] = { id: idOf(raw), status: 'rejected', error: checked };
        rejected.push({ index, id: idOf(raw), error: checked.slice(0, 300) });
      } else {
        accepted.push(checked);
      }
    });
    if (rejected.length > 0) {
      this.log({
        time: receivedAt,
        level: 'warn',
        event: 'records-rejected',
        user: sender.userId,
        device: sender.deviceId,
        count: rejected.length,
        first: rejected.slice(0, 10),
      });
    }
    this.commit(accepted, results, receivedAt);
    return results;
  }

  /**
   * Stores records that need no sender check (the first-start demo seed), validated like any others. Throws on the
   * first invalid record, before anything is written.
   */
  ingestTrusted(records: readonly unknown[], receivedAt: string): IngestResult[] {
    const results: IngestResult[] = new Array(records.length);
    const accepted = records.map((raw, index) => {
      const checked = this.check(raw, index, null);
      if (typeof checked === 'string') throw new RecordError(checked, checked);
      return checked;
    });
    this.commit(accepted, results, receivedAt);
    return results;
  }
}
