/**
 * Driving the rounds screens of the real app in Chromium: what to enter at each demo check point (the texts an
 * operator entered on an early demo round, before the invented faults start) and the steps a person takes: wait for
 * the demo import, start a round, enter a point, pass the lockout gate, kill the browser and start it again.
 */

import type { Locator, Page } from 'playwright-core';
import { DEMO_PEOPLE, DEMO_SITE_NAME, demoHistory, OPEN_MACHINE_CAUTIONS } from '../../src/demo';
import type { CheckPoint } from '../../src/schema';
import { DB_NAME } from '../../src/store/db';
import { DEMO_PASSCODE } from './app-server';
import { type FreshBrowser, launchFreshChromium } from './chromium';
import { browserPids } from './store-page';

export { DEMO_SITE_NAME, OPEN_MACHINE_CAUTIONS };

/** Bounded waits for the app's own work (IndexedDB commits, screen changes); a hang fails with the step named. */
export const STEP_MS = 30_000;
/** The demo import writes 90 days of rounds; on a slow machine it takes a while (shell.test.ts allows the same). */
export const IMPORT_MS = 60_000;

export type EntryKind = 'number' | 'answer' | 'text';

export interface PlannedEntry {
  point: CheckPoint;
  kind: EntryKind;
  /** Exactly what the person types or taps. */
  text: string;
}

export function entryKind(point: CheckPoint): EntryKind {
  if (point.kind === 'yesNo' || point.kind === 'choice') return 'answer';
  if (point.kind === 'text') return 'text';
  return 'number';
}

/**
 * One entry per point of a route, from the demo round of `day` (0 = first day of the history): numeric points get
 * the text the operator entered that day; yes/no points the normal (expected) answer, choice points the first
 * option, text points "No remarks.". Lockout-related points (skipped on ordinary demo rounds) get their normal answer.
 */
export function demoEntries(routeId: 'morning' | 'night', day = 10): PlannedEntry[] {
  const history = demoHistory();
  const round = history.rounds.filter((r) => r.round.routeId === routeId)[day];
  const route = history.config.routes.find((r) => r.id === routeId);
  if (!round || !route) throw new Error(`The demo history has no ${routeId} round on day ${day}`);
  const entered = new Map(round.readings.map((reading) => [reading.pointId, reading.entered?.text ?? null]));
  return route.points.map((point): PlannedEntry => {
    const kind = entryKind(point);
    if (kind === 'text') return { point, kind, text: 'No remarks.' };
    if (point.kind === 'yesNo') return { point, kind, text: point.expected?.answer ?? 'yes' };
    if (point.kind === 'choice') return { point, kind, text: point.choices?.[0] ?? '' };
    const text = entered.get(point.id);
    if (!text) throw new Error(`The demo round of day ${day} has no entered text for ${point.id}`);
    return { point, kind, text };
  });
}

const escapeRegExp = (text: string) => text.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');

/** Waits until the element with `data-testid` shows exactly `expected` (or matches it). */
export async function waitForTestIdText(
  page: Page,
  testId: string,
  expected: string | RegExp,
  timeout = STEP_MS,
): Promise<void> {
  const pattern = typeof expected === 'string' ? { source: `^${escapeRegExp(expected)}$`, flags: '' } : expected;
  try {
    await page.waitForFunction(
      ({ id, source, flags }) => {
        const text = document.querySelector(`[data-testid="${id}"]`)?.textContent;
        return text !== undefined && text !== null && new RegExp(source, flags).test(text);
      },
      { id: testId, source: pattern.source, flags: pattern.flags },
      { timeout, polling: 50 },
    );
  } catch (error) {
    const now = await page
      .getByTestId(testId)
      .first()
      .textContent({ timeout: 1000 })
      .catch(() => '(not on the page)');
    throw new Error(`${testId} did not show ${String(expected)} within ${timeout} ms; it shows "${now}"`, {
      cause: error,
    });
  }
}

/** Opens "This tablet" and waits until the demo site and its 180 rounds are in IndexedDB. */
export async function waitForDemoImport(page: Page, origin: string): Promise<void> {
  await page.goto(`${origin}/device`);
  // 90 days of a morning and a night round (the demo history's stated model).
  await waitForTestIdText(page, 'device-facts', /Rounds on this tablet180/, IMPORT_MS);
}

/** Waits until the page is controlled by the service worker (the app then starts with the server stopped). */
export async function waitForServiceWorkerControl(page: Page): Promise<void> {
  await page.waitForFunction(() => navigator.serviceWorker.controller !== null, undefined, {
    timeout: STEP_MS,
    polling: 100,
  });
}

