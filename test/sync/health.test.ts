import { describe, expect, it } from 'vitest';
import { HEALTH_PATH, probeServer } from '../../src/sync/health';

const json = (status: number, body: unknown) =>
  new Response(JSON.stringify(body), { status, headers: { 'Content-Type': 'application/json' } });

describe('probeServer', () => {
  it('reports a reachable server with its version when the health body matches the contract', async () => {
    const requested: string[] = [];
    const result = await probeServer({
      fetch: async (url) => {
        requested.push(String(url));
        return json(200, { ok: true, version: '1.2.3', database: 'ok' });
      },
      now: () => 42,
    });
    expect(requested).toEqual([HEALTH_PATH]);
    expect(result).toEqual({ reachable: true, checkedAt: 42, serverVersion: '1.2.3', database: 'ok' });
  });

  it('treats a 503 with a valid body as reachable with the database unavailable', async () => {
    const result = await probeServer({
      fetch: async () => json(503, { ok: false, version: '1', database: 'unavailable' }),
    });
    expect(result).toMatchObject({ reachable: true, database: 'unavailable' });
  });

  it('reports a network failure without throwing', async () => {
    const result = await probeServer({
      fetch: async () => {
        throw new TypeError('Failed to fetch');
      },
    });
    expect(result).toMatchObject({ reachable: false, reason: 'network', detail: 'Failed to fetch' });
  });

  it('gives up after the timeout when the server never answers', async () => {
    const result = await probeServer({
      timeoutMs: 20,
      fetch: (_url, init) =>
        new Promise((_resolve, reject) => {
          init?.signal?.addEventListener('abort', () => reject(new DOMException('aborted', 'AbortError')));
        }),
    });
    expect(result).toMatchObject({ reachable: false, reason: 'timeout', detail: 'no answer within 20 ms' });
  });

  it('does not mistake a captive portal or proxy page for the server', async () => {
    const html = await probeServer({
      fetch: async () => new Response('<html>Sign in to Wi-Fi</html>', { status: 200 }),
    });
    expect(html).toMatchObject({ reachable: false, reason: 'malformed' });
    const wrongShape = await probeServer({ fetch: async () => json(200, { status: 'up' }) });
    expect(wrongShape).toMatchObject({ reachable: false, reason: 'malformed' });
  });

  it('reports other HTTP errors as unreachable', async () => {
    const result = await probeServer({ fetch: async () => json(502, { ok: false, version: '1', database: 'ok' }) });
    expect(result).toMatchObject({ reachable: false, reason: 'http', detail: 'HTTP 502' });
  });
});
