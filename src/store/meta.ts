/** Small device facts: the device id, the first-save marker and whatever sync keeps (cursors). */
import { StoreError } from './errors';
import { type Ctx, FIRST_SAVE_KEY, read, write } from './tx';
import { invalid } from './validate';

export const DEVICE_ID_KEY = 'deviceId';
/** The last server sequence number pulled; moves only with the pulled records (pulled.ts). */
export const PULL_CURSOR_KEY = 'pullCursor';
/** Keys the store manages itself; setMeta refuses them. */
const RESERVED = new Set([DEVICE_ID_KEY, FIRST_SAVE_KEY, PULL_CURSOR_KEY]);

function checkKey(key: unknown): string {
  if (typeof key !== 'string' || key.length < 1 || key.length > 200) {
    throw invalid('The meta key is not valid: key: must be a text of 1 to 200 characters');
  }
  return key;
}

export async function getMeta(ctx: Ctx, key: string): Promise<unknown> {
  const name = checkKey(key);
  return read(ctx, ['meta'], (tx) => tx.objectStore('meta').get(name));
}

export async function setMeta(ctx: Ctx, key: string, value: unknown): Promise<void> {
  const name = checkKey(key);
  if (RESERVED.has(name)) throw invalid(`The meta key is not valid: key: ${name} is kept by the store itself`);
  if (value === undefined) throw invalid(`The meta value is not valid: ${name}: must not be undefined`);
  await write(ctx, ['meta'], async (tx) => {
    await tx.objectStore('meta').put(value, name);
  });
}

/** This device's id: made once with crypto.randomUUID() and kept; every tab and the worker read the same one. */
export async function deviceId(ctx: Ctx): Promise<string> {
  const existing = await read(ctx, ['meta'], (tx) => tx.objectStore('meta').get(DEVICE_ID_KEY));
  if (typeof existing === 'string') return existing;
  const candidate = crypto.randomUUID();
  return write(ctx, ['meta'], async (tx) => {
    const meta = tx.objectStore('meta');
    // Another tab may have made one since the read above: the first one stored wins.
    const stored = await meta.get(DEVICE_ID_KEY);
    if (typeof stored === 'string') return stored;
    if (stored !== undefined) throw new StoreError('E_STORAGE', 'The stored device id is damaged (not a text).');
    await meta.put(candidate, DEVICE_ID_KEY);
    return candidate;
  });
}
