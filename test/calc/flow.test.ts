import { describe, expect, it } from 'vitest';
import {
  actualFlow,
  convertStandardFlow,
  fromMMSCFD,
  fromSCFM,
  molarFlowFromStandard,
  standardFlow,
  standardFromMolarFlow,
  toMMSCFD,
  toSCFM,
} from '../../src/calc';
import { C_TO_K, expectCalcError, expectClose } from './helpers';

const LB_MOL = 453.59237; // mol per lb-mol; source: NIST SP 811, B.8 (1 lb = 0.453 592 37 kg, exact)
const FT3 = 0.028316846592;

describe('standard reference states', () => {
  // source: Kidnay & Parrish, Fundamentals of Natural Gas Processing (2006), appendix B.2: ideal-gas molar volumes
  it('should give 23.6444 m³/kmol at 15 °C and 379.49 ft³/lb-mol at 60 °F, 14.696 psia', () => {
    expectClose(standardFromMolarFlow(1000, 'Sm3-15C'), 23.6444, 2e-5);
    expectClose(standardFromMolarFlow(LB_MOL, 'SCF-60F') / FT3, 379.49, 1e-4);
  });

  // source: molar volume of an ideal gas at 0 °C and 101.325 kPa, 22.414 m³/kmol (CODATA, from memory)
  it('should give 22.414 m³/kmol at 0 °C', () => {
    expectClose(standardFromMolarFlow(1000, 'Nm3-0C'), 22.414, 1e-4);
  });
});

describe('worked example U6 of the engineering reference (computed from the definitions)', () => {
  it('should express 10 MMSCFD as 6944 SCFM, 498.0 kmol/h, 11 780 Sm³/h and 11 160 Nm³/h', () => {
    const scf = fromMMSCFD(10);
    expectClose(toSCFM(scf), 6944);
    expectClose(molarFlowFromStandard(scf, 'SCF-60F') * 3.6, 498.0);
    expectClose(convertStandardFlow(scf, 'SCF-60F', 'Sm3-15C') * 3600, 11_780);
    expectClose(convertStandardFlow(scf, 'SCF-60F', 'Nm3-0C') * 3600, 11_160);
  });

  it('should give 288.7 m³/h actual at 40 bara, 30 °C, Z = 0.92', () => {
    const sm3 = convertStandardFlow(fromMMSCFD(10), 'SCF-60F', 'Sm3-15C');
    const actual = actualFlow({
      standardM3s: sm3,
      pressurePa: 40e5,
      temperatureK: C_TO_K(30),
      z: 0.92,
      basis: 'Sm3-15C',
    });
    expectClose(actual * 3600, 288.7);
  });

  it('should make 1 SCFM equal 1.696 Sm³/h', () => {
    expectClose(convertStandardFlow(fromSCFM(1), 'SCF-60F', 'Sm3-15C') * 3600, 1.696);
  });
});

describe('standardFlow and actualFlow', () => {
  it('should be inverse to each other', () => {
    const state = { pressurePa: 2.5e6, temperatureK: 310, z: 0.93, basis: 'Nm3-0C' as const };
    const standard = standardFlow({ actualM3s: 0.2, ...state });
    expect(actualFlow({ standardM3s: standard, ...state })).toBeCloseTo(0.2, 12);
  });

  // source: ideal-gas law; at the reference state itself actual and standard volumes are equal
  it('should leave the flow unchanged at the reference state with Z = 1', () => {
    expect(standardFlow({ actualM3s: 1.5, pressurePa: 101_325, temperatureK: 288.15, basis: 'Sm3-15C' })).toBeCloseTo(
      1.5,
      12,
    );
    expect(toMMSCFD(fromMMSCFD(3.2))).toBeCloseTo(3.2, 12);
  });

  it('should refuse impossible states', () => {
    const good = { actualM3s: 1, pressurePa: 1e6, temperatureK: 300, basis: 'Sm3-15C' as const };
    expectCalcError(() => standardFlow({ ...good, z: 0.05 }), 'E_Z_RANGE', 'z');
    expectCalcError(() => standardFlow({ ...good, z: 1.6 }), 'E_Z_RANGE', 'z');
    expectCalcError(() => standardFlow({ ...good, pressurePa: 0 }), 'E_ABS_NONPOSITIVE', 'pressurePa');
    expectCalcError(() => standardFlow({ ...good, temperatureK: -1 }), 'E_TEMP_ABS_ZERO', 'temperatureK');
    expectCalcError(() => standardFlow({ ...good, basis: 'SCF-14.73' as 'Sm3-15C' }), 'E_UNIT_UNKNOWN', 'basis');
    expectCalcError(() => standardFlow({ ...good, actualM3s: Number.NaN }), 'E_NOT_FINITE', 'actualM3s');
  });
});
