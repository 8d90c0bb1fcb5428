import { rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { Hono } from 'hono';
import { HTTPException } from 'hono/http-exception';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { HealthResponse, SiteSummary } from '../../src/schema';
import { createApp } from '../../src/server/app';
import { type Database, openDatabase } from '../../src/server/db';
import { ApiError, type LogEntry } from '../../src/server/errors';
import {
  FAKE_ASSET_JS,
  FAKE_ASSET_PATH,
  FAKE_INDEX_HTML,
  FAKE_MANIFEST,
  FAKE_SW_JS,
  makeTempDir,
  writeFakeDist,
} from './fixtures';

const VERSION = '9.8.7-test';
const SITE_NAME = 'Test Ridge Booster Station';
const SECRET = 'TRAVERSAL-MARKER-7f3a';

let temp: ReturnType<typeof makeTempDir>;
let db: Database;
let distDir: string;
let logged: LogEntry[];
let app: Hono;

beforeEach(() => {
  temp = makeTempDir('app');
  distDir = join(temp.path, 'dist');
  writeFakeDist(distDir);
  // Files next to and above dist that a traversal would try to reach.
  writeFileSync(join(temp.path, 'package.json'), JSON.stringify({ secret: SECRET }));
  writeFileSync(join(temp.path, 'secret.txt'), SECRET);
  writeFileSync(join(distDir, '.env'), `TOKEN=${SECRET}`);
  db = openDatabase(join(temp.path, 'data'));
  logged = [];
  app = createApp({ db, distDir, version: VERSION, siteName: SITE_NAME, log: (entry) => logged.push(entry) });
});
afterEach(() => {
  if (db.open) db.close();
  temp.remove();
});

/** Content-Security-Policy as directive → sources, for order-independent comparison. */
function parseCsp(header: string | null): Record<string, string[]> {
  expect(header).not.toBeNull();
  const directives: Record<string, string[]> = {};
  for (const part of (header ?? '').split(';')) {
    const [name, ...sources] = part.trim().split(/\s+/);
    if (name) directives[name] = sources;
  }
  return directives;
}

describe('GET /api/v1/health', () => {
  it('should answer 200 with exactly ok, version and database', async () => {
    const res = await app.request('/api/v1/health');
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ ok: true, version: VERSION, database: 'ok' });
    expect(res.headers.get('Cache-Control')).toBe('no-store');
    expect(res.headers.get('Content-Type')).toMatch(/^application\/json/);
  });

  it('should answer 503 once the database is closed', async () => {
    db.close();
    const res = await app.request('/api/v1/health');
    // source: RFC 9110 section 15.6.4 (503 Service Unavailable: temporarily unable to handle the request)
    expect(res.status).toBe(503);
    expect(await res.json()).toEqual({ ok: false, version: VERSION, database: 'unavailable' });
    expect(res.headers.get('Cache-Control')).toBe('no-store');
  });

  it("should match the client's wire schema exactly, up and down", async () => {
    const up = await app.request('/api/v1/health');
    expect(HealthResponse.strict().safeParse(await up.json()).success).toBe(true);
    db.close();
    const down = await app.request('/api/v1/health');
    expect(HealthResponse.strict().safeParse(await down.json()).success).toBe(true);
    const site = await app.request('/api/v1/site');
    expect(SiteSummary.strict().safeParse(await site.json()).success).toBe(true);
  });

  it('should answer HEAD like GET without a body', async () => {
    const res = await app.request('/api/v1/health', { method: 'HEAD' });
    expect(res.status).toBe(200);
    expect(await res.text()).toBe('');
  });

  it('should answer 405 with Allow for a wrong method', async () => {
    const res = await app.request('/api/v1/health', { method: 'POST' });
    // source: RFC 9110 section 15.5.6 (a 405 response must carry an Allow header)
    expect(res.status).toBe(405);
    expect(res.headers.get('Allow')).toBe('GET, HEAD');
    expect(res.headers.get('Cache-Control')).toBe('no-store');
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe('E_METHOD_NOT_ALLOWED');
    expect(body.error.message).toMatch(/POST/);
  });
});

