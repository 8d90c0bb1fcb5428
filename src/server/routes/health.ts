import { Hono } from 'hono';
import type { HealthResponse } from '../../schema';
import { type Database, databaseHealth } from '../db';
import { methodNotAllowed } from '../errors';

/** `GET /health`: liveness plus a cheap database probe. 503 when the database does not answer. */
export function healthRoutes(deps: { db: Database; version: string }): Hono {
  const routes = new Hono();
  routes.get('/health', (c) => {
    const database = databaseHealth(deps.db);
    const body: HealthResponse = { ok: database === 'ok', version: deps.version, database };
    return c.json(body, database === 'ok' ? 200 : 503);
  });
  routes.all('/health', methodNotAllowed('GET', 'HEAD'));
  return routes;
}
