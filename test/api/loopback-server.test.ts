/** Browser mode's guards: a one-use secret traded for a separate session cookie (401 without),
 *  Host check (403), writes only as JSON from the app's own origin with the session's key, bodies
 *  cut off as they stream, CSP on every response. */
import { request } from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CSP, KEY_HEADER, startLoopbackServer, type LoopbackServer } from '../../src/api/loopback-server.js';

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

let cookie = '';
let key = '';
const own = (): Record<string, string> => ({ cookie, origin: `http://127.0.0.1:${s.port}`, 'sec-fetch-site': 'same-origin', 'content-type': 'application/json', [KEY_HEADER]: key });

describe('loopback server', () => {
  it('binds 127.0.0.1 on a random port and prints a secret URL', () => {
    expect(s.url).toMatch(new RegExp(`^http://127\\.0\\.0\\.1:${s.port}/\\?token=[A-Za-z0-9_-]{32}$`));
  });
  it('refuses requests without the secret or cookie (401), with a wrong secret (401)', async () => {
    expect((await call('/api/events')).status).toBe(401);
    expect((await call('/?token=wrong')).status).toBe(401);
    expect((await call('/api/events', { cookie: `movesift_session=${s.token}` })).status).toBe(401);
    expect(seen).toEqual([]);
  });
  it('trades the secret, once, for an HttpOnly SameSite cookie of another value, then serves the handler', async () => {
    const r = await call(`/?token=${s.token}`);
    expect(r.status).toBe(303);
    expect(r.headers.location).toBe('/');
    const set = String(r.headers['set-cookie']);
    expect(set).toMatch(/HttpOnly/);
    expect(set).toMatch(/SameSite=Strict/);
    cookie = set.split(';')[0]!;
    expect(cookie).not.toContain(s.token);
    const ok = await call('/api/events', { cookie });
    expect(ok.status).toBe(200);
    expect(ok.headers['content-security-policy']).toBe(CSP);
    key = String(ok.headers[KEY_HEADER]);
    expect(key).toMatch(/^[A-Za-z0-9_-]{32}$/);
    expect(key).not.toBe(s.token);
    // The secret again: the signed-in browser is sent on; anyone else is refused.
    expect((await call(`/?token=${s.token}`, { cookie })).status).toBe(303);
    const again = await call(`/?token=${s.token}`);
    expect(again.status).toBe(401);
    expect(JSON.parse(again.body).code).toBe('E_SECRET_USED');
    expect(again.headers['set-cookie']).toBeUndefined();
    const p = await call('/api/decisions', own(), 'POST', '{"a":1}');
    expect(p.status).toBe(200);
    expect(seen).toEqual(['GET /api/events ', 'POST /api/decisions {"a":1}']);
  });
  it('refuses a write from another origin, another site, as text or a form, or without the key, before the handler sees it', async () => {
    seen.length = 0;
    const cases: Array<[string, Record<string, string>, number, string]> = [
      ['another port of 127.0.0.1', { origin: `http://127.0.0.1:${s.port + 1}` }, 403, 'E_FOREIGN_ORIGIN'],
      ['another site', { origin: 'http://evil.example' }, 403, 'E_FOREIGN_ORIGIN'],
      ['an opaque origin', { origin: 'null' }, 403, 'E_FOREIGN_ORIGIN'],
      ['same-site fetch metadata', { 'sec-fetch-site': 'same-site' }, 403, 'E_FOREIGN_ORIGIN'],
      ['text/plain', { 'content-type': 'text/plain' }, 415, 'E_NOT_JSON'],
      ['a form', { 'content-type': 'application/x-www-form-urlencoded' }, 415, 'E_NOT_JSON'],
      ['no key', { [KEY_HEADER]: '' }, 403, 'E_REQUEST_KEY'],
      ['the secret as the key', { [KEY_HEADER]: s.token }, 403, 'E_REQUEST_KEY'],
    ];
    for (const [what, change, status, code] of cases) {
      const headers = { ...own(), ...change };
      for (const [k, v] of Object.entries(headers)) if (v === '') delete headers[k];
      const r = await call('/api/apply', headers, 'POST', '{"to":"/tmp/x"}');
      expect(r.status, what).toBe(status);
      expect(JSON.parse(r.body).code, what).toBe(code);
    }
    // A program without Origin or fetch metadata, with the cookie, JSON and the key, is let in.
    const { origin: _o, 'sec-fetch-site': _s, ...bare } = own();
    expect((await call('/api/apply', bare, 'POST', '{}')).status).toBe(200);
    expect(seen).toEqual(['POST /api/apply {}']);
  });
  it('cuts off a body past 16 MiB as it streams, declared or not, without reading the rest', async () => {
    seen.length = 0;
    const declared = await call('/api/decisions', { ...own(), 'content-length': String(600 << 20) }, 'POST', '');
    expect(declared.status).toBe(413);
    // Streamed in chunks with no length: refused once 16 MiB have come, long before 64 MiB are sent.
    const sent = await new Promise<{ status: number; sentMiB: number }>((resolve, reject) => {
      let sentMiB = 0;
      const r = request({ host: '127.0.0.1', port: s.port, path: '/api/decisions', method: 'POST', headers: { host: `127.0.0.1:${s.port}`, ...own(), 'transfer-encoding': 'chunked' } }, (res) => {
        res.resume();
        resolve({ status: res.statusCode!, sentMiB });
        r.destroy();
      });
      r.on('error', (e) => (sentMiB > 0 ? undefined : reject(e)));
      const chunk = Buffer.alloc(1 << 20, 0x20);
      const pump = (): void => {
        while (sentMiB < 64) {
          sentMiB++;
          if (!r.write(chunk)) return void r.once('drain', pump);
        }
        r.end();
      };
      pump();
    });
    expect(sent.status).toBe(413);
    expect(sent.sentMiB).toBeLessThan(64);
    expect(seen).toEqual([]);
  });
  it('refuses a foreign Host even with the right cookie (403)', async () => {
    for (const host of ['evil.example', `evil.example:${s.port}`, `127.0.0.1:${s.port + 1}`, `127.0.0.1.evil.example:${s.port}`]) {
      const r = await call('/api/events', { host, cookie });
      expect(r.status, host).toBe(403);
      expect(r.headers['content-security-policy']).toBe(CSP);
    }
  });
});
