/**
 * The review request handler, route by route, on a ledger scanned from sample-media. Range
 * semantics per RFC 9110 section 14 (206 with Content-Range, 416 when unsatisfiable).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Database from 'better-sqlite3';
import { createHandler } from '../../src/api/handler.js';
import { scan } from '../../src/pipeline/scan.js';
import { ROOT, tempDir } from '../helpers/cli.js';

let h: ReturnType<typeof createHandler>;
let ledger: string;
const get = (p: string, init?: RequestInit) => h.handle(new Request(`http://127.0.0.1${p}`, init));
const post = (p: string, body: unknown) => get(p, { method: 'POST', body: typeof body === 'string' ? body : JSON.stringify(body), headers: { 'content-type': 'application/json' } });

beforeAll(async () => {
  ledger = path.join(tempDir('movesift-api-'), 'api.ledger');
  await scan({ roots: [path.join(ROOT, 'sample-media')], ledger });
  h = createHandler({ ledger });
}, 120000);
afterAll(() => h?.close());

describe('events', () => {
  it('pages, filters and sorts', async () => {
    const all = await (await get('/api/events?limit=1000')).json();
    expect(all.total).toBe(25);
    const blank = await (await get('/api/events?verdict=likely-blank')).json();
    expect(blank.events.every((e: { verdict: string }) => e.verdict === 'likely-blank')).toBe(true);
    expect(blank.total).toBe(all.events.filter((e: { verdict: string }) => e.verdict === 'likely-blank').length);
    const page = await (await get('/api/events?sort=score&order=desc&offset=2&limit=5')).json();
    const sorted = [...all.events].sort((a, b) => b.score - a.score);
    expect(page.events.map((e: { score: number }) => e.score)).toEqual(sorted.slice(2, 7).map((e) => e.score));
    const night = await (await get('/api/events?light=infrared&deployment=creek-bend')).json();
    expect(night.total).toBe(12);
    const none = await (await get('/api/events?decision=none&score_min=0.5&score_max=1')).json();
    expect(none.events.every((e: { score: number }) => e.score >= 0.5)).toBe(true);
  });
  it('counts events per deployment, verdict and decision', async () => {
    const rows = (await (await get('/api/deployments')).json()) as Array<{ deployment: string; n: number }>;
    expect(rows.reduce((a, r) => a + r.n, 0)).toBe(25);
    expect(new Set(rows.map((r) => r.deployment))).toEqual(new Set(['creek-bend', 'reef-station', 'ridge-trail']));
  });
  it('rejects bad filters with 400 and a code', async () => {
    for (const q of ['verdict=empty', 'score_min=2', 'score_max=NaN', 'limit=0', 'offset=-1', 'sort=name', 'colour=red', 'decision=maybe']) {
      const r = await get(`/api/events?${q}`);
      expect(r.status, q).toBe(400);
      expect((await r.json()).code).toBe('E_BAD_REQUEST');
    }
  });
  it('returns one event whole, and 400/404 for bad and unknown ids', async () => {
    const { events } = await (await get('/api/events?limit=1')).json();
    const e = await (await get(`/api/events/${events[0].id}`)).json();
    expect(e.media.length).toBe(e.frames);
    expect(e.previews.some((p: { kind: string }) => p.kind === 'heat')).toBe(true);
    expect(e.detail.frames.length).toBeGreaterThan(0);
    expect((await get('/api/events/e000000000000')).status).toBe(404);
    expect((await get('/api/events/nope')).status).toBe(400);
    expect((await get(`/api/events/${events[0].id}`, { method: 'DELETE' })).status).toBe(405);
  });
});

describe('previews and media', () => {
  it('serves previews by event id, kind and position', async () => {
    const { events } = await (await get('/api/events?limit=1')).json();
    const r = await get(`/api/events/${events[0].id}/preview/heat/${(await (await get(`/api/events/${events[0].id}`)).json()).previews.find((p: { kind: string }) => p.kind === 'heat').position}`);
    expect(r.status).toBe(200);
    expect(r.headers.get('content-type')).toBe('image/webp');
    expect(Buffer.from(await r.arrayBuffer()).subarray(8, 12).toString()).toBe('WEBP');
  });
  it('serves originals with range requests', async () => {
    const db = new Database(ledger, { readonly: true });
    const m = db.prepare("SELECT id, rel_path FROM media WHERE kind = 'video'").get() as { id: number; rel_path: string };
    db.close();
    const bytes = readFileSync(path.join(ROOT, 'sample-media', m.rel_path));
    const whole = await get(`/api/media/${m.id}`);
    expect(whole.status).toBe(200);
    expect(whole.headers.get('accept-ranges')).toBe('bytes');
    expect(Buffer.from(await whole.arrayBuffer()).equals(bytes)).toBe(true);
    const part = await get(`/api/media/${m.id}`, { headers: { range: 'bytes=100-199' } });
    expect(part.status).toBe(206);
    expect(part.headers.get('content-range')).toBe(`bytes 100-199/${bytes.length}`);
    expect(Buffer.from(await part.arrayBuffer()).equals(bytes.subarray(100, 200))).toBe(true);
    const tail = await get(`/api/media/${m.id}`, { headers: { range: 'bytes=-50' } });
    expect(Buffer.from(await tail.arrayBuffer()).equals(bytes.subarray(bytes.length - 50))).toBe(true);
    const beyond = await get(`/api/media/${m.id}`, { headers: { range: `bytes=${bytes.length}-` } });
    expect(beyond.status).toBe(416);
    expect(beyond.headers.get('content-range')).toBe(`bytes */${bytes.length}`);
  });
  it('takes no path from the client through any parameter', async () => {
    const { events } = await (await get('/api/events?limit=1')).json();
    for (const p of [
      '/api/media/..%2F..%2Fetc%2Fpasswd', '/api/media/1%2F..%2F..', '/api/events/..%2F..%2Fetc%2Fpasswd',
      `/api/events/${events[0].id}/preview/frame/..%2F..%2Fapi.ledger`, `/api/events/${events[0].id}/preview/..%2Fheat/0`, '/api/events/%E0%A4%A',
      '/api/media/0x10', '/api/media/-1',
    ]) {
      const r = await get(p);
      expect([400, 404], p).toContain(r.status);
      expect(r.headers.get('content-type'), p).toMatch(/json/);
    }
    expect((await get('/api/events?deployment=../../etc')).status).toBe(200); // a filter value, never a path
    expect((await get('/elsewhere')).status).toBe(404);
  });
});

describe('decisions', () => {
  it('writes a batch with the screener snapshot, undoes it, and keeps the log append-only', async () => {
    const { events } = await (await get('/api/events?verdict=likely-blank')).json();
    const ids = events.map((e: { id: string }) => e.id);
    const r = await (await post('/api/decisions', { events: ids, decision: 'set-aside', source: 'bulk', who: 'tester' })).json();
    expect(r).toMatchObject({ written: ids.length, changed: ids.length, missing: [] });
    const after = await (await get('/api/events?decision=set-aside')).json();
    expect(after.total).toBe(ids.length);
    const u = await (await post('/api/decisions/undo', { who: 'tester' })).json();
    expect(u.restored).toBe(ids.length);
    expect((await (await get('/api/events?decision=set-aside')).json()).total).toBe(0);
    expect((await (await post('/api/decisions/undo', {})).json()).batch).toBeNull(); // nothing left to undo
    const db = new Database(ledger, { readonly: true });
    const rows = db.prepare('SELECT decision, source, who, score, verdict, engine_version FROM decisions ORDER BY id').all() as Array<Record<string, unknown>>;
    db.close();
    expect(rows).toHaveLength(2 * ids.length);
    expect(rows[0]).toMatchObject({ decision: 'set-aside', source: 'bulk', who: 'tester', verdict: 'likely-blank', engine_version: expect.any(String) });
    expect(rows[ids.length]).toMatchObject({ decision: null, source: 'undo' });
  });
  it('rejects bad decision requests', async () => {
    for (const body of [{}, { events: [], decision: 'keep', source: 'single' }, { events: ['x'], decision: 'keep', source: 'single' }, { events: ['e000000000000'], decision: 'delete', source: 'single' }, { events: ['e000000000000'], decision: 'keep', source: 'robot' }, '[1,2]', 'not json']) {
      const r = await post('/api/decisions', body);
      expect(r.status, JSON.stringify(body)).toBe(400);
    }
    expect((await get('/api/decisions')).status).toBe(405);
    const r = await (await post('/api/decisions', { events: ['e000000000000'], decision: 'keep', source: 'single' })).json();
    expect(r).toMatchObject({ written: 0, missing: ['e000000000000'] });
  });
});