describe('GET /api/v1/site', () => {
  it('should answer the configured site name', async () => {
    const res = await app.request('/api/v1/site');
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ name: SITE_NAME });
    expect(res.headers.get('Cache-Control')).toBe('no-store');
  });

  it('should answer 405 for DELETE', async () => {
    const res = await app.request('/api/v1/site', { method: 'DELETE' });
    expect(res.status).toBe(405);
    expect(res.headers.get('Allow')).toBe('GET, HEAD');
  });
});

describe('unknown API paths', () => {
  it.each(['/api/v1/nothing-here', '/api', '/api/v2/health', '/api/v1/health/extra'])(
    'should answer %s with a JSON 404 that is not cached',
    async (path) => {
      const res = await app.request(path);
      expect(res.status).toBe(404);
      expect(res.headers.get('Cache-Control')).toBe('no-store');
      const body = (await res.json()) as { error: { code: string; message: string } };
      expect(body.error.code).toBe('E_NOT_FOUND');
      expect(body.error.message).toContain(path);
    },
  );

  it('should not fall back to the app shell for an unknown API path', async () => {
    const res = await app.request('/api/v1/rounds/123', { headers: { Accept: 'text/html' } });
    expect(res.status).toBe(404);
    expect(await res.text()).not.toContain('Crankhouse test shell');
  });
});

describe('errors', () => {
  it('should turn a thrown error into a generic 500 and log the detail with a UTC time', async () => {
    app.get('/api/v1/boom', () => {
      throw new Error('detail only for the log: /var/lib/secret');
    });
    const res = await app.request('/api/v1/boom');
    expect(res.status).toBe(500);
    const text = await res.text();
    expect(JSON.parse(text)).toEqual({ error: { code: 'E_INTERNAL', message: 'Internal server error' } });
    expect(text).not.toContain('secret');
    expect(text).not.toMatch(/\bat\s/);
    expect(res.headers.get('Cache-Control')).toBe('no-store');

    expect(logged).toHaveLength(1);
    const entry = logged[0] ?? {};
    expect(String(entry.error)).toContain('detail only for the log');
    expect(entry.path).toBe('/api/v1/boom');
    // source: ISO 8601 / RFC 3339 section 5.6 ("Z" marks UTC)
    expect(String(entry.time)).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(\.\d+)?Z$/);
  });

  it('should write one JSON line to stderr when no logger is given', async () => {
    const plain = createApp({ db, distDir, version: VERSION, siteName: SITE_NAME });
    plain.get('/api/v1/boom', () => {
      throw new Error('stderr detail');
    });
    const write = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      const res = await plain.request('/api/v1/boom');
      expect(res.status).toBe(500);
      expect(write).toHaveBeenCalledTimes(1);
      const line = String(write.mock.calls[0]?.[0]);
      expect(line.endsWith('\n')).toBe(true);
      expect(line.trim()).not.toContain('\n');
      expect(JSON.parse(line).error).toContain('stderr detail');
    } finally {
      write.mockRestore();
    }
  });

  it('should pass an ApiError client error through with its code and headers', async () => {
    app.get('/api/v1/teapot', () => {
      throw new ApiError(409, 'E_CONFLICT', 'Record 42 already exists with other content', {
        headers: { 'Retry-After': '3' },
      });
    });
    const res = await app.request('/api/v1/teapot');
    expect(res.status).toBe(409);
    expect(res.headers.get('Retry-After')).toBe('3');
    expect(await res.json()).toEqual({
      error: { code: 'E_CONFLICT', message: 'Record 42 already exists with other content' },
    });
    // A refused request is logged as one warning line without a stack (OWASP ASVS 5.0 16.3.3).
    expect(logged).toHaveLength(1);
    expect(logged[0]).toMatchObject({ level: 'warn', event: 'request-refused', status: 409, code: 'E_CONFLICT' });
    expect(logged[0]?.stack).toBeUndefined();
  });

  it("should map Hono's HTTPException client errors to a JSON error", async () => {
    app.post('/api/v1/upload', () => {
      throw new HTTPException(413, { message: 'Body is larger than 1 MiB' });
    });
    const res = await app.request('/api/v1/upload', { method: 'POST' });
    // source: RFC 9110 section 15.5.14 (413 Content Too Large)
    expect(res.status).toBe(413);
    expect(await res.json()).toEqual({ error: { code: 'E_PAYLOAD_TOO_LARGE', message: 'Body is larger than 1 MiB' } });
  });

  it('should refuse an ApiError with a status or code outside the contract', () => {
    expect(() => new ApiError(200 as 400, 'E_OK', 'fine')).toThrow(RangeError);
    expect(() => new ApiError(400, 'bad-code', 'x')).toThrow(/E_SOMETHING/);
  });
});

