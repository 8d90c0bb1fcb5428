/** The outbox: every finished round and record waits here, in enqueue order, until the server has acknowledged it. */
import { Id, type TypedEnvelope } from '../schema';
import type { OutboxEntry } from './db';
import { StoreError } from './errors';
import { type Ctx, read, type WriteTx, write } from './tx';
import { invalid, parse } from './validate';

/** Adds the envelope to the outbox inside the caller's transaction (the same one that stores the record). */
export async function enqueue(tx: WriteTx, envelope: TypedEnvelope, enqueuedAt = envelope.createdAt): Promise<void> {
  const outbox = tx.objectStore('outbox');
  if ((await outbox.index('byRecordId').getKey(envelope.id)) !== undefined) {
    throw new StoreError('E_CONFLICT', `id: record ${envelope.id} is already waiting in the outbox.`);
  }
  const entry: OutboxEntry = {
    id: envelope.id,
    type: envelope.type,
    envelope,
    state: 'pending',
    attempts: 0,
    enqueuedAt,
  };
  await outbox.add(entry);
}

function checkLimit(limit: number): number {
  if (!Number.isInteger(limit) || limit < 1 || limit > 10_000) {
    throw invalid(`The outbox query is not valid: limit: must be a whole number from 1 to 10000, not ${limit}`);
  }
  return limit;
}

export async function outboxPending(ctx: Ctx, limit: number): Promise<OutboxEntry[]> {
  const count = checkLimit(limit);
  // Within one index key, entries come in primary-key (seq) order: W3C IndexedDB, "index" record ordering.
  return read(ctx, ['outbox'], (tx) => tx.objectStore('outbox').index('byState').getAll('pending', count));
}

export async function acknowledge(ctx: Ctx, ids: string[]): Promise<number> {
  const list = parse(Id.array().max(10_000), ids, 'list of acknowledged ids', 'ids');
  if (list.length === 0) return 0;
  return write(ctx, ['outbox'], async (tx) => {
    const outbox = tx.objectStore('outbox');
    let removed = 0;
    for (const id of list) {
      const seq = await outbox.index('byRecordId').getKey(id);
      if (seq === undefined) continue;
      await outbox.delete(seq);
      removed += 1;
    }
    return removed;
  });
}

export async function markNeedsAttention(ctx: Ctx, recordId: string, reason: string): Promise<void> {
  const id = parse(Id, recordId, 'outbox entry id', 'id');
  if (typeof reason !== 'string' || reason.trim() === '' || reason.length > 2000) {
    throw invalid('The outbox entry cannot be marked: reason: say what needs attention (1 to 2000 characters)');
  }
  await write(ctx, ['outbox'], async (tx) => {
    const outbox = tx.objectStore('outbox');
    const seq = await outbox.index('byRecordId').getKey(id);
    const entry = seq === undefined ? undefined : await outbox.get(seq);
    if (!entry) throw new StoreError('E_NOT_FOUND', `id: record ${id} is not waiting in the outbox.`);
    await outbox.put({ ...entry, state: 'attention', attempts: entry.attempts + 1, lastError: reason });
  });
}

export async function outboxCounts(ctx: Ctx): Promise<{ pending: number; attention: number }> {
  return read(ctx, ['outbox'], async (tx) => {
    const index = tx.objectStore('outbox').index('byState');
    return { pending: await index.count('pending'), attention: await index.count('attention') };
  });
}

export async function outboxAttention(ctx: Ctx, limit: number): Promise<OutboxEntry[]> {
  const count = checkLimit(limit);
  return read(ctx, ['outbox'], (tx) => tx.objectStore('outbox').index('byState').getAll('attention', count));
}

/** Puts a parked entry back in line (after the cause was fixed on the server, e.g. a missing configuration). */
export async function retryAttention(ctx: Ctx, recordId: string): Promise<void> {
  const id = parse(Id, recordId, 'outbox entry id', 'id');
  await write(ctx, ['outbox'], async (tx) => {
    const outbox = tx.objectStore('outbox');
    const seq = await outbox.index('byRecordId').getKey(id);
    const entry = seq === undefined ? undefined : await outbox.get(seq);
    if (!entry) throw new StoreError('E_NOT_FOUND', `id: record ${id} is not waiting in the outbox.`);
    await outbox.put({ ...entry, state: 'pending' });
  });
}
