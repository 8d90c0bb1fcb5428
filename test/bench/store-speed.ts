/**
 * Cost of one autosave in real Chromium: `saveReading` (zod validation, a check of the round, strict durability,
 * resolved after the commit) against a bare idb `put` of an object of the same size into a plain store with the
 * browser's default durability. Budget (reliability T1.5): one save ≤ 100 ms p95 on the reference tablet.
 */
import { launchFreshChromium } from '../support/chromium';
import { buildStoreBundle, type StoreWindow, serveStorePage } from '../support/store-page';
import type { BenchRow } from './rows';

const SAVES = 300;
const WARM_UP = 20;

function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  const index = Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1));
  return sorted[index] ?? Number.NaN;
}

const round2 = (value: number) => Math.round(value * 100) / 100;

export async function storeSpeed(): Promise<BenchRow[]> {
  const server = await serveStorePage(await buildStoreBundle());
  const browser = await launchFreshChromium();
  try {
    const page = browser.context.pages()[0] ?? (await browser.context.newPage());
    await page.goto(server.origin);
    const times = await page.evaluate(
      async ({ saves, warmUp }) => {
        const s = (window as unknown as StoreWindow).crankhouseStore;
        const store = await s.openStore({ name: 'bench' });
        await store.startRound(s.fixtureRound(0));
        const readings = Array.from({ length: saves + warmUp }, (_, i) => s.fixtureReading(0, i % 60, i));
        const save: number[] = [];
        for (const [i, reading] of readings.entries()) {
          const start = performance.now();
          await store.saveReading(reading);
          if (i >= warmUp) save.push(performance.now() - start);
        }
        store.close();

        const bare = await s.openDB('bench-bare', 1, {
          upgrade(db) {
            db.createObjectStore('plain');
          },
        });
        const put: number[] = [];
        for (const [i, reading] of readings.entries()) {
          const start = performance.now();
          const tx = bare.transaction('plain', 'readwrite');
          await tx.store.put(reading, reading.id);
          await tx.done;
          if (i >= warmUp) put.push(performance.now() - start);
        }
        bare.close();
        return { save, put };
      },
      { saves: SAVES, warmUp: WARM_UP },
    );
    const save50 = percentile(times.save, 50);
    const save95 = percentile(times.save, 95);
    const put50 = percentile(times.put, 50);
    const put95 = percentile(times.put, 95);
    return [
      { figure: 'saveReading p50', value: round2(save50), unit: 'ms', note: `${SAVES} saves, strict durability` },
      { figure: 'saveReading p95', value: round2(save95), unit: 'ms', note: 'budget ≤ 100 ms on the reference tablet' },
      {
        figure: 'bare idb put p50',
        value: round2(put50),
        unit: 'ms',
        note: 'same object, plain store, default durability',
      },
      { figure: 'bare idb put p95', value: round2(put95), unit: 'ms', note: `${SAVES} puts` },
      {
        figure: 'saveReading / bare put, p50',
        value: round2(save50 / put50),
        unit: '×',
        note: 'what validation + strict cost',
      },
      {
        figure: 'saveReading / bare put, p95',
        value: round2(save95 / put95),
        unit: '×',
        note: 'Chromium headless, this machine',
      },
    ];
  } finally {
    await browser.close();
    await server.close();
  }
}
