/**
 * The production build, served by the real server, in Debian's Chromium:
 * the shell renders, Chromium judges the app installable, a new version waits for the person's go-ahead,
 * and after the first visit the app starts with the server stopped (the server is really closed:
 * Playwright's offline switch does not cut the service worker's own requests).
 */
import {
  appendFileSync,
  cpSync,
  existsSync,
  mkdirSync,
  mkdtempSync,
  readFileSync,
  rmSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readServerConfig } from '../../src/server/config';
import { type RunningServer, startServer } from '../../src/server/main';
import { assertChromiumInstalled, type FreshBrowser, launchFreshChromium } from '../support/chromium';
import { contrastRatio } from '../support/contrast';

const root = resolve(import.meta.dirname, '../..');
const builtDist = join(root, 'dist');
const screenshotDir = join(root, 'test-output', 'screenshots');
const version: string = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')).version;
const SITE_NAME = 'Cedar Flats Compressor Station (demo)';

let scratch: string;
let distDir: string;
let server: RunningServer | null = null;
let port = 0;
let browser: FreshBrowser;
let page: Page;
const cspViolations: string[] = [];
const pageErrors: string[] = [];

async function start(): Promise<void> {
  const config = readServerConfig(
    {
      PORT: String(port),
      HOST: '127.0.0.1',
      CRANKHOUSE_DATA: join(scratch, 'data'),
      CRANKHOUSE_DIST: distDir,
      CRANKHOUSE_SITE_NAME: SITE_NAME,
    },
    root,
  );
  server = await startServer(config, { log: () => {} });
  port = server.port;
}

async function stop(): Promise<void> {
  await server?.close();
  server = null;
}

const origin = () => `http://127.0.0.1:${port}`;

async function waitForServiceWorkerControl(target: Page): Promise<void> {
  await target.evaluate(async () => {
    await navigator.serviceWorker.ready;
    if (!navigator.serviceWorker.controller) {
      await new Promise<void>((done) => navigator.serviceWorker.addEventListener('controllerchange', () => done()));
    }
  });
}

beforeAll(async () => {
  assertChromiumInstalled();
  if (!existsSync(join(builtDist, 'index.html')) || !existsSync(join(builtDist, 'sw.js'))) {
    throw new Error('The browser tests run against the production build: run "npm run build" first (npm test does).');
  }
  scratch = mkdtempSync(join(tmpdir(), 'crankhouse-e2e-'));
  // A private copy of the build, so the update test can publish a "new version" without touching dist/.
  distDir = join(scratch, 'dist');
  cpSync(builtDist, distDir, { recursive: true });
  await start();
  browser = await launchFreshChromium({ viewport: { width: 1024, height: 768 } });
  page = browser.context.pages()[0] ?? (await browser.context.newPage());
  page.on('console', (message) => {
    const text = message.text();
    if (/Content Security Policy|Refused to (load|execute|apply|connect|frame)/i.test(text)) cspViolations.push(text);
  });
  page.on('pageerror', (error) => pageErrors.push(error.message));
});

afterAll(async () => {
  await browser?.close();
  await stop();
  if (scratch) rmSync(scratch, { recursive: true, force: true });
});

