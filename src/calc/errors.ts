/**
 * Errors of the calculation room. Invalid input never yields a number: it throws a CalcError that names the
 * field, the value and the allowed range. The codes are the engineering reference's vocabulary, plus
 * E_NOT_FINITE for an input that is not a number at all.
 */
export const CALC_ERROR_CODES = [
  'E_NOT_FINITE',
  'E_UNIT_UNKNOWN',
  'E_ABS_NONPOSITIVE',
  'E_BELOW_VACUUM',
  'E_TEMP_ABS_ZERO',
  'E_TEMP_RANGE',
  'E_ELEVATION_RANGE',
  'E_Z_RANGE',
  'E_COMPOSITION_SUM',
  'E_COMPONENT_UNKNOWN',
  'E_T_POLY_RANGE',
  'E_K_RANGE',
  'E_RATIO_LT_1',
  'E_TD_BELOW_TS',
  'E_CLEARANCE_RANGE',
  'E_GEOMETRY',
  'E_VE_NONPOSITIVE',
  'E_VE_GT_1',
  'E_EFFICIENCY_RANGE',
  'E_RECYCLE_RANGE',
  'E_TIME_ORDER',
] as const;
export type CalcErrorCode = (typeof CALC_ERROR_CODES)[number];

/** Results that are shown with a flag rather than refused. */
export const CALC_WARNING_CODES = [
  'W_REAL_GAS',
  'W_POLY_EXTRAPOLATED',
  'W_RATIO_HIGH',
  'W_SENSOR_SUSPECT',
  'W_CHECK_MEASUREMENT',
] as const;
export type CalcWarningCode = (typeof CALC_WARNING_CODES)[number];

export class CalcError extends Error {
  override readonly name = 'CalcError';
  readonly code: CalcErrorCode;
  readonly field: string;
  readonly value: unknown;

  constructor(code: CalcErrorCode, field: string, value: unknown, message: string) {
    super(message);
    this.code = code;
    this.field = field;
    this.value = value;
  }
}

/** Formats a number for an error message without drowning the reader in digits. */
export function show(value: unknown): string {
  if (typeof value !== 'number') return JSON.stringify(value) ?? String(value);
  if (!Number.isFinite(value)) return String(value);
  return Number.isInteger(value) ? String(value) : String(Number(value.toPrecision(6)));
}

/** Throws E_NOT_FINITE unless `value` is a finite number. */
export function requireFinite(field: string, value: number): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new CalcError(
      'E_NOT_FINITE',
      field,
      value,
      `${field} = ${show(value)} is not a finite number; enter a number.`,
    );
  }
  return value;
}

/**
 * Requires min ≤ value ≤ max (or strict bounds where `open` says so); otherwise throws `code`.
 * `unit` is appended to the numbers in the message.
 */
export function requireRange(
  code: CalcErrorCode,
  field: string,
  value: number,
  range: { min?: number; max?: number; minOpen?: boolean; maxOpen?: boolean; unit?: string },
): number {
  requireFinite(field, value);
  const { min, max, minOpen = false, maxOpen = false, unit = '' } = range;
  const belowMin = min !== undefined && (minOpen ? value <= min : value < min);
  const aboveMax = max !== undefined && (maxOpen ? value >= max : value > max);
  if (belowMin || aboveMax) {
    const u = unit ? ` ${unit}` : '';
    const low = min === undefined ? '' : `${minOpen ? 'above' : 'at least'} ${show(min)}${u}`;
    const high = max === undefined ? '' : `${maxOpen ? 'below' : 'at most'} ${show(max)}${u}`;
    const allowed = [low, high].filter(Boolean).join(' and ');
    throw new CalcError(code, field, value, `${field} = ${show(value)}${u} is out of range: it must be ${allowed}.`);
  }
  return value;
}
