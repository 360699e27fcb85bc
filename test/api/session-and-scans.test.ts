/**
 * The handler's session, scan and static routes: opening and creating ledgers (with the ledger
 * layer's refusal codes), a scan started over the API with its progress as server-sent events
 * (WHATWG HTML, "Server-sent events": `data:` lines, blank-line separated), "all shown" ids with
 * verdict counts, and the built renderer served without letting a path escape its folder.
 */
import { mkdirSync, writeFileSync, cpSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { createHandler, type Handler } from '../../src/api/handler.js';
import type { ScanJobState } from '../../src/shared/review-api.js';
import { ROOT, tempDir } from '../helpers/cli.js';

const open: Handler[] = [];
function handler(o: Parameters<typeof createHandler>[0] = {}): Handler {
  const h = createHandler({ scanWorkers: 1, ...o });
  open.push(h);
  return h;
}
afterAll(async () => {
  for (const h of open) await h.close();
});
const call = (h: Handler, p: string, body?: unknown, method = body === undefined ? 'GET' : 'POST') =>
  h.handle(new Request(`http://127.0.0.1${p}`, { method, body: body === undefined ? undefined : JSON.stringify(body), headers: { 'content-type': 'application/json' } }));

async function readEvents(r: Response, until: (s: ScanJobState) => boolean): Promise<ScanJobState[]> {
  const reader = r.body!.pipeThrough(new TextDecoderStream()).getReader();
  const seen: ScanJobState[] = [];
  let buf = '';
  for (;;) {
    const { value, done } = await reader.read();
    if (done) break;
    buf += value;
    const blocks = buf.split('\n\n');
    buf = blocks.pop()!;
    for (const b of blocks) {
      const data = b.split('\n').filter((l) => l.startsWith('data: ')).map((l) => l.slice(6)).join('\n');
      if (!data) continue;
      seen.push(JSON.parse(data));
      if (until(seen[seen.length - 1])) {
        await reader.cancel();
        return seen;
      }
    }
  }
  return seen;
}

describe('session', () => {
  it('starts with no ledger and says so with a code', async () => {
    const h = handler();
    const s = await (await call(h, '/api/session')).json();
    expect(s).toMatchObject({ ledger: null, engineVersion: expect.any(String), scan: null });
    const r = await call(h, '/api/events');
    expect(r.status).toBe(409);
    expect((await r.json()).code).toBe('E_NO_LEDGER');
  });
  it('opens, creates and refuses ledgers with the ledger layer codes', async () => {
    const dir = tempDir('movesift-session-');
    const h = handler();
    const missing = await call(h, '/api/session', { ledger: path.join(dir, 'none.ledger') });
    expect(missing.status).toBe(404);
    expect((await missing.json()).code).toBe('E_LEDGER_MISSING');
    writeFileSync(path.join(dir, 'notes.txt'), 'not a database at all, just words '.repeat(200));
    const foreign = await call(h, '/api/session', { ledger: path.join(dir, 'notes.txt') });
    expect(foreign.status).toBe(400);
    expect((await foreign.json()).code).toBe('E_LEDGER_NOT_LEDGER');
    const made = await (await call(h, '/api/session', { ledger: path.join(dir, 'new.ledger'), create: true })).json();
    expect(made.ledger).toBe(path.join(dir, 'new.ledger'));
    expect((await (await call(h, '/api/events')).json()).total).toBe(0);
    const again = await call(h, '/api/session', { ledger: path.join(dir, 'notes.txt'), create: true });
    expect(again.status).toBe(409);
    for (const bad of [{}, { ledger: 'relative/path.ledger' }, { ledger: 42 }, { ledger: 'a\0b' }]) expect((await call(h, '/api/session', bad)).status).toBe(400);
  });
});

describe('a scan started over the API', () => {
  it('streams progress to done, refuses a second scan meanwhile, and the grid sees the events', async () => {
    const dir = tempDir('movesift-apiscan-');
    const media = path.join(dir, 'cards');
    cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(media, 'ridge-trail'), { recursive: true });
    const h = handler();
    const ledger = path.join(dir, 'scan.ledger');
    const progress = await call(h, '/api/scans/progress');
    expect(progress.headers.get('content-type')).toMatch(/^text\/event-stream/);
    const started = await call(h, '/api/scans', { folders: [media], ledger });
    expect(started.status).toBe(202);
    const again = await call(h, '/api/scans', { folders: [media] });
    expect(again.status).toBe(409);
    expect((await again.json()).code).toBe('E_SCAN_RUNNING');
    expect((await call(h, '/api/session', { ledger: path.join(dir, 'other.ledger'), create: true })).status).toBe(409); // no switching ledgers mid-scan
    const states = await readEvents(progress, (s) => s.status !== 'running');
    const last = states[states.length - 1];
    expect(last.status).toBe('done');
    expect(states.some((s) => s.phase === 'analyse')).toBe(true);
    expect(last.summary!.events).toBeGreaterThan(0);
    const ids = await (await call(h, '/api/events/ids')).json();
    expect(ids.ids).toHaveLength(last.summary!.events);
    expect(Object.values(ids.verdicts as Record<string, number>).reduce((a, b) => a + b, 0)).toBe(ids.ids.length);
    const blank = await (await call(h, '/api/events/ids?verdict=likely-blank')).json();
    expect(blank.ids.length).toBe(blank.verdicts['likely-blank'] ?? 0);
    expect((await call(h, '/api/scans/stop', {})).status).toBe(409); // nothing running now
  }, 120_000);
  it('refuses bad folder lists with 400 and a missing folder with its code', async () => {
    const h = handler();
    const dir = tempDir('movesift-apiscan-bad-');
    await call(h, '/api/session', { ledger: path.join(dir, 'x.ledger'), create: true });
    for (const body of [{}, { folders: [] }, { folders: 'one' }, { folders: ['not/absolute'] }]) expect((await call(h, '/api/scans', body)).status).toBe(400);
    const r = await call(h, '/api/scans', { folders: [path.join(dir, 'nowhere')] });
    expect(r.status).toBe(400);
    expect((await r.json()).code).toBe('E_FOLDER_MISSING');
  });
});

describe('the built renderer', () => {
  it('serves its files, answers 404 for anything outside the folder', async () => {
    const dir = tempDir('movesift-static-');
    mkdirSync(path.join(dir, 'assets'));
    writeFileSync(path.join(dir, 'index.html'), '<!doctype html><title>x</title>');
    writeFileSync(path.join(dir, 'assets/app-1234.js'), 'console.log(1)');
    writeFileSync(path.join(path.dirname(dir), 'secret.txt'), 'outside');
    const h = handler({ rendererDir: dir });
    const index = await call(h, '/');
    expect(index.headers.get('content-type')).toMatch(/text\/html/);
    expect(index.headers.get('cache-control')).toBe('no-cache');
    const js = await call(h, '/assets/app-1234.js');
    expect(js.headers.get('content-type')).toMatch(/javascript/);
    expect(js.headers.get('cache-control')).toMatch(/immutable/);
    for (const p of ['/../secret.txt', '/%2e%2e/secret.txt', '/assets/..%2F..%2Fsecret.txt', '/nothing.js']) expect((await call(h, p)).status, p).toBe(404);
    expect((await call(h, '/', {}, 'POST')).status).toBe(405);
    expect((await call(handler(), '/')).status).toBe(404); // no renderer given
  });
});
