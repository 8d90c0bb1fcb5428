import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { timeToLimit } from '../../src/calc';
import { expectCalcError } from './helpers';

const day = (n: number) => new Date(Date.UTC(2026, 0, 1) + n * 86_400_000).toISOString();

describe('timeToLimit', () => {
  // source: ordinary least squares recovers an exact straight line exactly (NIST/SEMATECH e-Handbook §4.1.4.1)
  it('should find the exact crossing of an exact straight line', () => {
    const points = [0, 1, 2, 3, 4].map((n) => ({ at: day(n), value: 70 + 1.5 * n }));
    const result = timeToLimit({ points, limit: 85, direction: 'rising' });
    expect(result.slopePerDay).toBeCloseTo(1.5, 12);
    expect(result.rSquared).toBeCloseTo(1, 12);
    expect(result.enoughData).toBe(true);
    expect(result.reachesAt).toBe(day(10));
  });

  it('should fit only the most recent points of the window', () => {
    const old = [0, 1, 2].map((n) => ({ at: day(n), value: 200 - 10 * n }));
    const recent = [3, 4, 5, 6].map((n) => ({ at: day(n), value: 50 + 2 * n }));
    const result = timeToLimit({ points: [...recent, ...old], limit: 70, direction: 'rising', window: 4 });
    expect(result.slopePerDay).toBeCloseTo(2, 12);
    expect(result.reachesAt).toBe(day(10));
  });

  it('should give null when the trend moves away from the limit', () => {
    const falling = [0, 1, 2, 3].map((n) => ({ at: day(n), value: 80 - n }));
    expect(timeToLimit({ points: falling, limit: 90, direction: 'rising' }).reachesAt).toBeNull();
    const rising = [0, 1, 2, 3].map((n) => ({ at: day(n), value: 1 + 0.1 * n }));
    expect(timeToLimit({ points: rising, limit: 0.5, direction: 'falling' }).reachesAt).toBeNull();
    expect(timeToLimit({ points: falling, limit: 70, direction: 'falling' }).reachesAt).toBe(day(10));
  });

  it('should give null with a poor fit or too few points', () => {
    const scattered = [60, 75, 58, 77, 61, 76].map((value, n) => ({ at: day(n), value }));
    const poor = timeToLimit({ points: scattered, limit: 90, direction: 'rising' });
    expect(poor.rSquared).toBeLessThan(0.5);
    expect(poor.reachesAt).toBeNull();
    const two = timeToLimit({ points: [0, 1].map((n) => ({ at: day(n), value: n })), limit: 5, direction: 'rising' });
    expect(two).toMatchObject({ enoughData: false, reachesAt: null });
    expect(timeToLimit({ points: [], limit: 5, direction: 'rising' })).toEqual({
      slopePerDay: 0,
      reachesAt: null,
      rSquared: 0,
      enoughData: false,
    });
  });

  it('should stay within a bounded error under small noise (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -0.2, max: 0.2, noNaN: true }), { minLength: 10, maxLength: 10 }),
        (noise) => {
          // 1 K/day toward a limit 10 K above the start: the true crossing is day 10.
          const points = noise.map((e, n) => ({ at: day(n), value: 60 + n + e }));
          const result = timeToLimit({ points, limit: 70, direction: 'rising' });
          const errorDays = Math.abs((Date.parse(result.reachesAt ?? '') - Date.parse(day(10))) / 86_400_000);
          // Each noise value moves the fit by at most 0.2 K; the crossing error stays well under a day.
          return result.reachesAt !== null && errorDays < 1;
        },
      ),
    );
  });

  it('should refuse times it cannot read and a bad direction', () => {
    expectCalcError(
      () => timeToLimit({ points: [{ at: 'last Tuesday', value: 1 }], limit: 2, direction: 'rising' }),
      'E_TIME_ORDER',
      'points[0].at',
    );
    expectCalcError(
      () => timeToLimit({ points: [], limit: 2, direction: 'up' as 'rising' }),
      'E_TIME_ORDER',
      'direction',
    );
    expectCalcError(() => timeToLimit({ points: [], limit: Number.NaN, direction: 'rising' }), 'E_NOT_FINITE', 'limit');
  });
});