describe('security headers', () => {
  // source: CSP Level 3 (w3.org/TR/CSP3) directive names; OWASP ASVS 5.0 V3.4 (strict CSP without unsafe-inline/eval)
  const pageCsp = {
    'default-src': ["'self'"],
    'script-src': ["'self'"],
    'style-src': ["'self'"],
    'img-src': ["'self'", 'data:', 'blob:'],
    'font-src': ["'self'"],
    'connect-src': ["'self'"],
    'worker-src': ["'self'"],
    'manifest-src': ["'self'"],
    'object-src': ["'none'"],
    'base-uri': ["'none'"],
    'form-action': ["'self'"],
    'frame-ancestors': ["'none'"],
  };

  it('should send the page CSP and the hardening headers on /', async () => {
    const res = await app.request('/');
    expect(res.status).toBe(200);
    const csp = res.headers.get('Content-Security-Policy');
    expect(parseCsp(csp)).toEqual(pageCsp);
    expect(csp).not.toMatch(/unsafe-inline|unsafe-eval/);
    // source: MDN X-Content-Type-Options ("nosniff" is the only directive)
    expect(res.headers.get('X-Content-Type-Options')).toBe('nosniff');
    expect(res.headers.get('Referrer-Policy')).toBe('no-referrer');
    expect(res.headers.get('X-Frame-Options')).toBe('DENY');
    // source: RFC 6797 section 6.1 (max-age in seconds; 31536000 s = 365 days)
    expect(res.headers.get('Strict-Transport-Security')).toBe('max-age=31536000; includeSubDomains');
    expect(res.headers.get('Cross-Origin-Opener-Policy')).toBe('same-origin');
    // source: W3C Permissions Policy, structured header syntax: feature=(self) allows the origin, feature=() denies all
    const permissions = res.headers.get('Permissions-Policy') ?? '';
    expect(permissions).toContain('camera=(self)');
    expect(permissions).toContain('geolocation=()');
    expect(permissions).toContain('microphone=()');
  });

  it('should give sw.js its own CSP, without the page-only directives', async () => {
    const res = await app.request('/sw.js');
    expect(res.status).toBe(200);
    expect(await res.text()).toBe(FAKE_SW_JS);
    const csp = res.headers.get('Content-Security-Policy');
    const directives = parseCsp(csp);
    expect(directives['default-src']).toEqual(["'self'"]);
    expect(directives['script-src']).toEqual(["'self'"]);
    expect(directives['connect-src']).toEqual(["'self'"]);
    expect(directives['frame-ancestors']).toBeUndefined();
    expect(csp).not.toMatch(/unsafe-inline|unsafe-eval/);
    expect(res.headers.get('X-Content-Type-Options')).toBe('nosniff');
  });

  it.each(['/api/v1/health', '/api/v1/missing', '/rounds/123', FAKE_ASSET_PATH, '/assets/missing.js'])(
    'should send nosniff, HSTS and a CSP on %s',
    async (path) => {
      const res = await app.request(path);
      expect(res.headers.get('X-Content-Type-Options')).toBe('nosniff');
      expect(res.headers.get('Strict-Transport-Security')).toMatch(/^max-age=31536000/);
      expect(parseCsp(res.headers.get('Content-Security-Policy'))['frame-ancestors']).toEqual(["'none'"]);
    },
  );
});

