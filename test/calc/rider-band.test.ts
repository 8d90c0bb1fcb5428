import { describe, expect, it } from 'vitest';
import { riderBandWear, toSI } from '../../src/calc';
import { expectCalcError, expectClose } from './helpers';

describe('riderBandWear: examples §9 (similar triangles; thresholds common practice)', () => {
  it('W1: 0.42 mm drop, 1.35 m / 0.90 m → 0.630 mm wear, 52.5 % of 1.2 mm → watch', () => {
    const result = riderBandWear({
      rodDropChangeM: 0.42e-3,
      riderToPinM: 1.35,
      probeToPinM: 0.9,
      allowableWearM: 1.2e-3,
    });
    expectClose(result.wearM * 1000, 0.63, 1e-9);
    expectClose(result.usedFraction ?? 0, 0.525, 1e-9);
    expect(result.status).toBe('watch');
  });

  it('W2: 0.012 in drop, 52 in / 36 in → 0.01733 in', () => {
    const result = riderBandWear({
      rodDropChangeM: toSI(0.012, 'in'),
      riderToPinM: toSI(52, 'in'),
      probeToPinM: toSI(36, 'in'),
    });
    expectClose(result.wearM / toSI(1, 'in'), 0.01733);
    expect(result.usedFraction).toBeNull();
    expect(result.message).toMatch(/allowable wear/);
  });

  it('should watch at 50 % and alarm at 75 % of the allowable wear', () => {
    const at = (fraction: number) =>
      riderBandWear({ rodDropChangeM: fraction * 1e-3, riderToPinM: 1, probeToPinM: 1, allowableWearM: 1e-3 }).status;
    expect([at(0.4999), at(0.5), at(0.7499), at(0.75), at(1.1)]).toEqual(['ok', 'watch', 'watch', 'alarm', 'alarm']);
    expect(
      riderBandWear({ rodDropChangeM: 1.1e-3, riderToPinM: 1, probeToPinM: 1, allowableWearM: 1e-3 }).message,
    ).toMatch(/now/);
  });

  it('should ask to check the probe when the rod reads higher than with new bands', () => {
    const result = riderBandWear({
      rodDropChangeM: -0.05e-3,
      riderToPinM: 1.35,
      probeToPinM: 0.9,
      allowableWearM: 1e-3,
    });
    expect(result.warnings).toEqual(['W_CHECK_MEASUREMENT']);
    expect(result.message).toMatch(/probe gap/);
  });

  it('should refuse a probe beyond the rider band and impossible distances', () => {
    expectCalcError(
      () => riderBandWear({ rodDropChangeM: 1e-4, riderToPinM: 0.9, probeToPinM: 1.35 }),
      'E_GEOMETRY',
      'probeToPinM',
    );
    expectCalcError(
      () => riderBandWear({ rodDropChangeM: 1e-4, riderToPinM: 1, probeToPinM: 0 }),
      'E_GEOMETRY',
      'probeToPinM',
    );
    expectCalcError(
      () => riderBandWear({ rodDropChangeM: 1e-4, riderToPinM: 1, probeToPinM: 1, allowableWearM: 0 }),
      'E_GEOMETRY',
      'allowableWearM',
    );
  });
});
