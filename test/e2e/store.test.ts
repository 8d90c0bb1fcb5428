/**
 * The store in real Chromium IndexedDB, without the app: a blank page loads the store bundle
 * (test/support/store-page.ts). Covers the upgrade from a genuine version-1 database (reliability T3.1), a browser
 * killed in the middle of saving (T1.2), strict durability (T1.5) and a full disk (T2.2).
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { Reading } from '../../src/schema';
import type { StoredRecord } from '../../src/store/db';
import { assertChromiumInstalled, type FreshBrowser, launchFreshChromium } from '../support/chromium';
import { stableHash } from '../support/stable-hash';
import { fixtureReading, fixtureRecord, makeFixture, pointIdOf } from '../support/store-fixture';
import { browserPids, buildStoreBundle, type StorePage, type StoreWindow, serveStorePage } from '../support/store-page';

let server: StorePage;

beforeAll(async () => {
  assertChromiumInstalled();
  server = await serveStorePage(await buildStoreBundle());
});

afterAll(async () => {
  await server?.close();
});

async function openPage(browser: FreshBrowser): Promise<Page> {
  const page = browser.context.pages()[0] ?? (await browser.context.newPage());
  await page.goto(server.origin);
  await page.waitForFunction(() => 'crankhouseStore' in window);
  return page;
}

/** Resolves when `predicate` holds, checking every 50 ms; fails with `what` after `ms` (a hang guard). */
async function until(predicate: () => boolean, ms: number, what: string): Promise<void> {
  const deadline = Date.now() + ms;
  while (!predicate()) {
    if (Date.now() > deadline) throw new Error(`${what} did not happen within ${ms} ms`);
    await new Promise((done) => setTimeout(done, 50));
  }
}

