import 'fake-indexeddb/auto';
import { describe, expect, it } from 'vitest';
import { openStore } from '../../src/store';
import { fixtureReading, fixtureRecord, fixtureRound } from '../support/store-fixture';
import { freshName, freshStore, META, rejection, siteConfig } from './helpers';

// source: RFC 9562 §5.4 (version 4: version nibble 4, variant bits 10)
const UUID_V4 = /^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/;

describe('meta, device id and first save', () => {
  it('should keep meta values and refuse the keys the store keeps itself', async () => {
    const store = await freshStore();
    expect(await store.getMeta('lastSyncAt')).toBeUndefined();
    await store.setMeta('lastSyncAt', { at: '2026-03-02T10:00:00Z' });
    expect(await store.getMeta('lastSyncAt')).toEqual({ at: '2026-03-02T10:00:00Z' });
    expect((await rejection(store.setMeta('deviceId', 'mine'))).code).toBe('E_INVALID');
    // The pull cursor moves only together with the records it covers (applyPulled), never on its own.
    expect((await rejection(store.setMeta('pullCursor', 41))).code).toBe('E_INVALID');
    expect(await store.pullCursor()).toBe(0);
    expect((await rejection(store.setMeta('', 1))).message).toContain('key');
    store.close();
  });

  it('should make the device id once and keep it across connections', async () => {
    const name = freshName();
    const first = await openStore({ name });
    const id = await first.deviceId();
    expect(id).toMatch(UUID_V4);
    expect(await first.deviceId()).toBe(id);
    first.close();
    const second = await openStore({ name });
    expect(await second.deviceId()).toBe(id);
    second.close();
  });

  it('should signal the first save once per device, not per connection or per save', async () => {
    const name = freshName();
    const calls: string[] = [];
    const first = await openStore({ name, onFirstSave: () => calls.push('first') });
    await first.putConfig(siteConfig());
    await rejection(first.saveReading(fixtureReading(0, 0)));
    expect(calls).toEqual([]);
    await first.startRound(fixtureRound(0));
    await first.saveReading(fixtureReading(0, 0));
    expect(calls).toEqual(['first']);
    first.close();
    const second = await openStore({ name, onFirstSave: () => calls.push('second') });
    await second.saveRecord('note', fixtureRecord(0, 0).body as never, META);
    expect(calls).toEqual(['first']);
    second.close();
  });

  it('should fail calls after close with E_CLOSED', async () => {
    const store = await freshStore();
    store.close();
    expect((await rejection(store.getMeta('x'))).code).toBe('E_CLOSED');
  });
});

describe('site configuration', () => {
  it('should store versions, return the latest by default and refuse changing a stored version', async () => {
    const store = await freshStore();
    expect(await store.getConfig()).toBeUndefined();
    expect(await store.putConfig(siteConfig(1))).toBe('saved');
    expect(await store.putConfig(siteConfig(3))).toBe('saved');
    expect(await store.putConfig(siteConfig(2))).toBe('saved');
    expect((await store.getConfig())?.version).toBe(3);
    expect(await store.getConfig(2)).toEqual(siteConfig(2));
    expect(await store.putConfig(siteConfig(2))).toBe('unchanged');
    const changed = await rejection(store.putConfig({ ...siteConfig(2), name: 'Renamed' }));
    expect(changed.code).toBe('E_IMMUTABLE');
    expect((await store.getConfig(2))?.name).toBe(siteConfig(2).name);
    store.close();
  });

  it('should refuse an invalid configuration naming the path', async () => {
    const store = await freshStore();
    const config = siteConfig(4);
    const cylinder = config.machines[0]?.cylinders[0];
    if (cylinder) cylinder.rodM = 0.5;
    const error = await rejection(store.putConfig(config));
    expect(error.code).toBe('E_INVALID');
    expect(error.message).toContain('config.machines.0.cylinders.0.rodM');
    expect(await store.getConfig(4)).toBeUndefined();
    store.close();
  });
});