/** From /rounds: types the person's name the first time, starts the route and waits for its first card. */
/** Signs in on the Home screen as a demo person (the tablet keeps the session, so later rounds work offline). */
export async function signIn(page: Page, origin: string, user: keyof typeof DEMO_PEOPLE): Promise<void> {
  await page.goto(origin);
  const form = page.getByTestId('sign-in');
  const panel = page.getByTestId('sync-panel');
  await form.or(panel).first().waitFor({ state: 'visible', timeout: STEP_MS });
  if (await panel.isVisible()) return;
  await page.getByTestId('sign-in-user').fill(DEMO_PEOPLE[user].id);
  await page.getByTestId('sign-in-passcode').fill(DEMO_PASSCODE);
  await page.getByTestId('sign-in-submit').click();
  await panel.waitFor({ state: 'visible', timeout: STEP_MS });
}

/** Starts a round on a route as the signed-in demo person (signing in first if needed); returns the round id. */
export async function startRound(
  page: Page,
  origin: string,
  routeId: string,
  user: keyof typeof DEMO_PEOPLE = 'operator',
): Promise<string> {
  await signIn(page, origin, user);
  await page.goto(`${origin}/rounds`);
  const start = page.getByTestId(`start-${routeId}`);
  await start.waitFor({ state: 'visible', timeout: STEP_MS });
  await start.click();
  await page.waitForURL(/\/rounds\/[0-9a-f-]{36}$/, { timeout: STEP_MS });
  await page.getByTestId('progress').waitFor({ state: 'visible', timeout: STEP_MS });
  return page.url().split('/').pop() as string;
}

export const card = (page: Page, pointId: string): Locator => page.getByTestId(`point-${pointId}`);

/** The answer button of a yes/no or choice point (its accessible name starts with the answer). */
export const answerButton = (page: Page, pointId: string, answer: string): Locator =>
  card(page, pointId)
    .locator('button.answer')
    .filter({ hasText: new RegExp(`^${escapeRegExp(answer)}(?![a-z])`) });

/** The field a point is typed into (numeric input or text area). */
export const fieldOf = (page: Page, entry: PlannedEntry): Locator =>
  entry.kind === 'number'
    ? page.getByTestId(`input-${entry.point.id}`)
    : card(page, entry.point.id).locator('textarea').first();

/** Types or taps one entry without waiting for its save. */
export async function typeEntry(page: Page, entry: PlannedEntry): Promise<void> {
  if (entry.kind === 'number') {
    await page.getByTestId(`input-${entry.point.id}`).fill(entry.text);
  } else if (entry.kind === 'answer') {
    await answerButton(page, entry.point.id, entry.text).click();
  } else {
    const area = fieldOf(page, entry);
    await area.fill(entry.text);
    // A text point is saved on change, which the browser fires when the field loses focus.
    await area.blur();
  }
}

/** Enters one point and waits until its status says "Saved" (shown only after the IndexedDB commit). */
export async function enterPoint(page: Page, entry: PlannedEntry): Promise<void> {
  await typeEntry(page, entry);
  await waitForTestIdText(page, `save-${entry.point.id}`, 'Saved');
}

/** Opens a point's note, types it and leaves the field (a note is saved on change) and waits for "Saved". */
export async function addNote(page: Page, pointId: string, note: string): Promise<void> {
  const area = page.getByTestId(`note-${pointId}`);
  if (!(await area.isVisible())) {
    await card(page, pointId)
      .getByRole('button', { name: /^Add a note/ })
      .click();
  }
  await area.fill(note);
  await area.blur();
  await page.waitForFunction(
    ({ id, text }) =>
      (document.querySelector(`[data-testid="note-${id}"]`) as HTMLTextAreaElement | null)?.value === text &&
      document.querySelector(`[data-testid="save-${id}"]`)?.textContent === 'Saved',
    { id: pointId, text: note },
    { timeout: STEP_MS, polling: 50 },
  );
}

/** Opens the lockout gate of a point, confirms every caution in turn and starts the step. */
export async function passLockoutGate(page: Page, pointId: string): Promise<void> {
  await page.getByTestId(`gate-open-${pointId}`).click();
  await page.getByTestId('lockout-gate').waitFor({ state: 'visible', timeout: STEP_MS });
  for (const caution of OPEN_MACHINE_CAUTIONS.cautions) await page.getByTestId(`caution-${caution.id}`).click();
  await page.getByTestId('gate-start').click();
  await page.getByTestId('lockout-gate').waitFor({ state: 'detached', timeout: STEP_MS });
}

