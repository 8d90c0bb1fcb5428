/**
 * The supervisor's review in Debian's Chromium against the real server and production build: findings from two
 * operators' tablets reach the supervisor's board after sync; the supervisor acknowledges one; the acknowledgement
 * reaches an operator's tablet; the CSV exports are checked row by row against what was entered; a trend chart
 * draws its limit lines and projected date; axe-core finds no serious or critical violation on these screens.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Papa from 'papaparse';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '../../src/demo';
import { type AppServer, startAppServer } from '../support/app-server';
import { axeReport } from '../support/axe';
import { assertChromiumInstalled, type FreshBrowser, launchFreshChromium } from '../support/chromium';
import {
  DEMO_SITE_NAME,
  firstPage,
  recordNightRound,
  STEP_MS,
  signIn,
  syncUntilSent,
  waitForDemoImport,
  waitForServiceWorkerControl,
  waitForTestIdText,
} from '../support/round-app';

const LONG_TEST_MS = 300_000;
let server: AppServer;
const browsers: FreshBrowser[] = [];
let operator: Page;
let supervisor: Page;
let roundA: string;
let roundB: string;
const COMMENT = 'Oil cooler fouled; cleaning planned for Thursday. Watch MB2 each round until then.';

async function tablet(user: keyof typeof DEMO_PEOPLE): Promise<Page> {
  const browser = await launchFreshChromium({ viewport: { width: 1280, height: 800 } });
  browsers.push(browser);
  const page = await firstPage(browser);
  await page.goto(server.origin);
  await waitForServiceWorkerControl(page);
  await waitForDemoImport(page, server.origin);
  await signIn(page, server.origin, user);
  return page;
}

/** The board item of a round's main bearing 2 temperature alarm. */
const bearingItem = (page: Page, roundId: string) =>
  page.locator(`[data-testid^="board-item-${roundId}:"]`).filter({ hasText: 'MB2' }).first();

async function openBoard(page: Page): Promise<void> {
  await page.goto(`${server.origin}/review`);
  await page.getByTestId('board-counts').waitFor({ state: 'visible', timeout: STEP_MS });
  await page.getByTestId('filter-machine').selectOption('K-101');
}

async function downloadCsv(page: Page, testId: string): Promise<Array<Record<string, string>>> {
  const scratch = mkdtempSync(join(tmpdir(), 'crankhouse-csv-'));
  try {
    const [file] = await Promise.all([
      page.waitForEvent('download', { timeout: STEP_MS }),
      page.getByTestId(testId).click(),
    ]);
    const path = join(scratch, 'export.csv');
    await file.saveAs(path);
    const text = readFileSync(path, 'utf8');
    // RFC 4180 §2: records end with CRLF.
    expect(text.endsWith('\r\n')).toBe(true);
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    return parsed.data;
  } finally {
    rmSync(scratch, { recursive: true, force: true });
  }
}

async function expectNoSeriousAxe(page: Page): Promise<void> {
  const result = await axeReport(page);
  expect(result.passedRules).toBeGreaterThan(15);
  expect(result.serious).toEqual([]);
}

beforeAll(async () => {
  assertChromiumInstalled();
  server = await startAppServer({ siteName: DEMO_SITE_NAME });
  operator = await tablet('operator');
  const second = await tablet('operator2');
  await server.stop();
  // source: demo limits, main bearing alarm 93 °C (a placeholder for the frame maker's value; common practice)
  roundA = await recordNightRound(operator, server.origin, '96', 'MB2 hot to the touch; oil flow checked.');
  roundB = await recordNightRound(second, server.origin, '97', 'MB2 still hot; maintenance called.');
  await server.start();
  await syncUntilSent(operator, server.origin);
  await syncUntilSent(second, server.origin);
  supervisor = await tablet('supervisor');
  await syncUntilSent(supervisor, server.origin);
}, LONG_TEST_MS);

afterAll(async () => {
  for (const browser of browsers) await browser.close();
  await server?.close();
});

