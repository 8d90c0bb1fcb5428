import { StoreError } from './errors';

/** The part of a zod schema this room uses (the room imports schemas from src/schema, never zod itself). */
export interface Schema<T> {
  safeParse(input: unknown): { success: true; data: T } | { success: false; error: Issues };
}
export interface Issues {
  issues: ReadonlyArray<{ path: ReadonlyArray<PropertyKey>; message: string }>;
}

const MAX_LISTED_ISSUES = 8;

/** One line per wrong field, each naming its path under `prefix`: `reading.entered.unit: must be one of …`. */
export function describe(error: Issues, prefix = ''): string {
  const lines = error.issues.map((issue) => {
    const path = [...(prefix ? [prefix] : []), ...issue.path.map(String)].join('.');
    return `${path || '(value)'}: ${issue.message}`;
  });
  const shown = lines.slice(0, MAX_LISTED_ISSUES).join('; ');
  return lines.length > MAX_LISTED_ISSUES ? `${shown}; and ${lines.length - MAX_LISTED_ISSUES} more` : shown;
}

/** Parses `input`, or throws E_INVALID naming every wrong field. Runs before any transaction opens. */
export function parse<T>(schema: Schema<T>, input: unknown, what: string, prefix = what): T {
  const result = schema.safeParse(input);
  if (!result.success) throw new StoreError('E_INVALID', `The ${what} is not valid: ${describe(result.error, prefix)}`);
  return result.data;
}

export function invalid(message: string): StoreError {
  return new StoreError('E_INVALID', message);
}