/** What the round screen shows for each point: the text in its field (or the chosen answer), its save status, its note. */
export async function shownState(
  page: Page,
  entries: PlannedEntry[],
): Promise<Record<string, { text: string; status: string; note: string }>> {
  return page.evaluate(
    (points) => {
      const result: Record<string, { text: string; status: string; note: string }> = {};
      for (const { id, kind } of points) {
        const box = document.querySelector(`[data-testid="point-${id}"]`);
        let text = '';
        if (kind === 'answer') {
          // The answer is the button's own text; a visually hidden part after it names the point.
          text = box?.querySelector('button.answer[aria-pressed="true"]')?.firstChild?.textContent?.trim() ?? '';
        } else {
          text =
            box?.querySelector<HTMLInputElement | HTMLTextAreaElement>('.point__entry input, .point__entry textarea')
              ?.value ?? '';
        }
        const status = document.querySelector(`[data-testid="save-${id}"]`)?.textContent ?? '';
        const note = document.querySelector<HTMLTextAreaElement>(`[data-testid="note-${id}"]`)?.value ?? '';
        result[id] = { text, status, note };
      }
      return result;
    },
    entries.map((entry) => ({ id: entry.point.id, kind: entry.kind })),
  );
}

/** The tablet's outbox as stored in IndexedDB: what waits to be sent to the server. */
export async function readOutbox(page: Page): Promise<Array<{ id: string; type: string; state: string }>> {
  return page.evaluate(
    (name) =>
      new Promise<Array<{ id: string; type: string; state: string }>>((resolve, reject) => {
        const request = indexedDB.open(name);
        request.onerror = () => reject(request.error);
        request.onsuccess = () => {
          const db = request.result;
          const all = db.transaction('outbox', 'readonly').objectStore('outbox').getAll();
          all.onerror = () => reject(all.error);
          all.onsuccess = () => {
            db.close();
            resolve(
              (all.result as Array<{ id: string; type: string; state: string }>).map(({ id, type, state }) => ({
                id,
                type,
                state,
              })),
            );
          };
        };
      }),
    DB_NAME,
  );
}

/** Kills the Chromium process of a profile with SIGKILL (no orderly shutdown) and waits until it is gone. */
export async function killBrowser(browser: FreshBrowser): Promise<void> {
  const pids = browserPids(browser.profileDir);
  if (pids.length !== 1) throw new Error(`expected one browser process for the profile, found ${pids.length}`);
  const closed = new Promise<void>((done) => browser.context.once('close', () => done()));
  process.kill(pids[0] as number, 'SIGKILL');
  let timer: NodeJS.Timeout | undefined;
  try {
    await Promise.race([
      closed,
      new Promise((_, reject) => {
        timer = setTimeout(() => reject(new Error('the killed browser never closed')), STEP_MS);
      }),
    ]);
  } finally {
    clearTimeout(timer);
  }
  await browser.close();
}

/** Launches Chromium on an existing profile folder (kept on close: the caller removes it). */
export function relaunch(profileDir: string, viewport = { width: 1280, height: 800 }): Promise<FreshBrowser> {
  return launchFreshChromium({ profileDir, viewport });
}

export async function firstPage(browser: FreshBrowser): Promise<Page> {
  return browser.context.pages()[0] ?? (await browser.context.newPage());
}

/** A short night round: a hot main bearing (alarm, with the note it then needs), the rest recorded as not read. */
export async function recordNightRound(page: Page, origin: string, bearingC: string, note: string): Promise<string> {
  const roundId = await startRound(page, origin, 'night');
  await page.getByTestId('input-K-101-LO-T').fill('55');
  await waitForTestIdText(page, 'save-K-101-LO-T', 'Saved');
  await page.getByTestId('input-K-101-MB2-T').fill(bearingC);
  await waitForTestIdText(page, 'save-K-101-MB2-T', 'Saved');
  await addNote(page, 'K-101-MB2-T', note);
  await page.getByTestId('finish-open').click();
  await page.getByTestId('finish-confirm').click();
  await page.getByRole('heading', { name: /\(finished\)$/ }).waitFor({ timeout: STEP_MS });
  return roundId;
}

/** Syncs from the Home screen until nothing waits to be sent and a sync has completed. */
export async function syncUntilSent(page: Page, origin: string): Promise<void> {
  await page.goto(origin);
  await page.getByTestId('sync-now').click();
  await waitForTestIdText(page, 'sync-pending', '0');
  await page.waitForFunction(() => document.querySelector('[data-testid="sync-last"]')?.textContent !== 'never', null, {
    timeout: STEP_MS,
  });
}