describe('app shell in Chromium', () => {
  it('should render the site name, server state, storage state and version', async () => {
    await page.goto(origin());
    await expect.poll(() => page.getByTestId('site-name').textContent()).toBe(SITE_NAME);
    await expect.poll(() => page.getByTestId('connection-state').textContent()).toBe('Server reachable');
    expect(await page.getByTestId('app-version').textContent()).toBe(version);
    await expect.poll(() => page.getByTestId('storage-state').textContent()).toMatch(/^Storage (kept|at risk)$/);
    await waitForServiceWorkerControl(page);
    await expect.poll(() => page.getByTestId('offline-state').textContent()).toBe('Works offline');
  });

  it('should give every button and link a touch target of at least 48 px', async () => {
    // source: WCAG 2.2 SC 2.5.8 asks 24 CSS px minimum; 48 px is the Android/Material touch-target guidance (common practice)
    const sizes = await page.$$eval('button, .nav__link', (elements) =>
      elements.map((element) => {
        const box = element.getBoundingClientRect();
        return { text: element.textContent, width: box.width, height: box.height };
      }),
    );
    expect(sizes.length).toBeGreaterThan(2);
    for (const size of sizes) {
      expect(size.height, `height of "${size.text}"`).toBeGreaterThanOrEqual(48);
      expect(size.width, `width of "${size.text}"`).toBeGreaterThanOrEqual(48);
    }
  });

  it('should be judged installable by Chromium', async () => {
    const cdp = await browser.context.newCDPSession(page);
    const manifest = (await cdp.send('Page.getAppManifest')) as { url: string; errors: Array<{ message: string }> };
    expect(manifest.url).toBe(`${origin()}/app.webmanifest`);
    expect(manifest.errors).toEqual([]);
    const { installabilityErrors } = await cdp.send('Page.getInstallabilityErrors');
    expect(installabilityErrors).toEqual([]);
    await cdp.detach();
  });

  it('should write screenshots of the sunlight and night themes', async () => {
    mkdirSync(screenshotDir, { recursive: true });
    const themeSwitch = page.getByTestId('theme-switch');
    const background = () => page.evaluate(() => getComputedStyle(document.body).backgroundColor);
    const textColour = () => page.evaluate(() => getComputedStyle(document.body).color);
    // Auto follows the tablet's own setting.
    await page.emulateMedia({ colorScheme: 'dark' });
    expect(await background()).toBe('rgb(11, 17, 22)');
    await page.emulateMedia({ colorScheme: 'light' });
    expect(await background()).toBe('rgb(255, 255, 255)');
    // Auto → Sunlight, which stays white even on a tablet set to dark.
    await themeSwitch.click();
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('sun');
    await page.emulateMedia({ colorScheme: 'dark' });
    expect(await background()).toBe('rgb(255, 255, 255)');
    // Sunlight readability: WCAG 2.2 SC 1.4.6 (enhanced contrast) asks at least 7:1 for body text.
    await expect.poll(async () => contrastRatio(await textColour(), await background())).toBeGreaterThanOrEqual(7);
    const sunFile = join(screenshotDir, 'shell-sun.png');
    await page.screenshot({ path: sunFile, fullPage: true });
    // Sunlight → Night
    await themeSwitch.click();
    expect(await page.evaluate(() => document.documentElement.dataset.theme)).toBe('night');
    await page.emulateMedia({ colorScheme: 'light' });
    expect(await background()).toBe('rgb(11, 17, 22)');
    expect(contrastRatio(await textColour(), await background())).toBeGreaterThanOrEqual(7);
    const nightFile = join(screenshotDir, 'shell-night.png');
    await page.screenshot({ path: nightFile, fullPage: true });
    // PNG signature; source: PNG specification (ISO/IEC 15948), section 5.2
    for (const file of [sunFile, nightFile]) {
      expect(readFileSync(file).subarray(0, 8)).toEqual(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]));
    }
  });

  it('should load the demo site onto a new tablet once, and save it all as a backup file', async () => {
    await page.getByRole('navigation').getByRole('link', { name: 'This tablet' }).click();
    const facts = page.getByTestId('device-facts');
    // 90 days of a morning and a night round (the demo's story); loaded in the background on first start.
    await expect.poll(() => facts.textContent(), { timeout: 60_000 }).toContain('Rounds on this tablet180');
    expect(await facts.textContent()).toContain(`Site configuration${SITE_NAME}, version 1`);
    expect(await facts.textContent()).toContain('Waiting to be sent0');

    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('backup-save').click()]);
    const file = join(scratch, 'backup.json');
    await download.saveAs(file);
    const backup = JSON.parse(readFileSync(file, 'utf8'));
    expect(backup.format).toBe('crankhouse-backup');
    expect(backup.rounds).toHaveLength(180);
    expect(backup.records.map((r: { type: string }) => r.type).sort()).toEqual([
      'bearingClearance',
      'lockoutAck',
      'lockoutAck',
      'lockoutAck',
      'lockoutAck',
      'lockoutAck',
      'valveChange',
      'valveChange',
      'valveChange',
      'valveChange',
    ]);

    // Restoring the same file changes nothing.
    await page.getByTestId('backup-restore').setInputFiles(file);
    await expect
      .poll(() => page.getByTestId('backup-message').textContent(), { timeout: 60_000 })
      .toMatch(/^Restored 0 records; \d+ were already here\.$/);
    // A damaged file is refused whole, with the place named.
    const damaged = join(scratch, 'damaged.json');
    backup.rounds[3].readings[0].valueSI = 'hot';
    writeFileSync(damaged, JSON.stringify(backup));
    await page.getByTestId('backup-restore').setInputFiles(damaged);
    await expect
      .poll(() => page.getByTestId('backup-message').textContent(), { timeout: 60_000 })
      .toMatch(/^Nothing was changed: .*rounds\.3\.readings\.0\.valueSI/);
    await page.getByRole('navigation').getByRole('link', { name: 'Home' }).click();
  });

  it('should offer a new version and reload only when asked', async () => {
    await page.evaluate(() => {
      (window as unknown as { beforeUpdate: boolean }).beforeUpdate = true;
    });
    // Publish a "new version": any byte change in sw.js makes the browser install it.
    appendFileSync(join(distDir, 'sw.js'), '\n// update-test build\n');
    await page.evaluate(async () => {
      const registration = await navigator.serviceWorker.getRegistration();
      await registration?.update();
    });
    await page.getByTestId('update-banner').waitFor({ state: 'visible' });
    // Waiting, not reloaded: the page keeps its state until the person agrees.
    expect(await page.evaluate(() => (window as unknown as { beforeUpdate?: boolean }).beforeUpdate)).toBe(true);
    expect(await page.evaluate(async () => Boolean((await navigator.serviceWorker.getRegistration())?.waiting))).toBe(
      true,
    );

    await Promise.all([page.waitForEvent('load'), page.getByTestId('update-reload').click()]);
    expect(await page.evaluate(() => (window as unknown as { beforeUpdate?: boolean }).beforeUpdate)).toBeUndefined();
    await waitForServiceWorkerControl(page);
    expect(await page.evaluate(async () => Boolean((await navigator.serviceWorker.getRegistration())?.waiting))).toBe(
      false,
    );
    expect(await page.getByTestId('update-banner').count()).toBe(0);
  });

  it('should start with the server stopped, lazy screens included', async () => {
    await waitForServiceWorkerControl(page);
    const failed: string[] = [];
    page.on('requestfailed', (request) => {
      if (!new URL(request.url()).pathname.startsWith('/api/')) failed.push(request.url());
    });
    await stop();

    await page.reload();
    await expect.poll(() => page.getByTestId('site-name').textContent()).toBe(SITE_NAME);
    await expect.poll(() => page.getByTestId('connection-state').textContent()).toBe('Server not reachable');

    // A lazily loaded screen, reached by the in-app link and by its address.
    await page.getByRole('navigation').getByRole('link', { name: 'This tablet' }).click();
    await page.getByTestId('device-facts').waitFor({ state: 'visible' });
    await page.goto(`${origin()}/device`);
    await page.getByTestId('device-facts').waitFor({ state: 'visible' });
    expect(await page.getByTestId('device-facts').textContent()).toContain(version);
    expect(failed).toEqual([]);
    await page.screenshot({ path: join(screenshotDir, 'device-offline.png'), fullPage: true });
  });

  it('should run the whole visit without a CSP violation or an uncaught error', () => {
    expect(cspViolations).toEqual([]);
    expect(pageErrors).toEqual([]);
  });
});
