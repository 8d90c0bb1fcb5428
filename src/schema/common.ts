/**
 * Building blocks shared by every record schema. Objects are strict (unknown fields are refused), strings have
 * lengths, numbers have physical ranges, and every message names the field that is wrong.
 */
import { z } from 'zod';
import { CALC_WARNING_CODES, STATUS_ORDER, UNITS } from '../calc';

/** Client-generated record id. */
export const Id = z.uuid({ error: 'must be a UUID generated on the device' });

/** Ids of configuration objects: short, readable, stable (e.g. `K-101`, `C1-HE-S1`). */
export const ConfigId = z
  .string()
  .min(1, 'must not be empty')
  .max(64, 'must be at most 64 characters')
  .regex(
    /^[A-Za-z0-9][A-Za-z0-9._-]*$/,
    'may hold letters, digits, dot, dash and underscore, starting with a letter or digit',
  );

/** ISO 8601 time with a zone, e.g. 2026-03-14T08:30:00Z or 2026-03-14T08:30:00+02:00. */
export const IsoTime = z.iso.datetime({
  offset: true,
  error: 'must be an ISO 8601 time with a zone, e.g. 2026-03-14T08:30:00Z',
});

export const Name = z.string().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters');
export const ShortText = z.string().max(200, 'must be at most 200 characters');
export const LongText = z.string().max(4000, 'must be at most 4000 characters');

export const Severity = z.enum(STATUS_ORDER as [string, ...string[]] as ['ok', 'watch', 'alarm', 'trip']);
export type Severity = z.infer<typeof Severity>;

export const WarningCode = z.enum(CALC_WARNING_CODES);

const UNIT_IDS = UNITS.map((unit) => unit.id) as [string, ...string[]];
/** A unit id of the calculation room (psig, barg, degC, mm, …). */
export const UnitId = z.enum(UNIT_IDS, { error: `must be one of ${UNIT_IDS.join(', ')}` });

/** A finite number within [min, max], with the range in the message. */
export function bounded(min: number, max: number, unit = '') {
  const u = unit ? ` ${unit}` : '';
  return z
    .number({ error: 'must be a number' })
    .refine(Number.isFinite, 'must be a finite number')
    .refine((value) => value >= min && value <= max, `must be between ${min}${u} and ${max}${u}`);
}

/** A finite number strictly above min, up to max. */
export function positive(max: number, unit = '') {
  const u = unit ? ` ${unit}` : '';
  return z
    .number({ error: 'must be a number' })
    .refine(Number.isFinite, 'must be a finite number')
    .refine((value) => value > 0 && value <= max, `must be above 0 and at most ${max}${u}`);
}

/** Absolute pressure in Pa (above 0, at most 1000 MPa). */
export const PressurePa = positive(1e9, 'Pa');
/** Absolute temperature in K (above 0, at most 5000 K). */
export const TemperatureK = positive(5000, 'K');
/** Temperature difference in K. */
export const TemperatureDeltaK = bounded(-1000, 1000, 'K');
/** Lengths of machine parts in m. */
export const LengthM = positive(50, 'm');
export const Fraction = bounded(0, 1);

/** What a person typed, exactly, with the unit shown beside the field. */
export const Entered = z.strictObject({
  text: z.string().max(500, 'must be at most 500 characters'),
  unit: UnitId.nullable(),
});
export type Entered = z.infer<typeof Entered>;

/** A person as recorded on a record. */
export const PersonRef = z.strictObject({ id: ConfigId, name: Name });
export type PersonRef = z.infer<typeof PersonRef>;

/** Formats zod issues as one readable line per field: `machines.0.frame.strokeM: must be above 0 …`. */
export function describeIssues(error: z.ZodError): string {
  return error.issues
    .map((issue) => `${issue.path.length ? issue.path.join('.') : '(record)'}: ${issue.message}`)
    .join('; ');
}
