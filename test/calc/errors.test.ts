/**
 * Every error code of the calculation room, each provoked once through the public API, with the field the error
 * must name; every warning code, each raised once; and the promise that nothing returns NaN or Infinity.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  assessBearingTemperature,
  assessDischargeTemperature,
  assessValveCovers,
  barometricPressure,
  bearingClearance,
  CALC_ERROR_CODES,
  CALC_WARNING_CODES,
  CalcError,
  type CalcErrorCode,
  type CalcWarningCode,
  dischargeTemperature,
  firstStageRecycle,
  gasProperties,
  isentropicPower,
  pistonDisplacement,
  powerCurve,
  rodLoad,
  stagePerformance,
  standardFlow,
  toSI,
  valveLife,
  volumetricEfficiency,
} from '../../src/calc';
import { expectCalcError } from './helpers';

const STAGE = {
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
  k: 1.28,
  veMethod: 'empirical' as const,
};

const CASES: Array<[CalcErrorCode, string, () => unknown]> = [
  ['E_NOT_FINITE', 'value', () => toSI(Number.NaN, 'bara')],
  ['E_UNIT_UNKNOWN', 'unit', () => toSI(1, 'torr')],
  ['E_ABS_NONPOSITIVE', 'suctionPressurePa', () => stagePerformance({ ...STAGE, suctionPressurePa: 0 })],
  ['E_BELOW_VACUUM', 'value', () => toSI(-20, 'psig', { barometricPa: 101_325 })],
  [
    'E_TEMP_ABS_ZERO',
    'temperatureK',
    () => standardFlow({ actualM3s: 1, pressurePa: 1e5, temperatureK: 0, basis: 'Sm3-15C' }),
  ],
  ['E_TEMP_RANGE', 'suctionTemperatureK', () => stagePerformance({ ...STAGE, suctionTemperatureK: 650 })],
  ['E_ELEVATION_RANGE', 'elevationM', () => barometricPressure(6000)],
  ['E_Z_RANGE', 'zDischarge', () => stagePerformance({ ...STAGE, zDischarge: 2 })],
  ['E_COMPOSITION_SUM', 'composition', () => gasProperties({ methane: 0.5 }, 300)],
  ['E_COMPONENT_UNKNOWN', 'composition.helium', () => gasProperties({ methane: 0.9, helium: 0.1 }, 300)],
  ['E_T_POLY_RANGE', 'temperatureK', () => gasProperties({ methane: 1 }, 1200)],
  ['E_K_RANGE', 'k', () => isentropicPower({ suctionPressurePa: 1e5, inletFlowM3s: 1, pressureRatio: 2, k: 1.8 })],
  ['E_RATIO_LT_1', 'dischargePressurePa', () => stagePerformance({ ...STAGE, dischargePressurePa: 10e5 })],
  [
    'E_TD_BELOW_TS',
    'observedK',
    () => assessDischargeTemperature({ suctionTemperatureK: 300, predictedK: 380, observedK: 299, pressureRatio: 2 }),
  ],
  ['E_CLEARANCE_RANGE', 'headClearance', () => stagePerformance({ ...STAGE, headClearance: 2.5 })],
  [
    'E_GEOMETRY',
    'rodM',
    () => pistonDisplacement({ boreM: 0.1, rodM: 0.12, strokeM: 0.1, speedRpm: 300, ends: 'both' }),
  ],
  [
    'E_VE_NONPOSITIVE',
    'pressureRatio',
    () => volumetricEfficiency({ clearanceFraction: 0.4, pressureRatio: 6, k: 1.28, method: 'theoretical' }),
  ],
  [
    'E_VE_GT_1',
    'constant',
    () =>
      volumetricEfficiency({ clearanceFraction: 0.1, pressureRatio: 1.2, k: 1.3, method: 'empirical', constant: 110 }),
  ],
  ['E_EFFICIENCY_RANGE', 'compressionEfficiency', () => stagePerformance({ ...STAGE, compressionEfficiency: 0.4 })],
  [
    'E_RECYCLE_RANGE',
    'targetMolarFlowMolS',
    () =>
      firstStageRecycle({
        stages: [{ displacementM3s: 0.1, clearanceFraction: 0.15, suctionTemperatureK: 300, k: 1.3 }],
        firstStageSuctionPressurePa: 1e5,
        finalDischargePressurePa: 3e5,
        targetMolarFlowMolS: -1,
        mode: 'full',
        veMethod: 'theoretical',
      }),
  ],
  [
    'E_TIME_ORDER',
    'now',
    () => valveLife({ changes: [{ at: '2026-05-01T00:00:00Z', planned: true }], now: '2026-04-01T00:00:00Z' }),
  ],
];

describe('CalcError codes', () => {
  it.each(CASES)('%s names the field %s', (code, field, run) => {
    const error = expectCalcError(run, code, field);
    expect(error.name).toBe('CalcError');
    expect(error.message).not.toMatch(/undefined/);
  });

  it('should cover every code of the vocabulary', () => {
    const covered = new Set(CASES.map(([code]) => code));
    expect(CALC_ERROR_CODES.filter((code) => !covered.has(code))).toEqual([]);
  });
});

describe('warning codes', () => {
  const WARNINGS: Array<[CalcWarningCode, () => { warnings: readonly string[] }]> = [
    [
      'W_REAL_GAS',
      () =>
        dischargeTemperature({ suctionTemperatureK: 300, suctionPressurePa: 60e5, dischargePressurePa: 150e5, k: 1.3 }),
    ],
    ['W_POLY_EXTRAPOLATED', () => gasProperties({ methane: 0.98, isopentane: 0.02 }, 270)],
    [
      'W_RATIO_HIGH',
      () =>
        dischargeTemperature({ suctionTemperatureK: 300, suctionPressurePa: 1e5, dischargePressurePa: 11e5, k: 1.4 }),
    ],
    [
      'W_SENSOR_SUSPECT',
      () => assessBearingTemperature({ temperatureK: 330, oilSupplyK: 340, at: '2026-01-01T00:00:00Z', limits: {} }),
    ],
    ['W_CHECK_MEASUREMENT', () => bearingClearance({ measuredM: 0.5e-3, journalDiameterM: 0.2 })],
  ];

  it.each(WARNINGS)('%s is raised where the reference says', (code, run) => {
    expect(run().warnings).toContain(code);
  });

  it('should cover every warning code', () => {
    expect(CALC_WARNING_CODES.filter((code) => !WARNINGS.some(([covered]) => covered === code))).toEqual([]);
  });
});

/** A result is fine when every number in it is finite; an error is fine only when it is a CalcError. */
function finiteOrCalcError(run: () => unknown): boolean {
  let result: unknown;
  try {
    result = run();
  } catch (error) {
    if (error instanceof CalcError) return true;
    throw error;
  }
  const check = (value: unknown): boolean => {
    if (typeof value === 'number') return Number.isFinite(value);
    if (Array.isArray(value)) return value.every(check);
    if (value && typeof value === 'object') return Object.values(value).every(check);
    return true;
  };
  return check(result);
}

