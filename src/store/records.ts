/** Maintenance records, lockout acknowledgements, reviews and notes: written once, never changed. */
import { envelopeFor, RECORD_TYPES, type RecordBodies, type TypedEnvelope } from '../schema';
import { sameContent } from './canonical';
import type { RecordKind, StoredRecord } from './db';
import { StoreError } from './errors';
import { enqueue } from './outbox';
import { type EnvelopeMeta, EnvelopeMetaSchema } from './rounds';
import { type Ctx, read, write } from './tx';
import { invalid, parse, type Schema } from './validate';

export const RECORD_KINDS: readonly RecordKind[] = [
  'valveChange',
  'bearingClearance',
  'rodDrop',
  'lockoutAck',
  'review',
  'note',
];

export function checkKind(type: unknown): RecordKind {
  if (!RECORD_KINDS.includes(type as RecordKind)) {
    throw invalid(
      `The record is not valid: type: must be one of ${RECORD_KINDS.join(', ')}, not ${JSON.stringify(type)}`,
    );
  }
  return type as RecordKind;
}

/** When the record was made: its own time field. */
export function timeOf(record: StoredRecord): string {
  return 'completedAt' in record.body ? record.body.completedAt : record.body.at;
}

export async function saveRecord<T extends RecordKind>(
  ctx: Ctx,
  type: T,
  input: RecordBodies[T],
  rawMeta: EnvelopeMeta,
): Promise<'saved' | 'unchanged'> {
  const kind = checkKind(type) as T;
  const body = parse(RECORD_TYPES[kind].body as Schema<RecordBodies[T]>, input, `${kind} record`, '');
  const meta = parse(EnvelopeMetaSchema, rawMeta, 'record information', 'meta');
  const envelope = envelopeFor(kind, body, meta) as TypedEnvelope;
  const record: StoredRecord = { id: envelope.id, type: kind, body } as StoredRecord;
  return write(
    ctx,
    ['records', 'outbox'],
    async (tx) => {
      const records = tx.objectStore('records');
      const existing = await records.get(record.id);
      if (existing) {
        if (existing.type === record.type && sameContent(existing.body, record.body)) return 'unchanged' as const;
        throw new StoreError(
          'E_IMMUTABLE',
          `A ${existing.type} record with id ${record.id} is already saved with different content; a saved record ` +
            'never changes. Make a new record (a note or a later review) that points at it.',
        );
      }
      await records.add(record);
      await enqueue(tx, envelope);
      return 'saved' as const;
    },
    { userData: (result) => result === 'saved' },
  );
}

export async function listRecords<T extends RecordKind>(ctx: Ctx, type: T): Promise<RecordBodies[T][]> {
  const kind = checkKind(type);
  const records = await read(ctx, ['records'], (tx) => tx.objectStore('records').index('byType').getAll(kind));
  return records
    .sort((a, b) => Date.parse(timeOf(b)) - Date.parse(timeOf(a)) || (a.id < b.id ? 1 : a.id > b.id ? -1 : 0))
    .map((record) => record.body as RecordBodies[T]);
}
