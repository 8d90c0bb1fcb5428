import type { ErrorHandler, Handler } from 'hono';
import { HTTPException } from 'hono/http-exception';
import type { ContentfulStatusCode } from 'hono/utils/http-status';

/** One structured log line. `time` is always an ISO 8601 UTC timestamp. */
export type LogEntry = Record<string, unknown>;
export type Logger = (entry: LogEntry) => void;

/** The wire shape of every API error body. */
export interface ApiErrorBody {
  error: { code: string; message: string };
}

const CODE_PATTERN = /^E_[A-Z0-9_]+$/;

/**
 * An error a route throws on purpose. `message` is sent to the client, so it must be safe to show;
 * put internal detail in `cause`, which is logged (for 5xx) and never sent.
 */
export class ApiError extends Error {
  readonly status: ContentfulStatusCode;
  readonly code: string;
  readonly headers: Readonly<Record<string, string>>;

  constructor(
    status: ContentfulStatusCode,
    code: string,
    message: string,
    options: { cause?: unknown; headers?: Record<string, string> } = {},
  ) {
    super(message, { cause: options.cause });
    if (!Number.isInteger(status) || status < 400 || status > 599) {
      throw new RangeError(`ApiError status must be an HTTP error status (400-599), got ${status}`);
    }
    if (!CODE_PATTERN.test(code)) {
      throw new RangeError(`ApiError code must look like E_SOMETHING (upper case), got "${code}"`);
    }
    this.name = 'ApiError';
    this.status = status;
    this.code = code;
    this.headers = { ...options.headers };
  }
}

const CODES_BY_STATUS: Readonly<Record<number, string>> = {
  400: 'E_BAD_REQUEST',
  401: 'E_UNAUTHORIZED',
  403: 'E_FORBIDDEN',
  404: 'E_NOT_FOUND',
  405: 'E_METHOD_NOT_ALLOWED',
  409: 'E_CONFLICT',
  413: 'E_PAYLOAD_TOO_LARGE',
  415: 'E_UNSUPPORTED_MEDIA_TYPE',
  422: 'E_UNPROCESSABLE',
  429: 'E_TOO_MANY_REQUESTS',
};

/** Refused sign-ins and tokens (401, 403, 429) are logged where they happen, with the reason and client address. */
const LOGGED_AT_SOURCE: ReadonlySet<number> = new Set([401, 403, 429]);

const INTERNAL_BODY: ApiErrorBody = { error: { code: 'E_INTERNAL', message: 'Internal server error' } };

/** Writes one JSON line to stderr. */
export const logToStderr: Logger = (entry) => {
  process.stderr.write(`${JSON.stringify(entry)}\n`);
};

function errorDetail(err: unknown): Record<string, unknown> {
  if (!(err instanceof Error)) return { error: String(err) };
  const detail: Record<string, unknown> = { error: `${err.name}: ${err.message}`, stack: err.stack };
  if (err.cause !== undefined) detail.cause = errorDetail(err.cause);
  return detail;
}

/**
 * The one place thrown errors become responses. Client errors keep their code and message;
 * anything else becomes a generic 500 whose detail goes only to the log.
 */
export function errorHandler(log: Logger): ErrorHandler {
  return (err, c) => {
    if (err instanceof ApiError) {
      if (err.status < 500 && !LOGGED_AT_SOURCE.has(err.status)) {
        log({
          time: new Date().toISOString(),
          level: 'warn',
          event: 'request-refused',
          status: err.status,
          code: err.code,
          method: c.req.method,
          path: c.req.path,
          message: err.message.slice(0, 300),
        });
      }
      if (err.status >= 500) {
        log({
          time: new Date().toISOString(),
          level: 'error',
          method: c.req.method,
          path: c.req.path,
          ...errorDetail(err),
        });
      }
      const body: ApiErrorBody = { error: { code: err.code, message: err.message } };
      return c.json(body, err.status, err.headers);
    }
    if (err instanceof HTTPException && err.status < 500) {
      log({
        time: new Date().toISOString(),
        level: 'warn',
        event: 'request-refused',
        status: err.status,
        method: c.req.method,
        path: c.req.path,
      });
      const body: ApiErrorBody = {
        error: { code: CODES_BY_STATUS[err.status] ?? 'E_BAD_REQUEST', message: err.message || 'Bad request' },
      };
      return c.json(body, err.status);
    }
    log({
      time: new Date().toISOString(),
      level: 'error',
      msg: 'unhandled error',
      method: c.req.method,
      path: c.req.path,
      ...errorDetail(err),
    });
    return c.json(INTERNAL_BODY, 500);
  };
}

/** Answers a known path called with the wrong method. */
export function methodNotAllowed(...allowed: string[]): Handler {
  const allow = allowed.join(', ');
  return (c) => {
    throw new ApiError(405, 'E_METHOD_NOT_ALLOWED', `${c.req.method} is not allowed here; use ${allow}`, {
      headers: { Allow: allow },
    });
  };
}
