/**
 * Push: drain the outbox to the server in batches. A record leaves the outbox only when the server says stored or
 * duplicate; rejected and conflicting records are parked as needing attention with the server's reason. A failure
 * that may pass (network, timeout, server fault) stops the push and leaves every entry where it was: the next
 * push sends them again and the server recognises what it already has (reliability P16, P26).
 */
import { MAX_PUSH_BYTES, MAX_RECORDS_PER_PUSH, type TypedEnvelope } from '../schema';
import type { OutboxEntry, Store } from '../store';
import { type SyncApi, SyncError } from './api';

/** Stay well inside the server's 2 MB body limit: JSON overhead and unicode can add a little. */
export const PUSH_BYTES_BUDGET = Math.floor(MAX_PUSH_BYTES * 0.75);
export const PUSH_BATCH_RECORDS = 200;

export interface PushProgress {
  sent: number;
  acknowledged: number;
  attention: number;
  /** Entries waiting when the push started. */
  total: number;
}

const encoder = new TextEncoder();

/** The next batch: in outbox order, within the record and byte budgets (a single oversized record goes alone). */
export function takeBatch(entries: OutboxEntry[], maxRecords: number, maxBytes: number): OutboxEntry[] {
  const batch: OutboxEntry[] = [];
  let bytes = 0;
  for (const entry of entries) {
    const size = encoder.encode(JSON.stringify(entry.envelope)).length + 1;
    if (batch.length > 0 && (batch.length >= maxRecords || bytes + size > maxBytes)) break;
    batch.push(entry);
    bytes += size;
  }
  return batch;
}

export async function pushOutbox(
  store: Store,
  api: SyncApi,
  options: { batchRecords?: number; onProgress?: (progress: PushProgress) => void } = {},
): Promise<PushProgress> {
  let maxRecords = Math.min(options.batchRecords ?? PUSH_BATCH_RECORDS, MAX_RECORDS_PER_PUSH);
  const counts = await store.outboxCounts();
  const progress: PushProgress = { sent: 0, acknowledged: 0, attention: 0, total: counts.pending };
  options.onProgress?.({ ...progress });
  const seen = new Set<string>();
  for (;;) {
    const pending = (await store.outboxPending(maxRecords)).filter((entry) => !seen.has(entry.id));
    if (pending.length === 0) return progress;
    const batch = takeBatch(pending, maxRecords, PUSH_BYTES_BUDGET);
    let response: Awaited<ReturnType<SyncApi['push']>>;
    try {
      response = await api.push(batch.map((entry) => entry.envelope as TypedEnvelope));
    } catch (error) {
      // The server refused the size: send fewer at a time (reliability P41); one record too large needs a person.
      if (error instanceof SyncError && error.code === 'too-large' && batch.length > 1) {
        maxRecords = Math.max(1, Math.floor(batch.length / 2));
        continue;
      }
      if (error instanceof SyncError && error.code === 'too-large') {
        await store.markNeedsAttention(batch[0]?.id as string, 'The server refuses this record as too large.');
        progress.attention += 1;
        continue;
      }
      throw error;
    }
    const byId = new Map(response.results.map((result) => [result.id, result]));
    const done: string[] = [];
    for (const entry of batch) {
      seen.add(entry.id);
      const result = byId.get(entry.id);
      progress.sent += 1;
      if (!result) continue; // not answered: stays pending for the next push
      if (result.status === 'stored' || result.status === 'duplicate') done.push(entry.id);
      else {
        const reason =
          result.status === 'conflict'
            ? `The server already holds a different record with this id. ${result.error ?? ''}`
            : `Refused by the server: ${result.error ?? 'no reason given'}`;
        await store.markNeedsAttention(entry.id, reason.trim().slice(0, 2000));
        progress.attention += 1;
      }
    }
    progress.acknowledged += await store.acknowledge(done);
    options.onProgress?.({ ...progress });
  }
}
