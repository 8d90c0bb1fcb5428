import { Hono } from 'hono';
import { z } from 'zod';
import { ApiError, methodNotAllowed } from '../errors';
import { limitBody, queryOf, readJson, validate } from '../http';
import { MAX_BATCH_BYTES, MAX_BATCH_RECORDS } from '../ingest';
import { DEFAULT_PULL_LIMIT, MAX_PULL_LIMIT } from '../records';
import { ROLES, readScope } from '../roles';
import type { Services } from '../services';
import { type AuthEnv, requireAuth } from '../sessions';

const PushBody = z.strictObject({
  records: z
    .array(z.unknown())
    .max(MAX_BATCH_RECORDS, `holds at most ${MAX_BATCH_RECORDS} records; send the rest in another batch`),
});

const wholeNumber = (name: string, min: number, max: number) =>
  z
    .string()
    .regex(/^\d{1,15}$/, `${name} must be a whole number`)
    .transform(Number)
    .refine((n) => n >= min && n <= max, `${name} must be from ${min} to ${max}`);

const PullQuery = z.strictObject({
  after: wholeNumber('after', 0, Number.MAX_SAFE_INTEGER).optional(),
  limit: wholeNumber('limit', 1, MAX_PULL_LIMIT).optional(),
});

/**
 * `POST /records`: a batch from a device, one result per record in order. `GET /records?after=&limit=`: what the
 * reader may see after a sequence number, in order, with the cursor for the next page.
 */
export function recordRoutes(services: Services): Hono<AuthEnv> {
  const routes = new Hono<AuthEnv>();
  routes.post(
    '/records',
    requireAuth(services, ROLES),
    limitBody(MAX_BATCH_BYTES, `send at most ${MAX_BATCH_RECORDS} records and split a larger backlog into batches`),
    async (c) => {
      const value = await readJson(c);
      if (value === null || typeof value !== 'object' || Array.isArray(value)) {
        throw new ApiError(400, 'E_VALIDATION', 'The body must be an object { "records": [ … ] }');
      }
      const body = validate(PushBody, value, 'The batch');
      const principal = c.get('principal');
      const results = services.ingestor.ingest(
        body.records,
        { userId: principal.userId, deviceId: principal.deviceId, roles: principal.roles },
        services.now().toISOString(),
      );
      return c.json({ results });
    },
  );
  routes.get('/records', requireAuth(services, ROLES), (c) => {
    const query = validate(PullQuery, queryOf(c), 'The query');
    const principal = c.get('principal');
    const text = services.pull.page(
      { userId: principal.userId, scope: readScope(principal.roles) },
      query.after ?? 0,
      query.limit ?? DEFAULT_PULL_LIMIT,
    );
    return c.body(text, 200, { 'Content-Type': 'application/json; charset=UTF-8' });
  });
  routes.all('/records', methodNotAllowed('GET', 'HEAD', 'POST'));
  return routes;
}
