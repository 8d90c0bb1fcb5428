import { describe, expect, it } from 'vitest';
import { stagePerformance } from '../../src/calc';
import { evaluateRound, judgeLimits } from '../../src/checks';
import { Finding } from '../../src/schema';
import { config, ROUND_ID, reading } from './fixture';

const find = (findings: Finding[], rule: Finding['rule'], extra: Partial<Finding['subject']> = {}) =>
  findings.find(
    (f) => f.rule === rule && Object.entries(extra).every(([k, v]) => f.subject[k as keyof Finding['subject']] === v),
  );

describe('evaluateRound: limits and answers', () => {
  it('should judge each band at its edge: at a limit is in the band (common practice for rounds)', () => {
    const limits = { lowTrip: 1, lowAlarm: 2, lowWatch: 3, highWatch: 7, highAlarm: 8, highTrip: 9 };
    const cases: Array<[number, string]> = [
      [0.5, 'trip'],
      [1, 'trip'],
      [1.5, 'alarm'],
      [2, 'alarm'],
      [3, 'watch'],
      [5, 'ok'],
      [6.99, 'ok'],
      [7, 'watch'],
      [8, 'alarm'],
      [9, 'trip'],
    ];
    for (const [value, status] of cases) expect(judgeLimits(value, limits).status, `${value}`).toBe(status);
  });

  it('should give a plain message in the unit the person used', () => {
    const findings = evaluateRound(config, [reading('PD', '81', 'bara')]);
    const limit = find(findings, 'limits', { pointId: 'PD' });
    expect(limit?.severity).toBe('alarm');
    expect(limit?.message).toBe('Discharge pressure: 81.0 bar a is at or above its high alarm 80.0 bar a.');
  });

  it('should raise the configured severity for an unexpected answer and ignore skipped points', () => {
    const findings = evaluateRound(config, [
      reading('LEAK', 'yes', null),
      { ...reading('LVL', '20', null), entered: null, valueSI: null, skipped: { reason: 'Sight glass dirty' } },
    ]);
    expect(find(findings, 'answer', { pointId: 'LEAK' })).toMatchObject({
      severity: 'alarm',
      message: 'Gas smell?: answered yes; no is normal.',
    });
    expect(find(findings, 'limits', { pointId: 'LVL' })).toBeUndefined();
  });
});

describe('evaluateRound: engineering checks reproduce the worked examples (engineering reference, computed from cited formulas)', () => {
  it('D2/D4: pipeline gas 30 → 75 bara at 30 °C, 104 °C observed: 94.09 °C predicted, 9.91 K over, watch', () => {
    const findings = evaluateRound(config, [
      reading('PS', '30', 'bara'),
      reading('PD', '75', 'bara'),
      reading('TS', '30', 'degC'),
      reading('TD', '104', 'degC'),
    ]);
    const discharge = find(findings, 'dischargeTemperature');
    expect(discharge?.severity).toBe('watch');
    expect((discharge?.numbers.predictedK as number) - 273.15).toBeCloseTo(94.09, 1);
    expect(discharge?.numbers.excessK).toBeCloseTo(9.912, 2);
    expect(discharge?.numbers.apparentExponent).toBeCloseTo(1.313, 3);
    expect(discharge?.message).toMatch(/^M1 stage 1: observed 104 °C against 94\.1 °C predicted\./);
  });

  it('R1: rod load of the V1 cylinder at 20 → 50 bara: 145.3 kN compression, 111.8 kN tension, reversal passes', () => {
    const findings = evaluateRound(config, [
      reading('PS', '20', 'bara'),
      reading('PD', '50', 'bara'),
      reading('TS', '30', 'degC'),
    ]);
    const rod = find(findings, 'rodLoad', { throw: 1 });
    expect(rod?.severity).toBe('ok');
    expect((rod?.numbers.combinedCompressionN as number) / 1000).toBeCloseTo(145.3, 0);
    expect((rod?.numbers.combinedTensionN as number) / 1000).toBeCloseTo(111.8, 0);
    expect(rod?.numbers.reversalFraction).toBeCloseTo(0.77, 2);
    expect(rod?.inputs.exponent).toBe(1.28);
    expect(rod?.inputs.distancePiecePressurePa).toBe(101_325);
  });

  it('§4.4: valve covers name CE-S4 as the suspect (alarm) and CE-D3 as the next to check', () => {
    const temps: Record<string, string> = {
      'HE-S1': '41',
      'HE-S2': '42',
      'CE-S3': '40',
      'CE-S4': '58',
      'HE-D1': '112',
      'HE-D2': '113',
      'CE-D3': '123',
      'CE-D4': '111',
    };
    const findings = evaluateRound(config, [
      reading('TS', '32', 'degC'),
      reading('TD', '118', 'degC'),
      ...Object.entries(temps).map(([id, t]) => reading(`V-${id}`, t, 'degC')),
    ]);
    const covers = find(findings, 'valveCovers');
    expect(covers?.severity).toBe('alarm');
    expect(covers?.subject.valvePositionId).toBe('CE-S4');
    expect(covers?.numbers['CE-S4.peerDeltaK']).toBeCloseTo(17, 6);
    expect(covers?.numbers['CE-D3.gasDeltaK']).toBeCloseTo(5, 6);
    expect(covers?.message).toMatch(/leaking crank-end suction valve suspected.*Also check CE-D3/);
  });

  it('B1: main bearing 84 °C over 63 °C oil, 77 °C eight hours earlier: watch on the round-to-round rise', () => {
    const previousRound = '99999999-2222-4333-8444-555555555555';
    const history = { readings: [reading('MB3-T', '77', 'degC', '2026-03-01T00:00:00Z', previousRound)] };
    const findings = evaluateRound(
      config,
      [reading('OIL', '63', 'degC'), reading('MB3-T', '84', 'degC'), reading('MB2-T', '83', 'degC')],
      history,
    );
    const bearing = find(findings, 'bearingTemperature', { bearingId: 'MB3' });
    expect(bearing?.severity).toBe('watch');
    expect(bearing?.numbers.riseOverOilK).toBeCloseTo(21, 9);
    expect(bearing?.numbers.riseSincePreviousK).toBeCloseTo(7, 9);
    expect(bearing?.numbers.rateKPerH).toBeCloseTo(0.875, 9);
    expect(bearing?.numbers.peerDeltaK).toBeCloseTo(1, 9);
  });

  it('should estimate capacity and power for the stage with the same numbers as the calculation room', () => {
    const findings = evaluateRound(config, [
      reading('PS', '20', 'bara'),
      reading('PD', '50', 'bara'),
      reading('TS', '30', 'degC'),
    ]);
    const performance = find(findings, 'stagePerformance');
    expect(performance?.severity).toBe('ok');
    expect(performance?.numbers.pressureRatio).toBeCloseTo(2.5, 9);
    const direct = stagePerformance({
      boreM: 0.25,
      rodM: 0.06,
      strokeM: 0.14,
      speedRpm: 900,
      headClearance: 0.16,
      crankClearance: 0.19,
      headActive: true,
      crankActive: true,
      suctionPressurePa: 20e5,
      dischargePressurePa: 50e5,
      suctionTemperatureK: 303.15,
      composition: config.gasStreams[0]?.composition as Record<string, number>,
      polytropicExponent: 1.28,
      veMethod: 'empirical',
    });
    expect(performance?.numbers['C1.veHead']).toBeCloseTo(direct.head.volumetricEfficiency, 12);
    expect(performance?.numbers.inletFlowM3s).toBeCloseTo(direct.inletFlowM3s, 12);
    expect(performance?.numbers.shaftPowerW).toBeCloseTo(direct.shaftPowerW, 6);
    // Same cylinder as V1 (k = 1.28, Z ≠ 1 there): about 566 m³/h actual; this gas and Z = 1 give a little more.
    expect((performance?.numbers.inletFlowM3s as number) * 3600).toBeGreaterThan(560);
    expect((performance?.numbers.inletFlowM3s as number) * 3600).toBeLessThan(590);
  });

  it('should report a reading the checks cannot use instead of throwing', () => {
    const findings = evaluateRound(config, [
      reading('PS', '50', 'bara'),
      reading('PD', '20', 'bara'),
      reading('TS', '30', 'degC'),
      reading('TD', '90', 'degC'),
    ]);
    const input = findings.filter((f) => f.rule === 'input');
    expect(input.length).toBeGreaterThan(0);
    expect(input[0]?.severity).toBe('watch');
    expect(input[0]?.message).toMatch(/^Cannot check .*the ratio must be at least 1/);
    expect(input[0]?.inputs.code).toBe('E_RATIO_LT_1');
  });
});

