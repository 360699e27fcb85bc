/**
 * The handler's action routes on a ledger scanned from a copy of sample-media: the apply plan,
 * apply and undo as background tasks followed on their event stream, the applies list, audits
 * drawn, answered and reported, calibration's refusal, exports and their refusals, and bad input.
 */
import { cpSync, existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createHandler, type Handler } from '../../src/api/handler.js';
import { scan } from '../../src/pipeline/scan.js';
import type { TaskState } from '../../src/shared/review-api.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';

let h: Handler;
const dir = tempDir('movesift-actions-');
const cards = path.join(dir, 'cards');
const ledger = path.join(dir, 'a.ledger');
const call = (p: string, body?: unknown) => h.handle(new Request(`http://127.0.0.1${p}`, body === undefined ? {} : { method: 'POST', body: JSON.stringify(body), headers: { 'content-type': 'application/json' } }));

async function untilTaskDone(): Promise<TaskState> {
  const r = await call('/api/tasks/progress');
  const reader = r.body!.pipeThrough(new TextDecoderStream()).getReader();
  let buf = '';
  for (;;) {
    const { value, done } = await reader.read();
    if (done) throw new Error('stream ended');
    buf += value;
    for (const block of buf.split('\n\n').slice(0, -1)) {
      const data = block.split('\n').find((l) => l.startsWith('data: '));
      const s = data ? (JSON.parse(data.slice(6)) as TaskState) : null;
      if (s && s.status !== 'running') {
        await reader.cancel();
        return s;
      }
    }
    buf = buf.slice(buf.lastIndexOf('\n\n') + 2);
  }
}

beforeAll(async () => {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, 'ridge-trail'), { recursive: true });
  await scan({ roots: [cards], ledger });
  expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank']).code).toBe(0);
  h = createHandler({ ledger });
}, 120_000);
afterAll(() => h?.close());

describe('apply and undo over the API', () => {
  it('plans, applies with progress, lists the apply, and undoes it', async () => {
    const aside = path.join(dir, 'aside');
    const plan = await (await call(`/api/apply/plan?to=${encodeURIComponent(aside)}`)).json();
    expect(plan.files).toBeGreaterThan(0);
    expect(existsSync(aside)).toBe(false); // a plan moves nothing
    const started = await call('/api/apply', { to: aside, who: 'api' });
    expect(started.status).toBe(202);
    expect((await call('/api/apply', { to: aside })).status).toBe(409); // one task at a time
    const done = await untilTaskDone();
    expect(done).toMatchObject({ kind: 'apply', status: 'done' });
    expect(readdirSync(path.join(aside, 'cards', 'ridge-trail'))).toHaveLength(plan.files);
    // A set-aside event's frames still open in the app: the file is served from where it went.
    const movedEvent = (await (await call('/api/events?decision=set-aside&limit=1')).json()).events[0];
    const media = (await (await call(`/api/events/${movedEvent.id}`)).json()).media[0];
    expect(existsSync(path.join(cards, media.rel_path))).toBe(false);
    const served = await call(`/api/media/${media.id}`);
    expect(served.status).toBe(200);
    expect(Buffer.from(await served.arrayBuffer()).equals(readFileSync(path.join(aside, 'cards', media.rel_path)))).toBe(true);
    const applies = await (await call('/api/applies')).json();
    expect(applies[0]).toMatchObject({ moved: plan.files, who: 'api', status: 'done' });
    expect((await call('/api/undo', { apply: applies[0].id })).status).toBe(202);
    expect(await untilTaskDone()).toMatchObject({ kind: 'undo', status: 'done' });
    expect(readdirSync(path.join(cards, 'ridge-trail'))).toHaveLength(32);
    // And after the undo, from its own place again.
    const back = await call(`/api/media/${media.id}`);
    expect(back.status).toBe(200);
    expect(Buffer.from(await back.arrayBuffer()).equals(readFileSync(path.join(cards, media.rel_path)))).toBe(true);
  });
  it('refuses a set-aside folder inside the scanned folder with its code, and bad input with 400', async () => {
    // The plan says what the move would say (issue 23, item 3: it used to list the files).
    const r = await call(`/api/apply/plan?to=${encodeURIComponent(path.join(cards, 'x'))}`);
    expect(r.status).toBe(409);
    expect((await r.json()).code).toBe('E_APPLY_TARGET_INSIDE_ROOT');
    await call('/api/apply', { to: path.join(cards, 'x') });
    expect(await untilTaskDone()).toMatchObject({ status: 'failed', failure: { code: 'E_APPLY_TARGET_INSIDE_ROOT' } });
    for (const body of [{}, { to: 'relative' }, { to: 42 }]) expect((await call('/api/apply', body)).status).toBe(400);
    expect((await call('/api/undo', { apply: 'x' })).status).toBe(400);
  });
});

describe('audits, calibration and exports over the API', () => {
  it('draws an audit, records answers and reports', async () => {
    // The plan is for this ledger's set-aside events: too few for 59 (ln 0.05 / ln 0.95), so all.
    const plan = await (await call('/api/audits/plan?tolerance=0.05')).json();
    expect(plan.population).toBeGreaterThan(0);
    expect(plan.population).toBeLessThan(59);
    expect(plan.sample).toBe(plan.population);
    const r = await call('/api/audits', { sample: 2, who: 'lead' });
    expect(r.status).toBe(201);
    const audit = await r.json();
    expect(audit.items).toHaveLength(2);
    const after = await (await call(`/api/audits/${audit.id}/answers`, { event: audit.items[0].event_id, animal: false, who: 'lead' })).json();
    expect(after).toMatchObject({ answered: 1, animals: 0, verdict: 'incomplete' });
    expect((await call(`/api/audits/${audit.id}/answers`, { event: 'e000000000000', animal: true })).status).toBe(404);
    expect((await call(`/api/audits/${audit.id}/answers`, { event: audit.items[1].event_id, animal: 'yes' })).status).toBe(400);
    expect((await call('/api/audits/999')).status).toBe(404);
    expect((await (await call('/api/audits')).json()).length).toBe(1);
  });
  it('calibration refuses with too few labels; exports and cuts refuse what they cannot do', async () => {
    const cal = await call('/api/calibrate', { recall: 0.99 });
    expect(cal.status).toBe(409);
    expect((await cal.json()).code).toBe('E_CALIBRATE_TOO_FEW_ANIMALS');
    const dp = await call('/api/export', { format: 'camtrap-dp', out: path.join(dir, 'pkg') });
    expect(dp.status).toBe(409);
    expect((await dp.json()).code).toBe('E_EXPORT_INCOMPLETE');
    expect((await call('/api/export', { format: 'xml', out: path.join(dir, 'x') })).status).toBe(400);
    expect((await call('/api/export', { format: 'camtrap-dp', out: path.join(dir, 'x'), utcOffset: 'CET' })).status).toBe(400);
    const cut = await call('/api/cut', { out: path.join(dir, 'clips') }); // this ledger holds no clip
    expect(cut.status).toBe(409);
    expect((await call('/api/cut', {})).status).toBe(400);
    const csv = await call('/api/export', { format: 'csv', out: path.join(dir, 'out.csv') });
    expect(csv.status).toBe(200);
    expect(existsSync(path.join(dir, 'out.csv'))).toBe(true);
  });
});