describe('supervisor review', () => {
  it(
    "should show both operators' findings, and carry an acknowledgement back to an operator's tablet",
    async () => {
      await openBoard(supervisor);
      const a = bearingItem(supervisor, roundA);
      const b = bearingItem(supervisor, roundB);
      await a.waitFor({ state: 'attached', timeout: STEP_MS });
      expect(await a.getAttribute('data-state')).toBe('open');
      expect(await b.getAttribute('data-state')).toBe('open');
      expect(await a.textContent()).toContain(DEMO_PEOPLE.operator.name);
      expect(await b.textContent()).toContain(DEMO_PEOPLE.operator2.name);
      expect(await a.locator('[data-severity]').first().getAttribute('data-severity')).toBe('alarm');
      // Online, the supervisor's board is compared with the server's own evaluation; both tablets ran the same checks.
      await waitForTestIdText(
        supervisor,
        'server-check',
        /^The site server recomputed every round it holds: 0 findings differ/,
      );

      await a.locator(':scope > summary').click();
      // The readings behind it, as entered on the operator's tablet.
      await expect.poll(() => a.textContent(), { timeout: STEP_MS }).toContain('96 degC');
      await a.getByTestId('disposition-acknowledged').click();
      await a.getByTestId('review-comment').fill(COMMENT);
      await a.getByTestId('review-save').click();
      await expect
        .poll(() => bearingItem(supervisor, roundA).getAttribute('data-state'), { timeout: STEP_MS })
        .toBe('acknowledged');
      await syncUntilSent(supervisor, server.origin);

      // The operator's tablet pulls the review at its next sync.
      await expect
        .poll(
          async () => {
            await operator.goto(server.origin);
            await operator.getByTestId('sync-now').click();
            await waitForTestIdText(operator, 'sync-pending', '0');
            await openBoard(operator);
            const item = bearingItem(operator, roundA);
            await item.waitFor({ state: 'attached', timeout: STEP_MS });
            return item.getAttribute('data-state');
          },
          { timeout: 60_000, interval: 2_000 },
        )
        .toBe('acknowledged');
      const item = bearingItem(operator, roundA);
      await item.locator(':scope > summary').click();
      expect(await item.getByTestId('review-history').textContent()).toContain(
        `${DEMO_PEOPLE.supervisor.name}: Acknowledged — ${COMMENT}`,
      );
    },
    LONG_TEST_MS,
  );

  it(
    'should export readings and findings as CSV that match what was entered, row by row',
    async () => {
      await supervisor.goto(`${server.origin}/export`);
      await supervisor.getByTestId('export-readings').waitFor({ state: 'visible', timeout: STEP_MS });

      const readings = (await downloadCsv(supervisor, 'export-readings')).filter(
        (row) => row.round_id === roundA || row.round_id === roundB,
      );
      const entered = readings
        .filter((row) => row.entered_text !== '')
        .map((row) => [row.round_id, row.point_id, row.entered_text, row.entered_unit, row.si_unit, row.started_by]);
      expect(entered.sort()).toEqual(
        [
          [roundA, 'K-101-LO-T', '55', 'degC', 'K', DEMO_PEOPLE.operator.name],
          [roundA, 'K-101-MB2-T', '96', 'degC', 'K', DEMO_PEOPLE.operator.name],
          [roundB, 'K-101-LO-T', '55', 'degC', 'K', DEMO_PEOPLE.operator2.name],
          [roundB, 'K-101-MB2-T', '97', 'degC', 'K', DEMO_PEOPLE.operator2.name],
        ].sort(),
      );
      // T/K = t/°C + 273.15 (SI Brochure, 9th ed., §2.3.1).
      const si = (roundId: string, pointId: string) =>
        Number(readings.find((row) => row.round_id === roundId && row.point_id === pointId)?.value_si);
      expect(si(roundA, 'K-101-MB2-T')).toBeCloseTo(369.15, 9);
      expect(si(roundB, 'K-101-MB2-T')).toBeCloseTo(370.15, 9);
      expect(si(roundA, 'K-101-LO-T')).toBeCloseTo(328.15, 9);
      expect(readings.find((row) => row.round_id === roundA && row.point_id === 'K-101-MB2-T')?.note).toContain(
        'MB2 hot to the touch',
      );

      const findings = (await downloadCsv(supervisor, 'export-findings')).filter(
        (row) => (row.round_id === roundA || row.round_id === roundB) && row.bearing_id === 'MB2',
      );
      const alarms = findings.filter((row) => row.severity === 'alarm');
      expect(alarms.map((row) => row.round_id).sort()).toEqual([roundA, roundB].sort());
      const reviewed = alarms.find((row) => row.round_id === roundA);
      expect(reviewed).toMatchObject({
        machine_id: 'K-101',
        review_disposition: 'acknowledged',
        review_by: DEMO_PEOPLE.supervisor.name,
        review_comment: COMMENT,
      });
      expect(alarms.find((row) => row.round_id === roundB)?.review_disposition).toBe('');

      // The printable report lists both alarms with the decision.
      const report = supervisor.getByTestId('exceptions-report');
      expect(await report.textContent()).toContain(COMMENT);
    },
    LONG_TEST_MS,
  );

  it(
    'should draw a trend with its limit lines and the projected date in words',
    async () => {
      // The demo story: the crosshead pin of K-102 throw 3 creeps up during the last 30 days toward its limits
      // (demo configuration: watch 167 °F; the chart shows the point's own unit).
      await supervisor.goto(`${server.origin}/trends/K-102-XH3-T`);
      const chart = supervisor.getByTestId('trend-chart');
      await chart.waitFor({ state: 'visible', timeout: STEP_MS });
      const canvas = supervisor.getByTestId('trend-canvas').locator('canvas');
      await canvas.waitFor({ state: 'attached', timeout: STEP_MS });
      const box = await canvas.boundingBox();
      expect(box?.width ?? 0).toBeGreaterThan(200);
      const drawn = await supervisor
        .getByTestId('trend-canvas')
        .locator('.uplot')
        .evaluate((root) => (root as HTMLElement).dataset.drawnLimits ?? '');
      expect(drawn.split('|')).toContain('Watch high 167 °F');
      expect(await supervisor.getByTestId('trend-limits').textContent()).toContain('Watch high 167 °F');
      expect(await supervisor.getByTestId('trend-projection').textContent()).toMatch(
        /^At this rate it reaches the watch limit 167 °F about \d{1,2} [A-Z][a-z]+ \d{4} \(in \d+ days?\)\.$/,
      );
      expect((await supervisor.getByTestId('trend-summary').textContent())?.length ?? 0).toBeGreaterThan(20);
      await expectNoSeriousAxe(supervisor);
    },
    LONG_TEST_MS,
  );

  it(
    'should show the machine view: stages, power curve, rod load per throw and modelled PV loops',
    async () => {
      await supervisor.goto(`${server.origin}/machines/K-101`);
      await supervisor.getByTestId('machine-view').waitFor({ state: 'visible', timeout: STEP_MS });
      for (const testId of ['power-curve', 'rod-load-1', 'pv-C1-head', 'pv-C1-crank']) {
        await supervisor.getByTestId(testId).first().waitFor({ state: 'visible', timeout: STEP_MS });
      }
      // Every chart says what it drew on its canvas (lines and markers), and has a text alternative beside it.
      const drawn = await supervisor
        .locator('[data-drawn]')
        .evaluateAll((charts) => charts.map((chart) => chart.getAttribute('data-drawn') ?? ''));
      expect(drawn.length).toBeGreaterThan(2);
      expect(drawn.every((d) => d.length > 0)).toBe(true);
      expect((await supervisor.getByTestId('power-curve-summary').first().textContent())?.length ?? 0).toBeGreaterThan(
        20,
      );
      await expectNoSeriousAxe(supervisor);
    },
    LONG_TEST_MS,
  );

  it(
    'should pass axe-core on the board, an opened finding and the exports',
    async () => {
      await openBoard(supervisor);
      await expectNoSeriousAxe(supervisor);
      await bearingItem(supervisor, roundB).locator(':scope > summary').click();
      await expectNoSeriousAxe(supervisor);
      await supervisor.goto(`${server.origin}/export`);
      await supervisor.getByTestId('exceptions-report').waitFor({ state: 'visible', timeout: STEP_MS });
      await expectNoSeriousAxe(supervisor);
      // The site's valve life: the demo's K-101 C1-HE-D2 failed three times (days 8, 20 and 70 of the demo story).
      await supervisor.goto(`${server.origin}/valve-life`);
      const worst = supervisor.getByTestId('site-valve-life').locator('tbody tr').first();
      await worst.waitFor({ state: 'visible', timeout: STEP_MS });
      expect(await worst.getAttribute('data-testid')).toBe('life-K-101-C1-HE-D2');
      expect((await worst.locator('td').allTextContents())[2]).toBe('3');
      await expectNoSeriousAxe(supervisor);
    },
    LONG_TEST_MS,
  );
});
