/** axe-core in the browser tests: the serious and critical violations on the page as it is now. */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Page } from 'playwright-core';
import { ROOT } from './app-server';

const axeSource = readFileSync(join(ROOT, 'node_modules', 'axe-core', 'axe.min.js'), 'utf8');

/**
 * Runs axe-core over the whole document; returns how many rules passed (so a caller can tell that axe really looked)
 * and one line per serious or critical violation.
 */
export async function axeReport(page: Page): Promise<{ passedRules: number; serious: string[] }> {
  // The page's CSP forbids inline scripts, so axe is evaluated through the DevTools protocol, not a script tag.
  if (!(await page.evaluate(() => 'axe' in window))) await page.evaluate(axeSource);
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: typeof import('axe-core') }).axe;
    const run = await axe.run(document, { resultTypes: ['violations'] });
    const serious = run.violations
      .filter((violation) => violation.impact === 'serious' || violation.impact === 'critical')
      .map(
        (violation) =>
          `${violation.impact} ${violation.id}: ${violation.help} at ${violation.nodes
            .slice(0, 3)
            .map((node) => node.target.join(' '))
            .join(', ')}`,
      );
    return { passedRules: run.passes.length, serious };
  });
}
