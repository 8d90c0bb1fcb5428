/** Backup export and import: a full round trip, idempotent re-import, conflicts, and bad files refused whole. */
import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { openStore, type RecordKind, type Store } from '../../src/store';
import { stableHash } from '../support/stable-hash';
import { dumpDatabase, fixtureFindings, fixtureReading, fixtureRecord, fixtureRound } from '../support/store-fixture';
import { freshName, freshStore, META, rejection, siteConfig } from './helpers';

/** Two configurations, three finished rounds and a draft, eight records; some sent, one parked. */
async function populate(store: Store): Promise<void> {
  await store.putConfig(siteConfig(1));
  await store.putConfig(siteConfig(2));
  for (const round of [0, 1, 2, 3]) {
    await store.startRound(fixtureRound(round));
    for (let point = 0; point < 6; point += 1) await store.saveReading(fixtureReading(round, point));
    if (round === 3) continue;
    const finishedAt = fixtureRound(round, 'finished').finishedAt as string;
    await store.finishRound({
      roundId: fixtureRound(round).id,
      finishedAt,
      findings: fixtureFindings(round),
      meta: META,
    });
  }
  for (let n = 0; n < 8; n += 1) {
    const record = fixtureRecord(n, n % 3);
    await store.saveRecord(record.type as RecordKind, record.body as never, META);
  }
  await store.acknowledge([fixtureRound(0).id, fixtureRecord(1, 1).id]);
  await store.markNeedsAttention(fixtureRecord(4, 1).id, 'server said 422');
}

/** The backup without what legitimately differs between two tablets: export time, device id, outbox positions. */
function content(backup: Awaited<ReturnType<Store['exportBackup']>>) {
  return {
    configs: backup.configs,
    rounds: backup.rounds,
    records: backup.records,
    outbox: backup.outbox.map(({ seq: _seq, ...entry }) => entry),
  };
}

async function storeWithDump(): Promise<{ store: Store; name: string }> {
  const name = freshName();
  const store = await openStore({ name });
  await populate(store);
  return { store, name };
}

describe('backup', () => {
  it('should reproduce everything in an empty database from an exported file', async () => {
    const source = await freshStore();
    await populate(source);
    const backup = await source.exportBackup();
    expect(backup).toMatchObject({ format: 'crankhouse-backup', formatVersion: 1, deviceId: await source.deviceId() });
    const file: unknown = JSON.parse(JSON.stringify(backup));

    const target = await freshStore();
    // 2 configurations + 4 rounds + 8 records, as populate() made them.
    expect(await target.importBackup(file)).toEqual({ added: 14, skipped: 0, conflicts: [] });
    const copy = await target.exportBackup();
    expect(stableHash(content(copy))).toBe(stableHash(content(backup)));
    expect(copy.outbox.map((entry) => entry.id)).toEqual(backup.outbox.map((entry) => entry.id));
    expect(await target.outboxCounts()).toEqual(await source.outboxCounts());
    expect((await target.getRound(fixtureRound(1).id))?.state).toBe('finished');
    expect((await rejection(target.saveReading(fixtureReading(1, 0)))).code).toBe('E_IMMUTABLE');
    await target.saveReading(fixtureReading(3, 9));
    source.close();
    target.close();
  });

  it('should change nothing when the same file is imported twice', async () => {
    const source = await freshStore();
    await populate(source);
    const file: unknown = JSON.parse(JSON.stringify(await source.exportBackup()));
    const name = freshName();
    const target = await openStore({ name });
    await target.importBackup(file);
    const once = stableHash(await dumpDatabase(name));
    expect(await target.importBackup(file)).toEqual({ added: 0, skipped: 14, conflicts: [] });
    expect(stableHash(await dumpDatabase(name))).toBe(once);
    // Importing a tablet's own backup is the same no-op.
    expect((await source.importBackup(file)).added).toBe(0);
    source.close();
    target.close();
  });

  it('should report records that differ as conflicts and keep what this tablet holds', async () => {
    const source = await freshStore();
    await populate(source);
    const file = JSON.parse(JSON.stringify(await source.exportBackup()));
    const target = await freshStore();
    const note = fixtureRecord(0, 0);
    const different = { ...(note.body as object), text: 'written on the other tablet' };
    await target.saveRecord('note', different as never, META);
    await target.putConfig({ ...siteConfig(2), name: 'Other site name' });

    const result = await target.importBackup(file);
    expect(result.added).toBe(12);
    expect(result.conflicts).toHaveLength(2);
    expect(result.conflicts.join('\n')).toContain(`note record ${note.id}`);
    expect(result.conflicts.join('\n')).toContain('configuration version 2');
    expect(await target.listRecords('note')).toContainEqual(different);
    expect((await target.getConfig(2))?.name).toBe('Other site name');
    // The conflicting record was not queued again; its own entry is still the only one.
    expect((await target.outboxPending(100)).filter((entry) => entry.id === note.id)).toHaveLength(1);
    source.close();
    target.close();
  });

  it.each([
    ['a wrong field value', (f: Bad) => (f.rounds[0].round.state = 'done'), 'rounds.0.round.state'],
    ['a wrong type', (f: Bad) => (f.rounds[1].readings[0].valueSI = 'high'), 'rounds.1.readings.0.valueSI'],
    ['a bad UUID', (f: Bad) => (f.records[2].body.id = 'not-a-uuid'), 'records.2.body.id'],
    ['an unknown record type', (f: Bad) => (f.records[0].type = 'invoice'), 'records.0.type: must be one of'],
    ['an unknown field', (f: Bad) => (f.extra = true), 'extra'],
    ['another format', (f: Bad) => (f.formatVersion = 2), 'formatVersion'],
    [
      'a reading of another round',
      (f: Bad) => (f.rounds[2].readings[1].roundId = f.rounds[0].round.id),
      'rounds.2.readings.1.roundId',
    ],
    [
      'an outbox envelope that differs from its record',
      (f: Bad) => (f.outbox[0].envelope.body.round.siteName = 'Elsewhere'),
      'outbox.0.envelope.body',
    ],
    ['an outbox entry without its record', (f: Bad) => f.records.splice(7, 1), 'outbox.'],
    ['a repeated record', (f: Bad) => f.records.push(f.records[0]), 'records.8.body.id'],
  ])('should refuse a file with %s, name the path and change nothing', async (_what, corrupt, path) => {
    const { store, name } = await storeWithDump();
    const file = JSON.parse(JSON.stringify(await store.exportBackup()));
    corrupt(file);
    const before = stableHash(await dumpDatabase(name));
    const error = await rejection(store.importBackup(file));
    expect(error.code).toBe('E_INVALID');
    expect(error.message).toContain('The backup file is not valid');
    expect(error.message).toContain(path);
    expect(stableHash(await dumpDatabase(name))).toBe(before);
    store.close();
  });

  it('should refuse something that is not a backup at all', async () => {
    const store = await freshStore();
    for (const data of [null, 'backup', [], { format: 'crankhouse-backup' }]) {
      expect((await rejection(store.importBackup(data))).code).toBe('E_INVALID');
    }
    store.close();
  });
});

// biome-ignore lint/suspicious/noExplicitAny: the corruption cases poke at an untyped copy of the file on purpose
type Bad = any;
