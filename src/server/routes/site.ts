import { Hono } from 'hono';
import type { SiteSummary } from '../../schema';
import type { Database } from '../db';
import { methodNotAllowed } from '../errors';
import { latestConfig } from '../records';

/**
 * `GET /site`: public facts the app shell shows before anyone signs in. The name comes from the current site
 * configuration, or from CRANKHOUSE_SITE_NAME while none is published.
 */
export function siteRoutes(deps: { siteName: string; db: Database }): Hono {
  const routes = new Hono();
  routes.get('/site', (c) => {
    let name = deps.siteName;
    try {
      name = latestConfig(deps.db)?.name ?? name;
    } catch {
      // The database is unavailable (the health probe reports that); the shell still gets a name.
    }
    return c.json({ name } satisfies SiteSummary);
  });
  routes.all('/site', methodNotAllowed('GET', 'HEAD'));
  return routes;
}
