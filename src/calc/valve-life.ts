/**
 * Valve life per valve position: intervals between changes, the mean time between changes (MTBC) of completed
 * intervals, and a censored estimate that also counts the valve now in service:
 * (Σ completed intervals + current running time) / number of completed intervals.
 * Planned changes count for MTBC but not as failures; fewer than 3 changes is "indicative" (common practice).
 * Run-hour meter readings are used when every record has one; otherwise calendar time.
 */
import { CalcError, requireRange, show } from './errors';
import { MS_PER_HOUR, parseTime } from './time';

export const VALVE_LIFE_MIN_CHANGES = 3;

export interface ValveChange {
  at: string;
  runHours?: number;
  /** True for a planned change; false for an as-found failure. */
  planned: boolean;
}

export interface ValveLifeInput {
  changes: ValveChange[];
  installedAt?: string;
  installedRunHours?: number;
  nowRunHours?: number;
  now: string;
}

export interface ValveLifeResult {
  intervalsH: number[];
  meanTimeBetweenChangesH: number | null;
  censoredMeanH: number | null;
  /** As-found failures (changes that were not planned). */
  failures: number;
  indicative: boolean;
  /** Which clock the hours come from. */
  basis: 'run-hours' | 'calendar';
  /** Hours the valve now in service has run. */
  currentRunningH: number | null;
}

export function valveLife(i: ValveLifeInput): ValveLifeResult {
  if (!Array.isArray(i.changes)) {
    throw new CalcError('E_TIME_ORDER', 'changes', i.changes, 'changes must be a list (it may be empty).');
  }
  const now = parseTime('now', i.now);
  const installedAt = i.installedAt === undefined ? undefined : parseTime('installedAt', i.installedAt);
  const changes = i.changes
    .map((change, index) => ({ ...change, ms: parseTime(`changes[${index}].at`, change.at), index }))
    .sort((a, b) => a.ms - b.ms);
  const useRunHours =
    i.nowRunHours !== undefined &&
    changes.every((change) => change.runHours !== undefined) &&
    (changes.length > 0 || i.installedRunHours !== undefined);
  const hours = (field: string, value: number) =>
    requireRange('E_TIME_ORDER', field, value, { min: 0, max: 1e7, unit: 'h' });

  // Times on the chosen clock, in hours.
  const clock = (change: (typeof changes)[number]) =>
    useRunHours ? hours(`changes[${change.index}].runHours`, change.runHours as number) : change.ms / MS_PER_HOUR;
  let start: number | undefined;
  if (useRunHours && i.installedRunHours !== undefined) start = hours('installedRunHours', i.installedRunHours);
  else if (!useRunHours && installedAt !== undefined) start = installedAt / MS_PER_HOUR;
  const nowH = useRunHours ? hours('nowRunHours', i.nowRunHours as number) : now / MS_PER_HOUR;

  if (installedAt !== undefined && changes.length > 0 && (changes[0] as (typeof changes)[number]).ms < installedAt) {
    const first = changes[0] as (typeof changes)[number];
    throw new CalcError(
      'E_TIME_ORDER',
      `changes[${first.index}].at`,
      first.at,
      `A change on ${first.at} is before the installation on ${i.installedAt}; check both dates.`,
    );
  }
  const intervalsH: number[] = [];
  let previous = start;
  let previousLabel = 'the installation';
  for (const change of changes) {
    const at = clock(change);
    if (previous !== undefined) {
      if (at <= previous) {
        throw new CalcError(
          'E_TIME_ORDER',
          `changes[${change.index}]${useRunHours ? '.runHours' : '.at'}`,
          useRunHours ? change.runHours : change.at,
          `The change on ${change.at} (${show(at)} h) is not after ${previousLabel} (${show(previous)} h); hour readings must increase with date.`,
        );
      }
      intervalsH.push(at - previous);
    }
    previous = at;
    previousLabel = `the change on ${change.at}`;
  }
  if (changes.length > 0 && now < (changes[changes.length - 1] as (typeof changes)[number]).ms) {
    throw new CalcError(
      'E_TIME_ORDER',
      'now',
      i.now,
      `now (${i.now}) is before the last recorded change; check the tablet clock.`,
    );
  }
  let currentRunningH: number | null = null;
  if (previous !== undefined) {
    if (nowH < previous) {
      throw new CalcError(
        'E_TIME_ORDER',
        useRunHours ? 'nowRunHours' : 'now',
        useRunHours ? i.nowRunHours : i.now,
        `The meter now (${show(nowH)} h) is below its reading at ${previousLabel} (${show(previous)} h).`,
      );
    }
    currentRunningH = nowH - previous;
  }
  const completed = intervalsH.reduce((sum, interval) => sum + interval, 0);
  return {
    intervalsH,
    meanTimeBetweenChangesH: intervalsH.length ? completed / intervalsH.length : null,
    censoredMeanH:
      intervalsH.length && currentRunningH !== null ? (completed + currentRunningH) / intervalsH.length : null,
    failures: changes.filter((change) => !change.planned).length,
    indicative: changes.length < VALVE_LIFE_MIN_CHANGES,
    basis: useRunHours ? 'run-hours' : 'calendar',
    currentRunningH,
  };
}
