/**
 * A content hash that ignores key order: SHA-256 over JSON with sorted keys and undefined members left out
 * (what JSON.stringify drops). Written here, apart from the store's own comparison, so the tests do not check the
 * store with its own code.
 */
import { createHash } from 'node:crypto';

function sorted(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(sorted);
  if (value !== null && typeof value === 'object') {
    return Object.fromEntries(
      Object.entries(value)
        .filter(([, member]) => member !== undefined)
        .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
        .map(([key, member]) => [key, sorted(member)]),
    );
  }
  return value;
}

export function stableHash(value: unknown): string {
  return createHash('sha256')
    .update(JSON.stringify(sorted(value)))
    .digest('hex');
}
