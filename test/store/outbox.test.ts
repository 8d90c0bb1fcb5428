import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import type { RecordKind } from '../../src/store';
import { fixtureRecord } from '../support/store-fixture';
import { freshStore, META, rejection } from './helpers';

async function storeWithRecords(count: number) {
  const store = await freshStore();
  const records = Array.from({ length: count }, (_, n) => fixtureRecord(n, 0));
  for (const record of records) await store.saveRecord(record.type as RecordKind, record.body as never, META);
  return { store, ids: records.map((record) => record.id) };
}

describe('outbox', () => {
  it('should hand out pending entries in enqueue order, limit respected', async () => {
    const { store, ids } = await storeWithRecords(7);
    const all = await store.outboxPending(100);
    expect(all.map((entry) => entry.id)).toEqual(ids);
    const seqs = all.map((entry) => entry.seq as number);
    expect(seqs).toEqual([...seqs].sort((a, b) => a - b));
    expect((await store.outboxPending(3)).map((entry) => entry.id)).toEqual(ids.slice(0, 3));
    expect((await rejection(store.outboxPending(0))).code).toBe('E_INVALID');
    store.close();
  });

  it('should remove acknowledged entries and keep their records', async () => {
    const { store, ids } = await storeWithRecords(4);
    expect(await store.acknowledge([ids[0] as string, ids[2] as string])).toBe(2);
    expect((await store.outboxPending(10)).map((entry) => entry.id)).toEqual([ids[1], ids[3]]);
    // Acknowledging again, or an id that was never queued, is harmless.
    expect(await store.acknowledge([ids[0] as string, '00000000-0000-4000-8000-000000000000'])).toBe(0);
    expect(await store.listRecords('note')).toHaveLength(1);
    expect(await store.listRecords('valveChange')).toHaveLength(1);
    expect((await rejection(store.acknowledge(['nope']))).message).toContain('ids.0');
    store.close();
  });

  it('should park an entry as needing attention with its reason, out of the pending list', async () => {
    const { store, ids } = await storeWithRecords(3);
    await store.markNeedsAttention(ids[1] as string, 'server said 422: text too long');
    expect(await store.outboxCounts()).toEqual({ pending: 2, attention: 1 });
    expect((await store.outboxPending(10)).map((entry) => entry.id)).toEqual([ids[0], ids[2]]);
    const missing = await rejection(store.markNeedsAttention('00000000-0000-4000-8000-000000000000', 'x'));
    expect(missing.code).toBe('E_NOT_FOUND');
    expect((await rejection(store.markNeedsAttention(ids[0] as string, ' '))).code).toBe('E_INVALID');
    const backup = await store.exportBackup();
    expect(backup.outbox.find((entry) => entry.id === ids[1])).toMatchObject({
      state: 'attention',
      attempts: 1,
      lastError: 'server said 422: text too long',
    });
    store.close();
  });
});