describe('evaluateRound: trends', () => {
  const day = (n: number) => new Date(Date.UTC(2026, 1, 10 + n, 8)).toISOString();
  const history = (start: number, perDay: number, days = 12) =>
    Array.from({ length: days }, (_, n) =>
      reading(
        'TD',
        (start + perDay * n).toFixed(1),
        'degC',
        day(n),
        `aaaaaaaa-2222-4333-8444-${String(n).padStart(12, '0')}`,
      ),
    );

  it('should say when a steady rise reaches the next limit ahead, within 14 days', () => {
    // 1 K a day from 100 °C: at 112 °C (past the 110 °C watch) the next limit is the 125 °C alarm, 13 days on.
    const trend = evaluateRound(config, [reading('TD', '112', 'degC', day(12))], { readings: history(100, 1) }).find(
      (f) => f.rule === 'trend',
    );
    expect(trend?.severity).toBe('watch');
    expect(trend?.message).toBe(
      'Discharge temperature is rising about 1.0 K a day and at this rate reaches 125 °C in about 13 days (2026-03-07).',
    );
    expect(trend?.numbers.daysToLimit).toBeCloseTo(13, 6);
  });

  it('should stay quiet when the limit is further than 14 days away, or with too little history', () => {
    const slow = evaluateRound(config, [reading('TD', '102.4', 'degC', day(12))], { readings: history(100, 0.2) });
    expect(slow.some((f) => f.rule === 'trend')).toBe(false);
    const short = evaluateRound(config, [reading('TD', '105', 'degC', day(3))], { readings: history(102, 1, 3) });
    expect(short.some((f) => f.rule === 'trend')).toBe(false);
  });
});

describe('evaluateRound: contract', () => {
  it('should give findings that match the Finding schema, with stable keys, every time', () => {
    const readings = [
      reading('PS', '20', 'bara'),
      reading('PD', '50', 'bara'),
      reading('TS', '30', 'degC'),
      reading('TD', '95', 'degC'),
    ];
    const first = evaluateRound(config, readings);
    const second = evaluateRound(config, readings);
    expect(second).toEqual(first);
    for (const finding of first) {
      expect(() => Finding.parse(finding)).not.toThrow();
      expect(finding.roundId).toBe(ROUND_ID);
      expect(finding.key.startsWith(`${ROUND_ID}:${finding.rule}:M1`)).toBe(true);
    }
    expect(new Set(first.map((f) => f.key)).size).toBe(first.length);
  });

  it('should return nothing for an empty round', () => {
    expect(evaluateRound(config, [])).toEqual([]);
  });
});
