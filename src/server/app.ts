import { Hono } from 'hono';
import type { Database } from './db';
import { type ApiErrorBody, errorHandler, type Logger, logToStderr } from './errors';
import { configRoutes } from './routes/config';
import { findingRoutes } from './routes/findings';
import { healthRoutes } from './routes/health';
import { recordRoutes } from './routes/records';
import { sessionRoutes } from './routes/sessions';
import { siteRoutes } from './routes/site';
import { appShellOrNotFound, isApiPath, staticFiles } from './routes/static';
import { securityHeaders } from './security';
import { createServices } from './services';
import type { SignInThrottle } from './sessions';

export interface AppDeps {
  db: Database;
  /** The Vite build output: index.html, sw.js, app.webmanifest, icons/, assets/. */
  distDir: string;
  version: string;
  siteName: string;
  log?: Logger;
  /** The clock for sessions, sign-in throttling and receive times; tests move it. */
  now?: () => Date;
  /** Failed sign-in limits; the default allows 5 per user id and 20 per client address in 15 minutes. */
  throttle?: SignInThrottle;
}

/** Builds the HTTP app without listening; `main.ts` serves it, tests call `app.request()`. */
export function createApp(deps: AppDeps): Hono {
  const app = new Hono();
  const log = deps.log ?? logToStderr;
  const services = createServices(deps.db, {
    log,
    ...(deps.now ? { now: deps.now } : {}),
    ...(deps.throttle ? { throttle: deps.throttle } : {}),
  });

  app.use('*', securityHeaders());
  app.use('/api/*', async (c, next) => {
    await next();
    c.res.headers.set('Cache-Control', 'no-store');
  });

  // API routes, one file per resource, all under /api/v1.
  app.route('/api/v1', healthRoutes(deps));
  app.route('/api/v1', siteRoutes(deps));
  app.route('/api/v1', sessionRoutes(services));
  app.route('/api/v1', recordRoutes(services));
  app.route('/api/v1', configRoutes(services));
  app.route('/api/v1', findingRoutes(services));

  app.use('*', staticFiles(deps.distDir));

  // Fallbacks live in notFound rather than catch-all routes, so routes registered later still match.
  app.notFound((c) => {
    if (isApiPath(c.req.path)) {
      const body: ApiErrorBody = { error: { code: 'E_NOT_FOUND', message: `No API endpoint at ${c.req.path}` } };
      return c.json(body, 404);
    }
    return appShellOrNotFound(c, deps.distDir);
  });
  app.onError(errorHandler(log));
  return app;
}