const wide = fc.oneof(
  fc.double({ noNaN: false }),
  fc.double({ min: -1e3, max: 1e8, noNaN: true }),
  fc.constantFrom(0, -0, 1, 1e-300, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY),
);

describe('no NaN or Infinity ever (property)', () => {
  it('should give a finite number or a CalcError for the stage model over wide random inputs', () => {
    fc.assert(
      fc.property(
        fc.record({
          boreM: wide,
          rodM: wide,
          strokeM: wide,
          speedRpm: wide,
          headClearance: wide,
          crankClearance: wide,
          suctionPressurePa: wide,
          dischargePressurePa: wide,
          suctionTemperatureK: wide,
          k: wide,
          zSuction: wide,
          zDischarge: wide,
        }),
        fc.constantFrom('theoretical' as const, 'empirical' as const),
        (numbers, veMethod) =>
          finiteOrCalcError(() => stagePerformance({ ...numbers, headActive: true, crankActive: true, veMethod })),
      ),
      { numRuns: 3000 },
    );
  });

  it('should give a finite number or a CalcError for conversions, gas properties and temperature checks', () => {
    fc.assert(
      fc.property(wide, wide, wide, wide, (a, b, c, d) => {
        return (
          finiteOrCalcError(() => toSI(a, 'psig', { barometricPa: b })) &&
          finiteOrCalcError(() => barometricPressure(a)) &&
          finiteOrCalcError(() => gasProperties({ methane: a, ethane: b }, c)) &&
          finiteOrCalcError(() =>
            dischargeTemperature({ suctionTemperatureK: a, suctionPressurePa: b, dischargePressurePa: c, k: d }),
          ) &&
          finiteOrCalcError(() =>
            assessDischargeTemperature({ suctionTemperatureK: a, predictedK: b, observedK: c, pressureRatio: d }),
          ) &&
          finiteOrCalcError(() =>
            volumetricEfficiency({ clearanceFraction: a, pressureRatio: b, k: c, method: 'empirical', constant: d }),
          ) &&
          finiteOrCalcError(() => isentropicPower({ suctionPressurePa: a, inletFlowM3s: b, pressureRatio: c, k: d }))
        );
      }),
      { numRuns: 3000 },
    );
  });

  it('should give finite results or a CalcError for the mechanical checks', () => {
    fc.assert(
      fc.property(wide, wide, wide, wide, (a, b, c, d) => {
        return (
          finiteOrCalcError(() =>
            assessValveCovers({
              covers: [
                { id: 'A', end: 'head', service: 'suction', temperatureK: a },
                { id: 'B', end: 'crank', service: 'suction', temperatureK: b },
              ],
              suctionGasK: c,
            }),
          ) &&
          finiteOrCalcError(() =>
            assessBearingTemperature({
              temperatureK: a,
              oilSupplyK: b,
              peersK: [c],
              previous: { temperatureK: d, at: '2026-01-01T00:00:00Z' },
              at: '2026-01-01T06:00:00Z',
              limits: {},
            }),
          ) &&
          finiteOrCalcError(() => bearingClearance({ measuredM: a, journalDiameterM: b, specMinM: c, specMaxM: d }))
        );
      }),
      { numRuns: 3000 },
    );
  });

  it('should give a finite rod load or a CalcError over random inputs', () => {
    fc.assert(
      fc.property(
        wide,
        wide,
        wide,
        wide,
        wide,
        (speedRpm, dischargePressurePa, reciprocatingMassKg, exponent, headClearance) =>
          finiteOrCalcError(() =>
            rodLoad({
              boreM: 0.25,
              rodM: 0.06,
              strokeM: 0.14,
              connectingRodM: 0.35,
              speedRpm,
              suctionPressurePa: 20e5,
              dischargePressurePa,
              distancePiecePressurePa: 101_325,
              headClearance,
              crankClearance: 0.19,
              headActive: true,
              crankActive: true,
              exponent,
              reciprocatingMassKg,
            }),
          ),
      ),
      { numRuns: 150 },
    );
  });

  it('should give a finite curve or a CalcError for random clearances and exponents', () => {
    fc.assert(
      fc.property(wide, wide, wide, (headClearance, crankClearance, k) =>
        finiteOrCalcError(() => powerCurve({ ...STAGE, headClearance, crankClearance, k })),
      ),
      { numRuns: 200 },
    );
  });
});
