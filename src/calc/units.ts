/**
 * Unit conversion at the edges. Inside, every quantity is SI: Pa absolute, K, m, W, m³/s.
 * Gauge pressures need the site barometric pressure (see barometer.ts). A temperature difference converts with
 * ×1.8 only (deltaToSI / deltaFromSI), never through the +32 offset.
 * Factors: NIST SP 811 (2008) appendix B, exact where the definitions are exact.
 */
import {
  M_PER_IN,
  M3_PER_FT3,
  PA_PER_BAR,
  PA_PER_KGF_PER_CM2,
  PA_PER_PSI,
  W_PER_HP,
  ZERO_CELSIUS_K,
} from './constants';
import { CalcError, requireFinite, requireRange, show } from './errors';

export type Quantity = 'pressure' | 'temperature' | 'length' | 'power' | 'volumeFlow';

export interface UnitInfo {
  /** The id used in the API and stored with each entered value, e.g. `psig`. */
  id: string;
  quantity: Quantity;
  /** How the unit is written on screen, e.g. `psi g`. */
  label: string;
  /** Pressure units only: a gauge reading, converted with the site barometric pressure. */
  gauge?: boolean;
}

interface LinearUnit extends UnitInfo {
  factor: number;
  offset: number;
}

const linear = (id: string, quantity: Quantity, label: string, factor: number, offset = 0, gauge?: boolean) =>
  ({ id, quantity, label, factor, offset, ...(gauge === undefined ? {} : { gauge }) }) satisfies LinearUnit;

const UNIT_TABLE: readonly LinearUnit[] = [
  linear('Pa', 'pressure', 'Pa a', 1, 0, false),
  linear('psig', 'pressure', 'psi g', PA_PER_PSI, 0, true),
  linear('psia', 'pressure', 'psi a', PA_PER_PSI, 0, false),
  linear('barg', 'pressure', 'bar g', PA_PER_BAR, 0, true),
  linear('bara', 'pressure', 'bar a', PA_PER_BAR, 0, false),
  linear('kPag', 'pressure', 'kPa g', 1000, 0, true),
  linear('kPaa', 'pressure', 'kPa a', 1000, 0, false),
  linear('MPag', 'pressure', 'MPa g', 1e6, 0, true),
  linear('MPaa', 'pressure', 'MPa a', 1e6, 0, false),
  linear('kgcm2g', 'pressure', 'kg/cm² g', PA_PER_KGF_PER_CM2, 0, true),
  linear('kgcm2a', 'pressure', 'kg/cm² a', PA_PER_KGF_PER_CM2, 0, false),
  linear('K', 'temperature', 'K', 1),
  linear('degC', 'temperature', '°C', 1, ZERO_CELSIUS_K),
  // °F → K: (°F + 459.67) × 5/9
  linear('degF', 'temperature', '°F', 5 / 9, 459.67 * (5 / 9)),
  linear('degR', 'temperature', '°R', 5 / 9),
  linear('m', 'length', 'm', 1),
  linear('mm', 'length', 'mm', 0.001),
  linear('um', 'length', 'µm', 1e-6),
  linear('in', 'length', 'in', M_PER_IN),
  linear('mil', 'length', 'mil', M_PER_IN / 1000),
  linear('W', 'power', 'W', 1),
  linear('kW', 'power', 'kW', 1000),
  linear('hp', 'power', 'hp', W_PER_HP),
  linear('m3/s', 'volumeFlow', 'm³/s', 1),
  linear('m3/h', 'volumeFlow', 'm³/h', 1 / 3600),
  linear('ft3/min', 'volumeFlow', 'ft³/min', M3_PER_FT3 / 60),
];

const BY_ID = new Map(UNIT_TABLE.map((unit) => [unit.id, unit]));

/** Every unit the app accepts, with its quantity and display label. */
export const UNITS: readonly UnitInfo[] = UNIT_TABLE.map(({ factor: _f, offset: _o, ...info }) => info);

/** The SI unit each quantity is stored in. */
export const SI_UNIT: Readonly<Record<Quantity, string>> = {
  pressure: 'Pa',
  temperature: 'K',
  length: 'm',
  power: 'W',
  volumeFlow: 'm3/s',
};

export function unitInfo(unit: string): UnitInfo {
  const found = BY_ID.get(unit);
  if (!found) {
    throw new CalcError(
      'E_UNIT_UNKNOWN',
      'unit',
      unit,
      `Unit "${unit}" is not known; use one of ${UNIT_TABLE.map((u) => u.id).join(', ')}.`,
    );
  }
  const { factor: _f, offset: _o, ...info } = found;
  return info;
}

