/**
 * Actual and standard volume flow. A standard volume is an amount of gas in disguise: always keep its reference
 * state with the number. Q_std = Q_act · (P_act/P_std) · (T_std/T_act) · (Z_std/Z_act), with Z_std = 1.
 * source: ideal-gas law; reference states as in ISO 13443 (15 °C, 101.325 kPa), the common "normal" state
 * (0 °C, 101.325 kPa) and US gas practice (60 °F, 14.696 psia).
 */
import { M3_PER_FT3, PA_PER_PSI, R_MOLAR, ZERO_CELSIUS_K } from './constants';
import { CalcError, requireRange } from './errors';

export type StandardBasis = 'Sm3-15C' | 'Nm3-0C' | 'SCF-60F';

export interface ReferenceState {
  pressurePa: number;
  temperatureK: number;
  label: string;
}

export const STANDARD_STATES: Readonly<Record<StandardBasis, ReferenceState>> = {
  'Sm3-15C': { pressurePa: 101_325, temperatureK: ZERO_CELSIUS_K + 15, label: 'Sm³ (15 °C, 101.325 kPa)' },
  'Nm3-0C': { pressurePa: 101_325, temperatureK: ZERO_CELSIUS_K, label: 'Nm³ (0 °C, 101.325 kPa)' },
  // 60 °F = 519.67 °R = 288.705 K
  'SCF-60F': {
    pressurePa: 14.696 * PA_PER_PSI,
    temperatureK: (60 + 459.67) * (5 / 9),
    label: 'SCF (60 °F, 14.696 psia)',
  },
};

export const Z_MIN = 0.05;
export const Z_MAX = 1.5;

function state(basis: StandardBasis): ReferenceState {
  const found = STANDARD_STATES[basis];
  if (!found) {
    throw new CalcError(
      'E_UNIT_UNKNOWN',
      'basis',
      basis,
      `Standard basis "${basis}" is not known; use ${Object.keys(STANDARD_STATES).join(', ')}.`,
    );
  }
  return found;
}

export function requireZ(field: string, z: number): number {
  return requireRange('E_Z_RANGE', field, z, { min: Z_MIN, max: Z_MAX, minOpen: true });
}

/** Far above any compressor (hydrogen service reaches about 100 MPa); larger values are typing errors. */
export const PRESSURE_MAX_PA = 1e9;
export const TEMPERATURE_MAX_K = 5000;
/** Far above any plant flow; larger values are typing errors and would overflow downstream. */
export const FLOW_MAX_M3S = 1e6;

export function requireAbsolutePressure(field: string, pressurePa: number): number {
  return requireRange('E_ABS_NONPOSITIVE', field, pressurePa, {
    min: 0,
    minOpen: true,
    max: PRESSURE_MAX_PA,
    unit: 'Pa',
  });
}

export function requireAbsoluteTemperature(field: string, temperatureK: number): number {
  return requireRange('E_TEMP_ABS_ZERO', field, temperatureK, {
    min: 0,
    minOpen: true,
    max: TEMPERATURE_MAX_K,
    unit: 'K',
  });
}

function requireFlow(field: string, flow: number): number {
  return requireRange('E_NOT_FINITE', field, flow, { min: -FLOW_MAX_M3S, max: FLOW_MAX_M3S });
}

export interface ActualFlowState {
  pressurePa: number;
  temperatureK: number;
  /** Compressibility at the actual state; 1 (ideal gas) when not given. */
  z?: number;
  basis: StandardBasis;
}

/** Standard volume flow, m³/s at the basis' reference state, from an actual volume flow at P, T, Z. */
export function standardFlow(i: ActualFlowState & { actualM3s: number }): number {
  const ref = state(i.basis);
  requireFlow('actualM3s', i.actualM3s);
  requireAbsolutePressure('pressurePa', i.pressurePa);
  requireAbsoluteTemperature('temperatureK', i.temperatureK);
  const z = requireZ('z', i.z ?? 1);
  return i.actualM3s * (i.pressurePa / ref.pressurePa) * (ref.temperatureK / i.temperatureK) * (1 / z);
}

/** Actual volume flow, m³/s at P, T, Z, from a standard volume flow (the inverse of standardFlow). */
export function actualFlow(i: ActualFlowState & { standardM3s: number }): number {
  const ref = state(i.basis);
  requireFlow('standardM3s', i.standardM3s);
  requireAbsolutePressure('pressurePa', i.pressurePa);
  requireAbsoluteTemperature('temperatureK', i.temperatureK);
  const z = requireZ('z', i.z ?? 1);
  return i.standardM3s * (ref.pressurePa / i.pressurePa) * (i.temperatureK / ref.temperatureK) * z;
}

/** Molar flow, mol/s, of a standard volume flow (ideal gas at the reference state). */
export function molarFlowFromStandard(standardM3s: number, basis: StandardBasis): number {
  const ref = state(basis);
  requireFlow('standardM3s', standardM3s);
  return (standardM3s * ref.pressurePa) / (R_MOLAR * ref.temperatureK);
}

/** Standard volume flow, m³/s at the basis' reference state, of a molar flow in mol/s. */
export function standardFromMolarFlow(molarFlowMolS: number, basis: StandardBasis): number {
  const ref = state(basis);
  requireRange('E_NOT_FINITE', 'molarFlowMolS', molarFlowMolS, { min: -1e9, max: 1e9, unit: 'mol/s' });
  return (molarFlowMolS * R_MOLAR * ref.temperatureK) / ref.pressurePa;
}

/** The same amount of gas expressed on another standard basis. */
export function convertStandardFlow(standardM3s: number, from: StandardBasis, to: StandardBasis): number {
  return standardFromMolarFlow(molarFlowFromStandard(standardM3s, from), to);
}

const SECONDS_PER_DAY = 86_400;

/** MMSCFD (10⁶ standard ft³ per day at 60 °F, 14.696 psia) from standard m³/s on the SCF-60F basis. */
export function toMMSCFD(standardM3sScf: number): number {
  return (requireFlow('standardM3s', standardM3sScf) / M3_PER_FT3) * (SECONDS_PER_DAY / 1e6);
}

/** Standard m³/s on the SCF-60F basis from MMSCFD. */
export function fromMMSCFD(mmscfd: number): number {
  return (
    ((requireRange('E_NOT_FINITE', 'mmscfd', mmscfd, { min: -1e6, max: 1e6 }) * 1e6) / SECONDS_PER_DAY) * M3_PER_FT3
  );
}

/** SCFM (standard ft³ per minute at 60 °F, 14.696 psia) from standard m³/s on the SCF-60F basis. */
export function toSCFM(standardM3sScf: number): number {
  return (requireFlow('standardM3s', standardM3sScf) / M3_PER_FT3) * 60;
}

/** Standard m³/s on the SCF-60F basis from SCFM. */
export function fromSCFM(scfm: number): number {
  return (requireRange('E_NOT_FINITE', 'scfm', scfm, { min: -1e9, max: 1e9 }) / 60) * M3_PER_FT3;
}
