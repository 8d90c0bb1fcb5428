/** Reading request bodies and query strings: size limit, JSON, nesting depth, and clear 4xx errors. */
import type { Context, MiddlewareHandler } from 'hono';
import { bodyLimit } from 'hono/body-limit';
import type { z } from 'zod';
import { describeIssues } from '../schema';
import { ApiError } from './errors';

/** Bodies nested deeper than this are refused before any schema sees them (no record comes near it). */
export const MAX_JSON_DEPTH = 64;

function formatBytes(bytes: number): string {
  return bytes >= 1024 * 1024 ? `${bytes / (1024 * 1024)} MiB` : `${bytes / 1024} KiB`;
}

/**
 * Refuses a body over `maxBytes` with 413: at once from Content-Length, or as soon as a streamed body passes the
 * limit, so an oversized body is never buffered whole.
 */
export function limitBody(maxBytes: number, what: string): MiddlewareHandler {
  return bodyLimit({
    maxSize: maxBytes,
    onError: () => {
      throw new ApiError(413, 'E_PAYLOAD_TOO_LARGE', `The body is larger than ${formatBytes(maxBytes)}; ${what}`);
    },
  });
}

/** True when `value` nests arrays or objects deeper than `max` (walked without recursion). */
export function nestedDeeperThan(value: unknown, max: number): boolean {
  const items: unknown[] = [value];
  const depths: number[] = [1];
  while (items.length > 0) {
    const item = items.pop();
    const depth = depths.pop() as number;
    if (item === null || typeof item !== 'object') continue;
    if (depth > max) return true;
    if (Array.isArray(item)) {
      for (const child of item) {
        if (child !== null && typeof child === 'object') {
          items.push(child);
          depths.push(depth + 1);
        }
      }
    } else {
      const record = item as Record<string, unknown>;
      for (const key in record) {
        const child = record[key];
        if (child !== null && typeof child === 'object') {
          items.push(child);
          depths.push(depth + 1);
        }
      }
    }
  }
  return false;
}

/** The body parsed as JSON, or 400 saying it is not JSON or nested too deeply. */
export async function readJson(c: Context): Promise<unknown> {
  const text = await c.req.text();
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new ApiError(400, 'E_BAD_JSON', 'The body is not valid JSON');
  }
  if (nestedDeeperThan(value, MAX_JSON_DEPTH)) {
    throw new ApiError(
      400,
      'E_BAD_REQUEST',
      `The body nests arrays or objects more than ${MAX_JSON_DEPTH} levels deep`,
    );
  }
  return value;
}

/** Validates with a zod schema; 400 with one line per wrong field otherwise. */
export function validate<T extends z.ZodType>(schema: T, value: unknown, what: string): z.output<T> {
  const result = schema.safeParse(value);
  if (!result.success) {
    throw new ApiError(400, 'E_VALIDATION', `${what} is not valid: ${describeIssues(result.error)}`);
  }
  return result.data;
}

/** The query string as one value per name; a repeated name is refused. */
export function queryOf(c: Context): Record<string, string> {
  const all = c.req.queries();
  const single: Record<string, string> = {};
  for (const [name, values] of Object.entries(all)) {
    if (values.length !== 1)
      throw new ApiError(400, 'E_VALIDATION', `The query is not valid: ${name} is given more than once`);
    single[name] = values[0] as string;
  }
  return single;
}
