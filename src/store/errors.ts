/** Every failure of the store is a StoreError with a code the screens can act on and a message a person can read. */

export type StoreErrorCode =
  /** The input breaks its schema; the message names the field. */
  | 'E_INVALID'
  /** The record is already saved (or its round finished) and a saved record never changes. */
  | 'E_IMMUTABLE'
  /** The id is already used by something else (another round, another kind of record). */
  | 'E_CONFLICT'
  /** The browser refused the write for space (or aborted it without saying why). */
  | 'E_QUOTA'
  | 'E_NOT_FOUND'
  /** A newer version of the app opened the database in another tab; this connection was handed over. */
  | 'E_BLOCKED'
  /** Opening or upgrading the database failed; it stays at its previous version. */
  | 'E_UPGRADE'
  /** close() was called on this store. */
  | 'E_CLOSED'
  /** Any other IndexedDB failure. */
  | 'E_STORAGE';

export class StoreError extends Error {
  override readonly name = 'StoreError';
  constructor(
    readonly code: StoreErrorCode,
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
  }
}

export const QUOTA_MESSAGE =
  'The tablet has no room to save this, so it was not saved. Everything saved before is unchanged. ' +
  'Sync with the server, then free space on the tablet (or clear old browser data), and try again.';

function nameOf(error: unknown): string | undefined {
  return typeof error === 'object' && error !== null && 'name' in error ? String(error.name) : undefined;
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/**
 * Turns what IndexedDB threw into a StoreError. `selfAborted` says whether our own code aborted the transaction:
 * an abort we did not ask for, with no request error, is how a full disk shows up in some engines (reliability P4).
 */
export function storeErrorFrom(error: unknown, selfAborted = false): StoreError {
  if (error instanceof StoreError) return error;
  const name = nameOf(error);
  if (name === 'QuotaExceededError') return new StoreError('E_QUOTA', QUOTA_MESSAGE, { cause: error });
  if ((name === 'AbortError' || error === null || error === undefined) && !selfAborted) {
    return new StoreError('E_QUOTA', QUOTA_MESSAGE, { cause: error });
  }
  if (name === 'ConstraintError') {
    return new StoreError('E_CONFLICT', `The record clashes with one already saved: ${messageOf(error)}`, {
      cause: error,
    });
  }
  if (name === 'DataCloneError') {
    return new StoreError('E_INVALID', `The value cannot be stored: ${messageOf(error)}`, { cause: error });
  }
  if (name === 'InvalidStateError') {
    return new StoreError(
      'E_CLOSED',
      `The database connection is closed; reload the app to open it again (${messageOf(error)})`,
      { cause: error },
    );
  }
  return new StoreError('E_STORAGE', `The tablet's storage failed: ${name ?? 'Error'}: ${messageOf(error)}`, {
    cause: error,
  });
}