describe('store in Chromium', () => {
  it('should upgrade a genuine version-1 database with every record unchanged', async () => {
    const browser = await launchFreshChromium();
    try {
      const page = await openPage(browser);
      const result = await page.evaluate(async () => {
        const s = (window as unknown as StoreWindow).crankhouseStore;
        const fixture = s.makeFixture();
        await s.writeV1Database('migration', fixture);
        const before = await s.dumpDatabase('migration');
        const store = await s.openStore({ name: 'migration' });
        const after = await s.dumpDatabase('migration');
        const pending = (await store.outboxPending(1000)).map((entry) => entry.id);
        const history = await store.readingsForPoint(s.pointIdOf(3), { limit: 1000 });
        store.close();
        return { before, after, pending, history };
      });
      const fixture = makeFixture();
      expect(result.before.version).toBe(1);
      expect(result.after.version).toBe(2);
      expect(result.after.indexes.readings).toEqual(['byPointAt', 'byRound']);
      expect(result.after.indexes.outbox).toEqual(['byRecordId', 'byState']);
      expect(result.after.stores.readings?.length).toBeGreaterThanOrEqual(1000);
      // Every record hashes the same before and after the upgrade, and the same as the fixture made here in Node.
      for (const store of Object.keys(result.before.stores)) {
        const before = result.before.stores[store] ?? [];
        const after = result.after.stores[store] ?? [];
        expect(
          after.map(([key]) => key),
          store,
        ).toEqual(before.map(([key]) => key));
        after.forEach(([key, value], index) => {
          expect(stableHash(value), `${store} ${String(key)}`).toBe(stableHash(before[index]?.[1]));
        });
      }
      const readingsById = new Map(fixture.readings.map((reading) => [reading.id, stableHash(reading)]));
      for (const [key, value] of result.after.stores.readings ?? []) {
        expect(stableHash(value)).toBe(readingsById.get(key as string));
      }
      const pending = fixture.outbox.filter((entry) => entry.state === 'pending').map((entry) => entry.id);
      expect(pending.length).toBeGreaterThanOrEqual(50);
      expect(result.pending).toEqual(pending);
      expect(result.after.stores.outbox?.map(([, entry]) => (entry as { id: string }).id)).toEqual(
        fixture.outbox.map((entry) => entry.id),
      );
      const finished = new Set(fixture.rounds.filter((r) => r.state === 'finished').map((r) => r.id));
      const history = fixture.readings
        .filter((reading) => reading.pointId === pointIdOf(3) && finished.has(reading.roundId))
        .sort((a, b) => Date.parse(b.at) - Date.parse(a.at));
      expect(stableHash(result.history)).toBe(stableHash(history));
    } finally {
      await browser.close();
    }
  });

  it('should keep every reading reported saved when the browser is killed mid-write', async () => {
    const TOTAL = 3000;
    const KILL_AFTER = 80;
    const profileDir = mkdtempSync(join(tmpdir(), 'crankhouse-kill-'));
    let browser: FreshBrowser | null = null;
    try {
      browser = await launchFreshChromium({ profileDir });
      const page = await openPage(browser);
      const saved: string[] = [];
      await page.exposeFunction('reportSaved', (id: string) => {
        saved.push(id);
      });
      const closed = new Promise<void>((done) => browser?.context.once('close', () => done()));
      const writing = page
        .evaluate(async (total) => {
          const s = (window as unknown as StoreWindow).crankhouseStore;
          const report = (window as unknown as { reportSaved: (id: string) => Promise<void> }).reportSaved;
          const meta = { author: 'op-1', device: 'dev-fixture', createdAt: '2026-03-02T10:00:00Z' };
          const store = await s.openStore({ name: 'crash' });
          await store.startRound(s.fixtureRound(0));
          for (let i = 0; i < total; i += 1) {
            const reading = s.fixtureReading(0, i % 60, i);
            await store.saveReading(reading);
            void report(reading.id);
            if (i % 10 === 9) {
              const record = s.fixtureRecord(Math.floor(i / 10), 0);
              await store.saveRecord(record.type, record.body as never, meta);
              void report(record.id);
            }
          }
        }, TOTAL)
        .then(
          () => 'finished',
          () => 'killed',
        );
      await until(() => saved.length >= KILL_AFTER, 60_000, `${KILL_AFTER} saves`);
      const pids = browserPids(profileDir);
      expect(pids).toHaveLength(1);
      process.kill(pids[0] as number, 'SIGKILL');
      await Promise.race([
        closed,
        new Promise((_, reject) => setTimeout(() => reject(new Error('the killed browser never closed')), 30_000)),
      ]);
      expect(await writing).toBe('killed');
      const reported = [...saved];
      await browser.close();

      browser = await launchFreshChromium({ profileDir });
      const after = await (await openPage(browser)).evaluate(async () => {
        const s = (window as unknown as StoreWindow).crankhouseStore;
        const store = await s.openStore({ name: 'crash' });
        const readings = await store.readingsOf(s.fixtureRound(0).id);
        const dump = await s.dumpDatabase('crash');
        store.close();
        return { readings, records: dump.stores.records ?? [], outbox: dump.stores.outbox ?? [] };
      });

      // Kill mid-write: some saves were reported, not all of them.
      const readingIds = new Set(Array.from({ length: TOTAL }, (_, i) => fixtureReading(0, i % 60, i).id));
      const reportedReadings = reported.filter((id) => readingIds.has(id));
      expect(reportedReadings.length).toBeGreaterThan(0);
      expect(reportedReadings.length).toBeLessThan(TOTAL);
      const expected = new Map<string, string>();
      for (let i = 0; i < TOTAL; i += 1) {
        const reading = fixtureReading(0, i % 60, i);
        expected.set(reading.id, stableHash(reading));
        if (i % 10 === 9) {
          const record = fixtureRecord(Math.floor(i / 10), 0);
          expected.set(record.id, stableHash(record));
        }
      }
      const stored = new Map<string, string>();
      for (const reading of after.readings) {
        // None partial: each stored reading is valid and equals, byte for byte, the one the page sent.
        expect(Reading.safeParse(reading).success).toBe(true);
        stored.set(reading.id, stableHash(reading));
      }
      for (const [, record] of after.records) stored.set((record as StoredRecord).id, stableHash(record));
      for (const [id, hash] of stored) expect(hash, id).toBe(expected.get(id));
      for (const id of reported) expect(stored.get(id), `saved ${id}`).toBe(expected.get(id));
      // Records and outbox entries match one to one.
      const recordIds = after.records.map(([key]) => key as string).sort();
      const outboxIds = after.outbox.map(([, entry]) => (entry as { id: string }).id).sort();
      expect(outboxIds).toEqual(recordIds);
    } finally {
      await browser?.close();
      rmSync(profileDir, { recursive: true, force: true });
    }
  });

  it('should open every write transaction with strict durability', async () => {
    const browser = await launchFreshChromium();
    try {
      const page = await openPage(browser);
      const durabilities = await page.evaluate(async () => {
        const seen: string[] = [];
        const original = IDBDatabase.prototype.transaction;
        IDBDatabase.prototype.transaction = function (
          this: IDBDatabase,
          ...args: Parameters<IDBDatabase['transaction']>
        ) {
          const tx = original.apply(this, args);
          if (tx.mode === 'readwrite') seen.push(tx.durability);
          return tx;
        };
        const s = (window as unknown as StoreWindow).crankhouseStore;
        const meta = { author: 'op-1', device: 'dev-fixture', createdAt: '2026-03-02T10:00:00Z' };
        const store = await s.openStore({ name: 'durability' });
        const round = s.fixtureRound(0);
        await store.startRound(round);
        await store.saveReading(s.fixtureReading(0, 0));
        await store.finishRound({ roundId: round.id, finishedAt: '2026-03-01T07:00:00Z', findings: [], meta });
        const note = s.fixtureRecord(0, 0);
        await store.saveRecord(note.type, note.body as never, meta);
        await store.acknowledge([note.id]);
        store.close();
        return seen;
      });
      // source: W3C IndexedDB 3.0, IDBTransaction.durability; Chrome 121 made "relaxed" the default (reliability A2)
      expect(durabilities.length).toBeGreaterThanOrEqual(5);
      expect(new Set(durabilities)).toEqual(new Set(['strict']));
    } finally {
      await browser.close();
    }
  });

  it('should report a full disk as E_QUOTA and keep every earlier reading', async () => {
    const browser = await launchFreshChromium();
    try {
      const page = await openPage(browser);
      const cdp = await browser.context.newCDPSession(page);
      // A tiny quota for this origin, set before it stores anything (reliability A18: CDP quota override).
      await cdp.send('Storage.overrideQuotaForOrigin', { origin: server.origin, quotaSize: 400_000 });
      const result = await page.evaluate(async () => {
        const s = (window as unknown as StoreWindow).crankhouseStore;
        const store = await s.openStore({ name: 'quota' });
        await store.startRound(s.fixtureRound(0));
        const sent: unknown[] = [];
        let failure: { code: string; message: string } | null = null;
        for (let i = 0; i < 2000 && failure === null; i += 1) {
          const reading = { ...s.fixtureReading(0, i % 60, i), note: 'n'.repeat(3000) };
          try {
            await store.saveReading(reading);
            sent.push(reading);
          } catch (error) {
            failure = { code: (error as { code: string }).code, message: (error as Error).message };
          }
        }
        const stored = await store.readingsOf(s.fixtureRound(0).id);
        store.close();
        return { sent, stored, failure };
      });
      expect(result.failure?.code).toBe('E_QUOTA');
      expect(result.failure?.message).toMatch(/Sync/);
      expect(result.sent.length).toBeGreaterThan(0);
      const byId = (readings: Array<{ id: string }>) =>
        Object.fromEntries(readings.map((reading) => [reading.id, stableHash(reading)]));
      expect(byId(result.stored)).toEqual(byId(result.sent as Array<{ id: string }>));
      await cdp.detach();
    } finally {
      await browser.close();
    }
  });
});
