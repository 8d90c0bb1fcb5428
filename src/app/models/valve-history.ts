/**
 * Each valve position's history from the valve changes on this tablet: every change with its interval, the mean time
 * between changes (completed and censored), failures by as-found word, and for a machine the positions that eat
 * valves ranked first. Pure; the statistics come from calc's valveLife.
 */
import { CalcError, type ValveLifeResult, valveLife } from '../../calc';
import type { Machine, SiteConfig, ValveChange } from '../../schema';

export interface PositionHistory {
  positionId: string;
  cylinderId: string;
  end: 'head' | 'crank';
  service: 'suction' | 'discharge';
  changes: Array<ValveChange & { intervalH: number | null }>;
  life: ValveLifeResult | null;
  /** Why the statistics could not be computed (e.g. meter readings out of order). */
  problem: string | null;
  failuresByWord: Array<{ word: string; count: number }>;
}

export function positionHistories(machine: Machine, changes: readonly ValveChange[], now: string): PositionHistory[] {
  return machine.valvePositions.map((position) => {
    const own = changes
      .filter((change) => change.machineId === machine.id && change.valvePositionId === position.id)
      .sort((a, b) => Date.parse(a.at) - Date.parse(b.at));
    let life: ValveLifeResult | null = null;
    let problem: string | null = null;
    try {
      const withHours = own.every((change) => change.runHours !== undefined);
      life = valveLife({
        changes: own.map((change) => ({
          at: change.at,
          planned: change.reason === 'planned',
          ...(withHours ? { runHours: change.runHours } : {}),
        })),
        now,
      });
    } catch (error) {
      if (!(error instanceof CalcError)) throw error;
      problem = error.message;
    }
    // The first change only starts the clock when the installation is unknown, so intervals begin at the second.
    const intervals = life?.intervalsH ?? [];
    const offset = own.length - intervals.length;
    const words = new Map<string, number>();
    for (const change of own) {
      if (change.reason !== 'failure') continue;
      for (const word of change.asFound) words.set(word, (words.get(word) ?? 0) + 1);
    }
    return {
      positionId: position.id,
      cylinderId: position.cylinderId,
      end: position.end,
      service: position.service,
      changes: own.map((change, index) => ({
        ...change,
        intervalH: index >= offset ? (intervals[index - offset] ?? null) : null,
      })),
      life,
      problem,
      failuresByWord: [...words]
        .map(([word, count]) => ({ word, count }))
        .sort((a, b) => b.count - a.count || a.word.localeCompare(b.word)),
    };
  });
}

/** Positions with at least one change, worst first: most failures, then shortest mean time between changes. */
export function rankPositions(histories: readonly PositionHistory[]): PositionHistory[] {
  const mean = (h: PositionHistory) => h.life?.meanTimeBetweenChangesH ?? Number.POSITIVE_INFINITY;
  return histories
    .filter((h) => h.changes.length > 0)
    .sort(
      (a, b) =>
        (b.life?.failures ?? 0) - (a.life?.failures ?? 0) ||
        mean(a) - mean(b) ||
        a.positionId.localeCompare(b.positionId),
    );
}

/** Every valve position of the site that has had a change, worst first: most failures, then shortest life. */
export function siteValveLife(
  config: SiteConfig,
  changes: readonly ValveChange[],
  now: string,
): Array<PositionHistory & { machineId: string; machineName: string }> {
  const all = config.machines.flatMap((machine) =>
    rankPositions(positionHistories(machine, changes, now)).map((h) => ({
      ...h,
      machineId: machine.id,
      machineName: machine.name,
    })),
  );
  const mean = (h: PositionHistory) => h.life?.meanTimeBetweenChangesH ?? Number.POSITIVE_INFINITY;
  return all.sort(
    (a, b) =>
      (b.life?.failures ?? 0) - (a.life?.failures ?? 0) ||
      mean(a) - mean(b) ||
      a.machineId.localeCompare(b.machineId) ||
      a.positionId.localeCompare(b.positionId),
  );
}
