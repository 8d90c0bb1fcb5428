import { Hono } from 'hono';
import type { SiteSummary } from '../../schema';
import { methodNotAllowed } from '../errors';

/** `GET /site`: public facts the app shell shows before anyone signs in. */
export function siteRoutes(deps: { siteName: string }): Hono {
  const routes = new Hono();
  routes.get('/site', (c) => c.json({ name: deps.siteName } satisfies SiteSummary));
  routes.all('/site', methodNotAllowed('GET', 'HEAD'));
  return routes;
}
