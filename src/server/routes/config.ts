import { Hono } from 'hono';
import { SiteConfig } from '../../schema';
import { ApiError, methodNotAllowed } from '../errors';
import { limitBody, readJson, validate } from '../http';
import { MAX_BATCH_BYTES } from '../ingest';
import { insertConfig, latestConfig } from '../records';
import { ROLES } from '../roles';
import type { Services } from '../services';
import { type AuthEnv, requireAuth } from '../sessions';

/**
 * `GET /config`: the current site configuration, for anyone signed in. `PUT /config`: a supervisor or admin
 * publishes a new version; it must validate and be newer than the current one (else 409). Older versions are kept.
 */
export function configRoutes(services: Services): Hono<AuthEnv> {
  const routes = new Hono<AuthEnv>();
  const currentVersion = services.db.prepare<[], { version: number | null }>(
    'SELECT max(version) AS version FROM site_configs',
  );

  routes.get('/config', requireAuth(services, ROLES), (c) => {
    const config = latestConfig(services.db);
    if (!config) throw new ApiError(404, 'E_NOT_FOUND', 'No site configuration has been published yet');
    return c.json(config);
  });

  routes.put(
    '/config',
    requireAuth(services, ['supervisor', 'admin']),
    limitBody(MAX_BATCH_BYTES, 'a site configuration must fit in 2 MiB'),
    async (c) => {
      const config = validate(SiteConfig, await readJson(c), 'The site configuration');
      const now = services.now();
      services.db
        .transaction(() => {
          const current = currentVersion.get()?.version ?? 0;
          if (config.version <= current) {
            throw new ApiError(
              409,
              'E_CONFLICT',
              `Version ${config.version} is not newer than the current version ${current}; publish it as version ${current + 1} or later`,
            );
          }
          insertConfig(services.db, config, now.toISOString());
        })
        .immediate();
      const principal = c.get('principal');
      services.log({
        time: now.toISOString(),
        level: 'info',
        event: 'config-published',
        version: config.version,
        user: principal.userId,
      });
      return c.json(config, 200);
    },
  );
  routes.all('/config', methodNotAllowed('GET', 'HEAD', 'PUT'));
  return routes;
}
