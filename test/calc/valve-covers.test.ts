import { describe, expect, it } from 'vitest';
import { assessValveCovers, VALVE_COVER_THRESHOLDS, type ValveCoverReading } from '../../src/calc';
import { C_TO_K, expectCalcError } from './helpers';

const cover = (
  id: string,
  end: 'head' | 'crank',
  service: 'suction' | 'discharge',
  celsius: number,
): ValveCoverReading => ({
  id,
  end,
  service,
  temperatureK: C_TO_K(celsius),
});

/** Worked example of the engineering reference §4.4 (invented readings; judged with the common-practice thresholds). */
const CYLINDER_1 = [
  cover('HE-S1', 'head', 'suction', 41),
  cover('HE-S2', 'head', 'suction', 42),
  cover('CE-S3', 'crank', 'suction', 40),
  cover('CE-S4', 'crank', 'suction', 58),
  cover('HE-D1', 'head', 'discharge', 112),
  cover('HE-D2', 'head', 'discharge', 113),
  cover('CE-D3', 'crank', 'discharge', 123),
  cover('CE-D4', 'crank', 'discharge', 111),
];

describe('assessValveCovers: worked example §4.4', () => {
  const result = assessValveCovers({ covers: CYLINDER_1, suctionGasK: C_TO_K(32), dischargeGasK: C_TO_K(118) });
  const find = (id: string) => result.covers.find((c) => c.id === id);

  it('should alarm on CE-S4 (+17 K over peers, +26 K over suction gas) and suspect its suction valve', () => {
    const s4 = find('CE-S4');
    expect(s4?.peerDeltaK).toBeCloseTo(17, 9);
    expect(s4?.gasDeltaK).toBeCloseTo(26, 9);
    expect(s4?.status).toBe('alarm');
    expect(s4?.suspect).toBe('suction-valve');
    expect(s4?.message).toMatch(/leaking crank-end suction valve/);
  });

  it('should watch CE-D3 (+11 K over peers, +5 K above discharge gas)', () => {
    const d3 = find('CE-D3');
    expect(d3?.peerDeltaK).toBeCloseTo(11, 9);
    expect(d3?.gasDeltaK).toBeCloseTo(5, 9);
    expect(d3?.status).toBe('watch');
    expect(d3?.suspect).toBe('discharge-valve');
  });

  it('should find the others normal (−2 … +1 K) and name the worst cover overall', () => {
    for (const id of ['HE-S1', 'HE-S2', 'CE-S3', 'HE-D1', 'HE-D2', 'CE-D4']) {
      expect(find(id)?.status).toBe('ok');
      expect(find(id)?.suspect).toBeNull();
      expect(Math.abs(find(id)?.peerDeltaK ?? 99)).toBeLessThanOrEqual(2 + 1e-9);
    }
    expect(result.status).toBe('alarm');
    expect(result.message).toMatch(/^CE-S4/);
    expect(result.message).toMatch(/CE-D3/);
  });
});

describe('assessValveCovers: threshold edges (common practice defaults)', () => {
  const peers = [cover('A', 'head', 'suction', 40), cover('B', 'crank', 'suction', 40)];
  const judge = (celsius: number) =>
    assessValveCovers({ covers: [...peers, cover('X', 'head', 'suction', celsius)] }).covers[2]?.status;

  it('should watch from 8 K and alarm from 14 K above the peer median', () => {
    expect(VALVE_COVER_THRESHOLDS.peerWatchK).toBe(8);
    expect(judge(47.99)).toBe('ok');
    expect(judge(48)).toBe('watch');
    expect(judge(53.99)).toBe('watch');
    expect(judge(54)).toBe('alarm');
  });

  it('should watch any discharge cover above discharge gas and alarm at 10 K above', () => {
    const discharge = (celsius: number) =>
      assessValveCovers({ covers: [cover('D', 'head', 'discharge', celsius)], dischargeGasK: C_TO_K(100) }).covers[0];
    expect(discharge(100)?.status).toBe('ok');
    expect(discharge(100.01)?.status).toBe('watch');
    expect(discharge(109.99)?.status).toBe('watch');
    expect(discharge(110)?.status).toBe('alarm');
    expect(discharge(100)?.peerDeltaK).toBeNull();
  });

  it('should watch a suction cover 20 K and alarm 35 K above suction gas', () => {
    const suction = (celsius: number) =>
      assessValveCovers({ covers: [cover('S', 'head', 'suction', celsius)], suctionGasK: C_TO_K(30) }).covers[0]
        ?.status;
    expect(suction(49.99)).toBe('ok');
    expect(suction(50)).toBe('watch');
    expect(suction(64.99)).toBe('watch');
    expect(suction(65)).toBe('alarm');
  });

  it('should let a site override the thresholds', () => {
    const result = assessValveCovers({
      covers: [...peers, cover('X', 'head', 'suction', 50)],
      thresholds: { peerWatchK: 12 },
    });
    expect(result.covers[2]?.status).toBe('ok');
  });

  it('should say so when no single cover stands out', () => {
    const even = assessValveCovers({ covers: [...peers, cover('C', 'head', 'suction', 41)] });
    expect(even.status).toBe('ok');
    expect(even.message).toMatch(/no single hot cover/);
  });

  it('should refuse missing readings and impossible temperatures', () => {
    expectCalcError(() => assessValveCovers({ covers: [] }), 'E_GEOMETRY', 'covers');
    expectCalcError(
      () => assessValveCovers({ covers: [cover('A', 'head', 'suction', 400)] }),
      'E_TEMP_RANGE',
      'covers[0].temperatureK',
    );
    expectCalcError(
      () => assessValveCovers({ covers: [{ ...cover('A', 'head', 'suction', 40), service: 'inlet' as 'suction' }] }),
      'E_GEOMETRY',
      'covers[0].service',
    );
  });
});
