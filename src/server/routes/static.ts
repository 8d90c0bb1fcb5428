import { readFile } from 'node:fs/promises';
import { join, resolve, sep } from 'node:path';
import { serveStatic } from '@hono/node-server/serve-static';
import type { Context, MiddlewareHandler } from 'hono';

/** Vite puts content-hashed files here, so they can be cached for good. */
const ASSETS_PREFIX = '/assets/';
export const CACHE_IMMUTABLE = 'public, max-age=31536000, immutable';
export const CACHE_REVALIDATE = 'no-cache';

const NOT_BUILT_MESSAGE =
  'Crankhouse has not been built yet. Run `npm run build` on the server, then reload this page.';

export function isApiPath(path: string): boolean {
  return path === '/api' || path.startsWith('/api/');
}

function isReadMethod(method: string): boolean {
  return method === 'GET' || method === 'HEAD';
}

/**
 * The file a request path names inside `root`, or undefined when the path could escape `root`
 * (dot segments, encoded slashes or backslashes, NUL) or names a hidden file.
 */
export function fileInside(root: string, requestPath: string): string | undefined {
  if (/%2f|%5c|%00/i.test(requestPath) || requestPath.includes('\\') || requestPath.includes('\0')) return undefined;
  if (requestPath.split('/').some((segment) => segment.startsWith('.'))) return undefined;
  const file = resolve(root, `.${requestPath}`);
  return file === root || file.startsWith(root + sep) ? file : undefined;
}

/**
 * Serves GET/HEAD requests for files in `distDir`. Hashed `/assets/*` files are immutable; every
 * other file (index.html, sw.js, the manifest, icons) must be revalidated so a deploy shows up.
 * Requests for files that do not exist fall through to the next handler.
 */
export function staticFiles(distDir: string): MiddlewareHandler {
  const root = resolve(distDir);
  const serveFile = serveStatic({ root });
  return async (c, next) => {
    if (!isReadMethod(c.req.method) || isApiPath(c.req.path)) return next();
    if (fileInside(root, c.req.path) === undefined) {
      return c.text('Not found', 404, { 'Cache-Control': CACHE_REVALIDATE });
    }
    const res = await serveFile(c, async () => {});
    if (!res) return next();
    const immutable = c.req.path.startsWith(ASSETS_PREFIX) && res.status < 300;
    res.headers.set('Cache-Control', immutable ? CACHE_IMMUTABLE : CACHE_REVALIDATE);
    return res;
  };
}

/**
 * What a non-API path that matched no file gets: the app shell for in-app navigation
 * (`/rounds/abc`), or a plain 404 when the path names a file (`/assets/gone.js`), so a missing
 * chunk fails loudly instead of parsing HTML as JavaScript.
 */
export async function appShellOrNotFound(c: Context, distDir: string): Promise<Response> {
  if (!isReadMethod(c.req.method)) {
    return c.text(`${c.req.method} is not allowed here; use GET, HEAD`, 405, { Allow: 'GET, HEAD' });
  }
  const lastSegment = c.req.path.slice(c.req.path.lastIndexOf('/') + 1);
  if (lastSegment.includes('.')) return c.text('Not found', 404, { 'Cache-Control': CACHE_REVALIDATE });
  let html: string;
  try {
    html = await readFile(join(resolve(distDir), 'index.html'), 'utf8');
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') {
      return c.text(NOT_BUILT_MESSAGE, 503, { 'Cache-Control': 'no-store' });
    }
    throw err;
  }
  return c.html(html, 200, { 'Cache-Control': CACHE_REVALIDATE });
}
