import { describe, expect, it } from 'vitest';
import { valveLife } from '../../src/calc';
import { expectCalcError } from './helpers';

/** Example M1 of the engineering reference (§13): invented history, statistics computed from the definitions. */
const M1 = {
  installedAt: '2023-01-10T00:00:00Z',
  installedRunHours: 0,
  changes: [
    { at: '2023-10-05T00:00:00Z', runHours: 6200, planned: false },
    { at: '2024-08-20T00:00:00Z', runHours: 13_900, planned: false },
    { at: '2025-01-15T00:00:00Z', runHours: 17_400, planned: true },
  ],
  nowRunHours: 24_000,
  now: '2025-11-01T00:00:00Z',
};

describe('valveLife', () => {
  it('M1: intervals 6200, 7700, 3500 h, MTBC 5800 h, censored 8000 h', () => {
    const result = valveLife(M1);
    expect(result.intervalsH).toEqual([6200, 7700, 3500]);
    expect(result.meanTimeBetweenChangesH).toBe(5800);
    expect(result.currentRunningH).toBe(6600);
    expect(result.censoredMeanH).toBe(8000);
    expect(result.failures).toBe(2);
    expect(result.indicative).toBe(false);
    expect(result.basis).toBe('run-hours');
  });

  it('should sort changes by date and mark fewer than three changes as indicative', () => {
    const result = valveLife({ ...M1, changes: [M1.changes[1], M1.changes[0]] as typeof M1.changes });
    expect(result.intervalsH).toEqual([6200, 7700]);
    expect(result.indicative).toBe(true);
  });

  // source: calendar hours between ISO dates (exact: 24 h per UTC day)
  it('should fall back to calendar time when a meter reading is missing', () => {
    const result = valveLife({
      installedAt: '2026-01-01T00:00:00Z',
      changes: [
        { at: '2026-01-11T00:00:00Z', planned: false },
        { at: '2026-01-31T00:00:00Z', planned: false },
      ],
      now: '2026-02-10T00:00:00Z',
    });
    expect(result.basis).toBe('calendar');
    expect(result.intervalsH).toEqual([240, 480]);
    expect(result.meanTimeBetweenChangesH).toBe(360);
    expect(result.currentRunningH).toBe(240);
    expect(result.censoredMeanH).toBe(480);
  });

  it('should say nothing about MTBC with no changes recorded', () => {
    const result = valveLife({ changes: [], installedAt: M1.installedAt, now: M1.now });
    expect(result).toMatchObject({
      intervalsH: [],
      meanTimeBetweenChangesH: null,
      censoredMeanH: null,
      failures: 0,
      indicative: true,
    });
  });

  it('should start the clock at the first change when the installation is unknown', () => {
    const { installedAt: _a, installedRunHours: _h, ...unknownStart } = M1;
    const result = valveLife(unknownStart);
    expect(result.intervalsH).toEqual([7700, 3500]);
    expect(result.censoredMeanH).toBe((7700 + 3500 + 6600) / 2);
  });

  it('should refuse hours that fall as dates rise, changes before installation and a clock behind the last change', () => {
    const falling = [M1.changes[0], { ...M1.changes[1], runHours: 6000 }, M1.changes[2]] as typeof M1.changes;
    expectCalcError(() => valveLife({ ...M1, changes: falling }), 'E_TIME_ORDER', 'changes[1].runHours');
    expectCalcError(() => valveLife({ ...M1, installedAt: '2024-01-01T00:00:00Z' }), 'E_TIME_ORDER', 'changes[0].at');
    expectCalcError(() => valveLife({ ...M1, now: '2024-12-31T00:00:00Z' }), 'E_TIME_ORDER', 'now');
    expectCalcError(() => valveLife({ ...M1, nowRunHours: 17_000 }), 'E_TIME_ORDER', 'nowRunHours');
    expectCalcError(() => valveLife({ ...M1, now: '1 Nov 2025' }), 'E_TIME_ORDER', 'now');
  });
});
