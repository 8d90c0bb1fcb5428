/**
 * The checks engine: a site configuration plus a round's readings become findings, by calling the calculation
 * room. Pure: no storage, no screens. The tablet runs it as readings are entered; the server runs the same code
 * again on what it receives and compares.
 */
import type { Finding, Reading, SiteConfig } from '../schema';
import { buildContext, type History } from './context';
import { bearingFindings, valveCoverFindings } from './equipment';
import { limitFinding } from './limits';
import { stageFindings } from './stage';

export { cylinderStageInput } from './stage';

import { trendFindings } from './trend';

export { barometerOf, type History } from './context';
export { judgeLimits } from './limits';
export { TREND_HORIZON_DAYS } from './trend';

/**
 * Every check the readings allow: each point against its limits (or expected answer); per stage the discharge
 * temperature, VE, capacity and power; per cylinder the valve covers; per bearing its temperature checks; per
 * throw the rod load and reversal; per point with history the time to its limit. A reading that a check cannot
 * use gives an `input` finding that says why, never an exception.
 */
export function evaluateRound(config: SiteConfig, readings: Reading[], history?: History): Finding[] {
  if (readings.length === 0) return [];
  const ctx = buildContext(config, readings, history);
  const findings: Finding[] = [];
  for (const [pointId, reading] of ctx.readings) {
    const point = ctx.points.get(pointId);
    if (!point) continue;
    const finding = limitFinding(ctx, point, reading);
    if (finding) findings.push(finding);
  }
  findings.push(...stageFindings(ctx), ...valveCoverFindings(ctx), ...bearingFindings(ctx), ...trendFindings(ctx));
  return findings;
}
