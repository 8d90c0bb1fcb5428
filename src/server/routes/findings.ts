import { Hono } from 'hono';
import { z } from 'zod';
import { ConfigId, IsoTime } from '../../schema';
import { ApiError, methodNotAllowed } from '../errors';
import { queryOf, validate } from '../http';
import type { Services } from '../services';
import { type AuthEnv, requireAuth } from '../sessions';

export const MAX_FINDINGS = 1000;
export const DEFAULT_FINDINGS = 500;

const FindingsQueryParams = z.strictObject({
  machine: ConfigId.optional(),
  severity: z.enum(['watch', 'alarm', 'trip']).optional(),
  state: z.enum(['open', 'reviewed']).optional(),
  from: IsoTime.optional(),
  to: IsoTime.optional(),
  limit: z
    .string()
    .regex(/^\d{1,4}$/, 'must be a whole number')
    .transform(Number)
    .refine((n) => n >= 1 && n <= MAX_FINDINGS, `must be from 1 to ${MAX_FINDINGS}`)
    .optional(),
});

/**
 * `GET /findings`: findings the server computed, for supervisors and admins, newest round first. Filters: machine
 * id, minimum severity (watch when not given: ok findings are kept but not listed), review state, and the round's
 * finish time from/to (inclusive).
 */
export function findingRoutes(services: Services): Hono<AuthEnv> {
  const routes = new Hono<AuthEnv>();
  routes.get('/findings', requireAuth(services, ['supervisor', 'admin']), (c) => {
    const query = validate(FindingsQueryParams, queryOf(c), 'The query');
    const fromMs = query.from === undefined ? undefined : Date.parse(query.from);
    const toMs = query.to === undefined ? undefined : Date.parse(query.to);
    if (fromMs !== undefined && toMs !== undefined && fromMs > toMs) {
      throw new ApiError(400, 'E_VALIDATION', 'The query is not valid: from is after to');
    }
    const result = services.findings.run({
      minSeverity: query.severity ?? 'watch',
      limit: query.limit ?? DEFAULT_FINDINGS,
      ...(query.machine === undefined ? {} : { machine: query.machine }),
      ...(query.state === undefined ? {} : { state: query.state }),
      ...(fromMs === undefined ? {} : { fromMs }),
      ...(toMs === undefined ? {} : { toMs }),
    });
    return c.json(result);
  });
  routes.all('/findings', methodNotAllowed('GET', 'HEAD'));
  return routes;
}
