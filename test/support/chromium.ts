import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { type BrowserContext, chromium } from 'playwright-core';

/** Debian's Chromium; browsers are never downloaded through npm (DEVELOPERS.md, "Browser tests"). */
export const CHROMIUM_PATH = process.env.CRANKHOUSE_CHROMIUM ?? '/usr/bin/chromium';

export const CHROMIUM_INSTALL_HINT = 'sudo apt-get update && sudo apt-get install -y chromium';

/** Flags that keep Chromium quiet on a machine with no outside network (see DEVELOPERS.md). */
export const CHROMIUM_ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export function assertChromiumInstalled(path: string = CHROMIUM_PATH): void {
  if (!existsSync(path)) {
    throw new Error(
      `Chromium was not found at ${path}. The browser tests need Debian's Chromium: ` +
        `install it with "${CHROMIUM_INSTALL_HINT}" (or point CRANKHOUSE_CHROMIUM at another Chromium binary).`,
    );
  }
}

export interface FreshBrowser {
  context: BrowserContext;
  profileDir: string;
  close(): Promise<void>;
}

/** A persistent context on a brand-new profile folder, removed again on close. */
export async function launchFreshChromium(
  options: { viewport?: { width: number; height: number }; profileDir?: string } = {},
): Promise<FreshBrowser> {
  assertChromiumInstalled();
  const profileDir = options.profileDir ?? mkdtempSync(join(tmpdir(), 'crankhouse-profile-'));
  const context = await chromium.launchPersistentContext(profileDir, {
    executablePath: CHROMIUM_PATH,
    headless: true,
    viewport: options.viewport ?? { width: 1024, height: 768 },
    args: CHROMIUM_ARGS,
  });
  return {
    context,
    profileDir,
    async close() {
      await context.close().catch(() => {});
      if (!options.profileDir) rmSync(profileDir, { recursive: true, force: true });
    },
  };
}
