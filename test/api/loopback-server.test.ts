/** Browser mode's guards: token then cookie (401 without), Host check (403), CSP on every response. */
import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CSP, startLoopbackServer, type LoopbackServer } from '../../src/api/loopback-server.js';

let s: LoopbackServer;
const seen: string[] = [];

function call(p: string, headers: Record<string, string> = {}, method = 'GET', body?: string): Promise<{ status: number; headers: Record<string, string | string[] | undefined>; body: string }> {
  return new Promise((resolve, reject) => {
    const r = request({ host: '127.0.0.1', port: s.port, path: p, method, headers: { host: `127.0.0.1:${s.port}`, ...headers } }, (res) => {
      let b = '';
      res.on('data', (c) => (b += c));
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: b }));
    });
    r.on('error', reject);
    r.end(body);
  });
}

beforeAll(async () => {
  s = await startLoopbackServer(async (req) => {
    seen.push(`${req.method} ${new URL(req.url).pathname} ${await req.text()}`);
    return new Response(JSON.stringify({ ok: true }), { headers: { 'content-type': 'application/json' } });
  });
});
afterAll(() => s.close());

describe('loopback server', () => {
  it('binds 127.0.0.1 on a random port and prints a token URL', () => {
    expect(s.url).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${s.port}/\\?token=[A-Za-z0-9_-]{32}$`));
  });
  it('refuses requests without the token or cookie (401), with a wrong token (401)', async () => {
    expect((await call('/api/events')).status).toBe(401);
    expect((await call('/?token=wrong')).status).toBe(401);
    expect((await call('/api/events', { cookie: 'movesift_token=wrong' })).status).toBe(401);
    expect(seen).toEqual([]);
  });
  it('trades the token for an HttpOnly SameSite cookie, then serves the handler', async () => {
    const r = await call(`/?token=${s.token}`);
    expect(r.status).toBe(303);
    expect(r.headers.location).toBe('/');
    const cookie = String(r.headers['set-cookie']);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Strict/);
    const ok = await call('/api/events', { cookie: cookie.split(';')[0] });
    expect(ok.status).toBe(200);
    expect(ok.headers['content-security-policy']).toBe(CSP);
    const p = await call('/api/decisions', { cookie: cookie.split(';')[0], 'content-type': 'application/json' }, 'POST', '{"a":1}');
    expect(p.status).toBe(200);
    expect(seen).toEqual(['GET /api/events ', 'POST /api/decisions {"a":1}']);
  });
  it('refuses a foreign Host even with the right cookie (403)', async () => {
    for (const host of ['evil.example', `evil.example:${s.port}`, `127.0.0.1:${s.port + 1}`, `127.0.0.1.evil.example:${s.port}`]) {
      const r = await call('/api/events', { host, cookie: `movesift_token=${s.token}` });
      expect(r.status, host).toBe(403);
      expect(r.headers['content-security-policy']).toBe(CSP);
    }
  });
});
