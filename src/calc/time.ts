import { CalcError } from './errors';

/** Milliseconds since the epoch of an ISO 8601 time with an offset or Z; anything else is refused. */
export function parseTime(field: string, iso: string): number {
  // A date without a zone means a different instant on every tablet; records always carry one.
  const zoned =
    typeof iso === 'string' && /^\d{4}-\d{2}-\d{2}(T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2}))?$/.test(iso);
  const ms = zoned ? Date.parse(iso) : Number.NaN;
  if (!Number.isFinite(ms)) {
    throw new CalcError(
      'E_TIME_ORDER',
      field,
      iso,
      `${field} = ${JSON.stringify(iso)} is not an ISO 8601 time; use a form like 2026-03-14T08:30:00Z.`,
    );
  }
  return ms;
}

export const MS_PER_HOUR = 3_600_000;
export const MS_PER_DAY = 86_400_000;
