/**
 * Two tablets record rounds with the server stopped, come back online and send them; a supervisor's tablet then
 * receives both rounds with their findings. Real server, production build, Debian Chromium.
 */
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PEOPLE } from '../../src/demo';
import { type AppServer, startAppServer } from '../support/app-server';
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
} from '../support/round-app';

let server: AppServer;
const browsers: FreshBrowser[] = [];

beforeAll(async () => {
  assertChromiumInstalled();
  server = await startAppServer({ siteName: DEMO_SITE_NAME });
});

afterAll(async () => {
  for (const browser of browsers) await browser.close();
  await server?.close();
});

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

describe('two tablets offline, then a supervisor', () => {
  it("should bring both tablets' rounds and findings to the supervisor's tablet", async () => {
    const first = await tablet('operator');
    const second = await tablet('operator2');

    await server.stop();
    // source: demo limits, main bearing alarm 93 °C (a placeholder for the frame maker's value; common practice)
    const roundA = await recordNightRound(
      first,
      server.origin,
      '96',
      'MB2 hot to the touch; oil flow checked, shift lead told.',
    );
    const roundB = await recordNightRound(
      second,
      server.origin,
      '97',
      'MB2 still hot on the night round; maintenance called.',
    );
    for (const page of [first, second]) {
      await page.goto(`${server.origin}/device`);
      await page.waitForFunction(() => /Waiting to be sent[1-9]/.test(document.body.textContent ?? ''), null, {
        timeout: STEP_MS,
      });
    }

    await server.start();
    await syncUntilSent(first, server.origin);
    await syncUntilSent(second, server.origin);

    const supervisor = await tablet('supervisor');
    await supervisor.getByTestId('sync-now').click();
    await supervisor.waitForFunction(
      () => document.querySelector('[data-testid="sync-last"]')?.textContent !== 'never',
      null,
      { timeout: STEP_MS },
    );
    await supervisor.goto(`${server.origin}/rounds`);
    const list = supervisor.getByRole('region', { name: 'Finished rounds on this tablet' });
    await expect.poll(() => list.textContent(), { timeout: STEP_MS }).toContain(DEMO_PEOPLE.operator.name);
    expect(await list.textContent()).toContain(DEMO_PEOPLE.operator2.name);

    for (const [roundId, bearing] of [
      [roundA, '96'],
      [roundB, '97'],
    ] as const) {
      await supervisor.goto(`${server.origin}/rounds/${roundId}`);
      const card = supervisor.getByTestId('point-K-101-MB2-T');
      await card.waitFor({ timeout: STEP_MS });
      expect(await supervisor.getByTestId('input-K-101-MB2-T').inputValue()).toBe(bearing);
      const severities = await card
        .locator('.finding')
        .evaluateAll((els) => els.map((el) => el.getAttribute('data-severity')));
      expect(severities).toContain('alarm');
      expect(await card.textContent()).toMatch(/Note: MB2/);
    }
  }, 300_000);
});
