import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { parseEnvelope, type ValveChange } from '../../src/schema';
import type { RecordKind } from '../../src/store';
import type { StoredRecord } from '../../src/store/db';
import { fixtureRecord } from '../support/store-fixture';
import { freshStore, META, rejection } from './helpers';

/** Records 0–5 of the fixture cover the six kinds once each. */
const SIX = Array.from({ length: 6 }, (_, n) => fixtureRecord(n, 0));

function save(store: Awaited<ReturnType<typeof freshStore>>, record: StoredRecord) {
  return store.saveRecord(record.type as RecordKind, record.body as never, META);
}

describe('records', () => {
  it('should store every kind of record with its outbox entry and list it by type', async () => {
    const store = await freshStore();
    for (const record of SIX) expect(await save(store, record)).toBe('saved');
    for (const record of SIX) expect(await store.listRecords(record.type)).toEqual([record.body]);
    const outbox = await store.outboxPending(100);
    expect(outbox.map((entry) => [entry.id, entry.type])).toEqual(SIX.map((record) => [record.id, record.type]));
    for (const entry of outbox) {
      expect(parseEnvelope(entry.envelope)).toMatchObject({ ...META, id: entry.id, type: entry.type });
      expect(entry).toMatchObject({ state: 'pending', attempts: 0 });
    }
    store.close();
  });

  it('should list records of one type newest first', async () => {
    const store = await freshStore();
    // Notes are fixture records 0, 6 and 12, made a minute apart (store-fixture.ts).
    const notes = [0, 6, 12].map((n) => fixtureRecord(n, 0));
    for (const note of notes) await save(store, note);
    expect(await store.listRecords('note')).toEqual(notes.map((note) => note.body).reverse());
    store.close();
  });

  it('should treat saving the same record again as a no-op', async () => {
    const store = await freshStore();
    const [note] = SIX;
    await save(store, note as StoredRecord);
    await store.acknowledge([(note as StoredRecord).id]);
    expect(await save(store, note as StoredRecord)).toBe('unchanged');
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    expect(await store.listRecords('note')).toHaveLength(1);
    store.close();
  });

  it('should refuse a different record under a saved id and change nothing', async () => {
    const store = await freshStore();
    const change = SIX[2] as StoredRecord<'valveChange'>;
    await save(store, change);
    const altered: ValveChange = { ...change.body, installedValveId: 'V-other' };
    const error = await rejection(store.saveRecord('valveChange', altered, META));
    expect(error.code).toBe('E_IMMUTABLE');
    const asNote = await rejection(
      store.saveRecord('note', { ...(SIX[0] as StoredRecord<'note'>).body, id: change.id }, META),
    );
    expect(asNote.code).toBe('E_IMMUTABLE');
    expect(await store.listRecords('valveChange')).toEqual([change.body]);
    expect(await store.listRecords('note')).toEqual([]);
    expect(await store.outboxCounts()).toEqual({ pending: 1, attention: 0 });
    store.close();
  });

  it('should refuse an invalid record, naming the field, and write nothing', async () => {
    const store = await freshStore();
    const change = SIX[2] as StoredRecord<'valveChange'>;
    const noValve = await rejection(store.saveRecord('valveChange', { ...change.body, installedValveId: '' }, META));
    expect(noValve.code).toBe('E_INVALID');
    expect(noValve.message).toContain('installedValveId');
    const badId = await rejection(store.saveRecord('valveChange', { ...change.body, id: 'not-a-uuid' }, META));
    expect(badId.message).toMatch(/\bid: must be a UUID/);
    const badMeta = await rejection(store.saveRecord('valveChange', change.body, { ...META, createdAt: 'now' }));
    expect(badMeta.message).toContain('meta.createdAt');
    const badType = await rejection(store.saveRecord('round' as RecordKind, change.body as never, META));
    expect(badType.code).toBe('E_INVALID');
    expect(badType.message).toContain('type: must be one of');
    expect(await store.listRecords('valveChange')).toEqual([]);
    expect(await store.outboxCounts()).toEqual({ pending: 0, attention: 0 });
    store.close();
  });
});
