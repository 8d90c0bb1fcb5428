import { describe, expect, it } from 'vitest';
import {
  formatBytes,
  readStorageState,
  storageWarnings,
  USAGE_WARNING_FRACTION,
} from '../../../src/app/models/storage';

describe('storageWarnings', () => {
  it('should warn when the browser has not made storage persistent', () => {
    const warnings = storageWarnings({ supported: true, persisted: false, usageBytes: 10, quotaBytes: 1000 });
    expect(warnings.map((warning) => warning.kind)).toEqual(['not-persistent']);
    expect(warnings[0]?.message).toMatch(/may delete unsynced readings/);
  });

  it('should warn at 80 % of the quota (reliability plan T2.2) and not below it', () => {
    expect(USAGE_WARNING_FRACTION).toBe(0.8);
    const base = { supported: true, persisted: true, quotaBytes: 1000 };
    expect(storageWarnings({ ...base, usageBytes: 799 })).toEqual([]);
    expect(storageWarnings({ ...base, usageBytes: 800 }).map((warning) => warning.kind)).toEqual(['nearly-full']);
  });

  it('should say so when the browser has no Storage API', () => {
    expect(storageWarnings({ supported: false, persisted: null, usageBytes: null, quotaBytes: null })[0]?.kind).toBe(
      'unsupported',
    );
  });

  it('should stay quiet while the state is still unknown', () => {
    expect(storageWarnings({ supported: true, persisted: null, usageBytes: null, quotaBytes: null })).toEqual([]);
  });
});

describe('readStorageState', () => {
  it('should combine persisted() and estimate()', async () => {
    const manager = {
      persisted: async () => true,
      estimate: async () => ({ usage: 2048, quota: 1_000_000 }),
    } as unknown as StorageManager;
    expect(await readStorageState(manager)).toEqual({
      supported: true,
      persisted: true,
      usageBytes: 2048,
      quotaBytes: 1_000_000,
    });
  });

  it('should report an engine without the Storage API as unsupported', async () => {
    expect((await readStorageState(null)).supported).toBe(false);
  });
});

describe('formatBytes', () => {
  // source: IEC 80000-13 binary prefixes (1 KiB = 1024 B, 1 MiB = 1024 KiB)
  it('should use binary prefixes', () => {
    expect(formatBytes(0)).toBe('0 B');
    expect(formatBytes(1023)).toBe('1023 B');
    expect(formatBytes(1024)).toBe('1.00 KiB');
    expect(formatBytes(1536)).toBe('1.50 KiB');
    expect(formatBytes(10 * 1024 * 1024)).toBe('10.0 MiB');
    expect(formatBytes(300 * 1024 ** 3)).toBe('300 GiB');
  });

  it('should show a dash for impossible values', () => {
    expect(formatBytes(-1)).toBe('–');
    expect(formatBytes(Number.NaN)).toBe('–');
  });
});