function lookup(unit: string): LinearUnit {
  unitInfo(unit);
  return BY_ID.get(unit) as LinearUnit;
}

function barometer(unit: LinearUnit, opts: { barometricPa?: number } | undefined): number {
  const barometricPa = opts?.barometricPa;
  if (barometricPa === undefined) {
    throw new CalcError(
      'E_ABS_NONPOSITIVE',
      'barometricPa',
      barometricPa,
      `A ${unit.label} reading needs the site barometric pressure (barometricPa) to become absolute; set the site elevation or barometer.`,
    );
  }
  return requireRange('E_ABS_NONPOSITIVE', 'barometricPa', barometricPa, {
    min: 0,
    minOpen: true,
    max: 200_000,
    unit: 'Pa',
  });
}

function checkAbsolute(field: string, pascal: number, shown: string): number {
  if (pascal <= 0) {
    throw new CalcError(
      'E_ABS_NONPOSITIVE',
      field,
      pascal,
      `${field} = ${shown} is not above absolute zero pressure; an absolute pressure must be greater than 0.`,
    );
  }
  return pascal;
}

function checkKelvin(field: string, kelvin: number, shown: string): number {
  if (kelvin <= 0) {
    throw new CalcError(
      'E_TEMP_ABS_ZERO',
      field,
      kelvin,
      `${field} = ${shown} is at or below absolute zero (0 K = −273.15 °C = −459.67 °F); check the reading and its unit.`,
    );
  }
  return kelvin;
}

/** Refuses a conversion whose result is too large for a double (a mistyped value, never a reading). */
function finiteResult(field: string, input: number, result: number): number {
  if (!Number.isFinite(result)) {
    throw new CalcError(
      'E_NOT_FINITE',
      field,
      input,
      `${field} = ${show(input)} is too large to convert; check the value and its unit.`,
    );
  }
  return result;
}

/** A value in `unit` to SI (Pa absolute, K, m, W, m³/s). */
export function toSI(value: number, unit: string, opts?: { barometricPa?: number }): number {
  const u = lookup(unit);
  requireFinite('value', value);
  const si = finiteResult('value', value, value * u.factor + u.offset);
  if (u.quantity === 'pressure') {
    if (u.gauge) {
      const absolute = finiteResult('value', value, si + barometer(u, opts));
      if (absolute < 0) {
        throw new CalcError(
          'E_BELOW_VACUUM',
          'value',
          value,
          `${show(value)} ${u.label} is below full vacuum at this site (it must be at least ${show(-barometer(u, opts) / u.factor)} ${u.label}); check the reading and its unit.`,
        );
      }
      return checkAbsolute('value', absolute, `${show(value)} ${u.label}`);
    }
    return checkAbsolute('value', si, `${show(value)} ${u.label}`);
  }
  if (u.quantity === 'temperature') return checkKelvin('value', si, `${show(value)} ${u.label}`);
  return si;
}

/** An SI value (Pa absolute, K, m, W, m³/s) to `unit`. */
export function fromSI(valueSI: number, unit: string, opts?: { barometricPa?: number }): number {
  const u = lookup(unit);
  requireFinite('valueSI', valueSI);
  if (u.quantity === 'pressure') {
    checkAbsolute('valueSI', valueSI, `${show(valueSI)} Pa`);
    const relative = u.gauge ? valueSI - barometer(u, opts) : valueSI;
    return finiteResult('valueSI', valueSI, relative / u.factor);
  }
  if (u.quantity === 'temperature') checkKelvin('valueSI', valueSI, `${show(valueSI)} K`);
  return finiteResult('valueSI', valueSI, (valueSI - u.offset) / u.factor);
}

const DELTA_FACTOR: Readonly<Record<string, number>> = { K: 1, degC: 1, degF: 5 / 9, degR: 5 / 9 };

/** A temperature difference (rise, excess, differential) in `unit` to kelvin: ×5/9 for °F and °R, no offset. */
export function deltaToSI(value: number, unit: string): number {
  const factor = DELTA_FACTOR[unit];
  if (factor === undefined) {
    throw new CalcError(
      'E_UNIT_UNKNOWN',
      'unit',
      unit,
      `"${unit}" is not a unit of temperature difference; use K, degC, degF or degR.`,
    );
  }
  return requireFinite('value', value) * factor;
}

/** A temperature difference in kelvin to `unit`. */
export function deltaFromSI(valueK: number, unit: string): number {
  const factor = DELTA_FACTOR[unit];
  if (factor === undefined) {
    throw new CalcError(
      'E_UNIT_UNKNOWN',
      'unit',
      unit,
      `"${unit}" is not a unit of temperature difference; use K, degC, degF or degR.`,
    );
  }
  return requireFinite('valueK', valueK) / factor;
}