describe('static files', () => {
  it('should serve index.html at / and /index.html with no-cache', async () => {
    for (const path of ['/', '/index.html']) {
      const res = await app.request(path);
      expect(res.status).toBe(200);
      expect(await res.text()).toBe(FAKE_INDEX_HTML);
      expect(res.headers.get('Content-Type')).toMatch(/^text\/html/);
      // source: RFC 9111 section 5.2.2.4 (no-cache: a cache must revalidate before reuse)
      expect(res.headers.get('Cache-Control')).toBe('no-cache');
    }
  });

  it('should serve sw.js with no-cache so a deploy is picked up', async () => {
    const res = await app.request('/sw.js');
    expect(res.headers.get('Cache-Control')).toBe('no-cache');
    expect(res.headers.get('Content-Type')).toMatch(/^text\/javascript/);
  });

  it('should serve hashed assets as immutable for a year', async () => {
    const res = await app.request(FAKE_ASSET_PATH);
    expect(res.status).toBe(200);
    expect(await res.text()).toBe(FAKE_ASSET_JS);
    // source: RFC 8246 (immutable) and RFC 9111 section 5.2.2.1 (max-age in seconds)
    expect(res.headers.get('Cache-Control')).toBe('public, max-age=31536000, immutable');
  });

  it('should serve the manifest as application/manifest+json with no-cache', async () => {
    const res = await app.request('/app.webmanifest');
    expect(res.status).toBe(200);
    expect(await res.text()).toBe(FAKE_MANIFEST);
    // source: W3C Web Application Manifest, "Media type registration" (application/manifest+json)
    expect(res.headers.get('Content-Type')).toBe('application/manifest+json');
    expect(res.headers.get('Cache-Control')).toBe('no-cache');
  });

  it('should serve icons with no-cache', async () => {
    const res = await app.request('/icons/icon-192.png');
    expect(res.status).toBe(200);
    expect(res.headers.get('Content-Type')).toBe('image/png');
    expect(res.headers.get('Cache-Control')).toBe('no-cache');
  });

  it('should answer an in-app route with the app shell', async () => {
    for (const path of ['/rounds/123', '/rounds/abc/readings', '/settings']) {
      const res = await app.request(path, { headers: { Accept: 'text/html' } });
      expect(res.status).toBe(200);
      expect(await res.text()).toBe(FAKE_INDEX_HTML);
      expect(res.headers.get('Cache-Control')).toBe('no-cache');
    }
  });

  it('should answer a missing file with a plain 404, never the app shell', async () => {
    for (const path of ['/assets/missing.js', '/assets/x-abc123.css', '/favicon.ico']) {
      const res = await app.request(path);
      expect(res.status).toBe(404);
      expect(await res.text()).not.toContain('Crankhouse test shell');
    }
  });

  it('should not serve hidden files', async () => {
    const res = await app.request('/.env');
    expect(res.status).toBe(404);
    expect(await res.text()).not.toContain(SECRET);
  });

  it.each([
    '/../package.json',
    '/%2e%2e/package.json',
    '/.%2e/secret.txt',
    '/assets/..%2f..%2fpackage.json',
    '/assets/%2e%2e%2f%2e%2e%2fsecret.txt',
    '/..%5csecret.txt',
    '/assets/..%5c..%5cpackage.json',
    '/%2e%2e%2fsecret.txt',
  ])('should never read outside dist for %s', async (path) => {
    const res = await app.request(`http://localhost${path}`);
    expect(res.status).toBe(404);
    expect(await res.text()).not.toContain(SECRET);
  });

  it('should answer 405 for a write method on a page path', async () => {
    const res = await app.request('/', { method: 'POST' });
    expect(res.status).toBe(405);
    expect(res.headers.get('Allow')).toBe('GET, HEAD');
  });

  it('should answer 503 with build instructions when dist has no index.html', async () => {
    rmSync(join(distDir, 'index.html'));
    for (const path of ['/', '/rounds/123']) {
      const res = await app.request(path);
      expect(res.status).toBe(503);
      expect(await res.text()).toContain('npm run build');
      expect(res.headers.get('Cache-Control')).toBe('no-store');
    }
  });

  it('should answer 503 when the dist folder does not exist at all', async () => {
    const missing = join(temp.path, 'never-built');
    const error = vi.spyOn(console, 'error').mockImplementation(() => {});
    try {
      const bare = createApp({ db, distDir: missing, version: VERSION, siteName: SITE_NAME, log: () => {} });
      const res = await bare.request('/');
      expect(res.status).toBe(503);
      expect(await res.text()).toContain('npm run build');
    } finally {
      error.mockRestore();
    }
  });

  it('should treat a path that only starts with "api" as a page', async () => {
    const res = await app.request('/apiary');
    expect(res.status).toBe(200);
    expect(await res.text()).toBe(FAKE_INDEX_HTML);
  });
});
