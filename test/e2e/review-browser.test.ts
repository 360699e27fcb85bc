/**
 * The review app end to end in a real Chromium (playwright-core; Debian's chromium or the one in
 * @sparticuz/chromium): `movesift review` on a ledger scanned from sample-media; filter, select
 * all, set aside, the warning that defaults to "no", undo, a burst flipped frame by frame, the
 * clip with its activity windows. Every step is checked on the page and then in the ledger.
 * Screenshots go to test-artifacts/ (git-ignored) for a person to look at.
 */
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import { launchChromium } from '../helpers/browser.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { startReview, type RunningReview } from '../helpers/review-server.js';
import { until } from '../helpers/until.js';

const SHOTS = path.join(ROOT, 'test-artifacts');
let ledger: string;
let review: RunningReview;
let browser: Browser;
let page: Page;

function ledgerRows<T>(sql: string, ...args: unknown[]): T[] {
  const db = new Database(ledger, { readonly: true });
  try {
    return db.prepare(sql).all(...args) as T[];
  } finally {
    db.close();
  }
}
const latest = () => new Map(ledgerRows<{ event_id: string; decision: string | null }>('SELECT event_id, decision FROM latest_decisions').map((r) => [r.event_id, r.decision]));
const text = (sel: string) => page.locator(sel).first().textContent();
const shownCount = async () => Number((await text('[data-testid=shown-count]'))?.replace(/\D/g, '') || NaN);

beforeAll(async () => {
  mkdirSync(SHOTS, { recursive: true });
  ledger = path.join(tempDir('movesift-e2e-'), 'survey.ledger');
  await scan({ roots: [path.join(ROOT, 'sample-media')], ledger });
  review = await startReview([ledger]);
  browser = await launchChromium();
  page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
  page.on('pageerror', (e) => console.error('page error:', e.message));
  await page.goto(review.url);
}, 180_000);
afterAll(async () => {
  await browser?.close();
  await review?.stop();
});

describe('review app in Chromium', () => {
  it('shows every event of the ledger in the grid', async () => {
    await until('cards', async () => (await page.locator('.card[data-event]').count()) > 0);
    expect(await shownCount()).toBe(25);
    await page.screenshot({ path: path.join(SHOTS, 'grid.png') });
  });

  it('filters to likely-blank, selects all shown and sets them aside', async () => {
    const blanks = ledgerRows<{ event_id: string }>("SELECT event_id FROM analyses WHERE verdict = 'likely-blank'").map((r) => r.event_id);
    expect(blanks.length).toBeGreaterThan(0);
    await page.keyboard.press('1');
    await until('the likely-blank filter', async () => (await shownCount()) === blanks.length && (await page.locator('.card[data-verdict=unsure], .card[data-verdict=motion]').count()) === 0);
    await page.keyboard.press('a');
    await until('the selection', async () => (await text('[data-testid=selected-count]'))?.startsWith(`${blanks.length} selected`) ?? false);
    await page.keyboard.press('s');
    if (blanks.length >= 10) await page.keyboard.press('y'); // the bulk warning, answered yes on purpose
    await until('set-aside tags', async () => (await page.locator('.card[data-decision=set-aside]').count()) === blanks.length);
    const d = latest();
    for (const id of blanks) expect(d.get(id)).toBe('set-aside');
    const rows = ledgerRows<{ source: string; who: string | null; verdict: string; score: number; engine_version: string }>('SELECT source, who, verdict, score, engine_version FROM decisions');
    expect(rows.every((r) => r.verdict === 'likely-blank' && r.engine_version && typeof r.score === 'number')).toBe(true);
    expect(rows[0].source).toBe(blanks.length > 1 ? 'bulk' : 'single');
  });

  it('asks before setting aside events the screener saw motion in, and Enter says no', async () => {
    await page.keyboard.press('3');
    await until('the motion filter', async () => (await page.locator('.card[data-verdict=motion]').count()) > 0);
    const before = ledgerRows<{ n: number }>('SELECT count(*) AS n FROM decisions')[0].n;
    await page.keyboard.press('s');
    await until('the warning', async () => (await page.locator('[role=dialog]').count()) === 1);
    expect(await text('[role=dialog]')).toMatch(/saw motion/);
    await page.screenshot({ path: path.join(SHOTS, 'warning.png') });
    await page.keyboard.press('Enter');
    await until('the warning to close', async () => (await page.locator('[role=dialog]').count()) === 0);
    expect(ledgerRows<{ n: number }>('SELECT count(*) AS n FROM decisions')[0].n).toBe(before);
  });

  it('keeps one event, sets aside another, and undo takes back only the last', async () => {
    await page.keyboard.press('0');
    await until('every verdict', async () => (await shownCount()) === 25);
    await page.keyboard.press('Home');
    const first = await page.locator('.card.is-focused').getAttribute('data-event');
    await page.keyboard.press('k'); // keeps the first, the cursor moves on
    await until('the keep', async () => latest().get(first!) === 'keep');
    await until('the cursor to move on', async () => (await page.locator('.card.is-focused').getAttribute('data-event')) !== first);
    const second = await page.locator('.card.is-focused').getAttribute('data-event');
    const verdict = await page.locator('.card.is-focused').getAttribute('data-verdict');
    await page.keyboard.press('s');
    if (verdict === 'motion') await page.keyboard.press('y');
    await until('the set-aside', async () => latest().get(second!) === 'set-aside');
    await until('the set-aside on the page', async () => (await page.locator(`.card[data-event="${second}"]`).getAttribute('data-decision')) === 'set-aside');
    await page.keyboard.press('u');
    await until('the undo on the page', async () => (await page.locator(`.card[data-event="${second}"]`).getAttribute('data-decision')) === 'none');
    expect(latest().get(second!)).toBeNull();
    expect(latest().get(first!)).toBe('keep');
    const undo = ledgerRows<{ decision: string | null; source: string }>("SELECT decision, source FROM decisions WHERE event_id = ? ORDER BY id DESC LIMIT 1", second);
    expect(undo[0]).toEqual({ decision: null, source: 'undo' });
  });

  it('applies a decision and an undo typed back to back in key order', async () => {
    await page.keyboard.press('d'); // decision filter: undecided
    await until('the undecided filter', async () => (await page.locator('[data-chip=decision] b').textContent()) === 'undecided' && (await page.locator('.card[data-event]').count()) > 0);
    await page.keyboard.press('Home');
    await until('the cursor on an undecided event', async () => (await page.locator('.card.is-focused').getAttribute('data-decision')) === 'none');
    const target = await page.locator('.card.is-focused').getAttribute('data-event');
    expect(latest().get(target!) ?? null).toBeNull();
    const count = () => ledgerRows<{ n: number }>('SELECT count(*) AS n FROM decisions WHERE event_id = ?', target)[0].n;
    const before = count();
    await page.keyboard.press('k');
    await page.keyboard.press('u'); // no wait: the undo must not overtake the keep
    await until('both writes', async () => count() === before + 2);
    const rows = ledgerRows<{ decision: string | null; source: string }>('SELECT decision, source FROM decisions WHERE event_id = ? ORDER BY id DESC LIMIT 2', target).reverse();
    expect(rows).toEqual([{ decision: 'keep', source: 'single' }, { decision: null, source: 'undo' }]);
    for (let i = 0; i < 3; i++) await page.keyboard.press('d'); // back to any decision
    await until('every decision', async () => (await page.locator('[data-chip=decision] b').textContent()) === 'any');
  });

  it('flips a burst frame by frame with its overlay', async () => {
    const burst = ledgerRows<{ id: string; n: number }>("SELECT e.id, count(*) AS n FROM events e JOIN event_media em ON em.event_id = e.id WHERE e.kind = 'burst' GROUP BY e.id ORDER BY e.start_sort_ms LIMIT 1")[0];
    // As if light had moved over this burst (a cloud shadow): the view must say what that means.
    const rw = new Database(ledger);
    rw.prepare("UPDATE analyses SET detail = json_set(detail, '$.movingLight', json('true')) WHERE event_id = ?").run(burst.id);
    rw.close();
    await page.locator(`.card[data-event="${burst.id}"]`).click();
    await page.keyboard.press('Enter');
    await until('the burst view', async () => (await page.locator('[data-testid=burst-frame]').count()) === 1);
    await page.keyboard.press('h');
    const seen: string[] = [];
    for (let k = 0; k < burst.n; k++) {
      await until(`frame ${k + 1}`, async () => (await text('[data-testid=frame-counter]')) === `frame ${k + 1} of ${burst.n}`);
      seen.push((await page.locator('[data-testid=burst-frame] img').getAttribute('src'))!);
      if (k === 0) await page.screenshot({ path: path.join(SHOTS, 'burst.png') });
      await page.keyboard.press('ArrowRight');
    }
    expect(new Set(seen).size).toBe(burst.n);
    // What the burst was compared with besides its own frames, as the ledger recorded it.
    const detail = JSON.parse(ledgerRows<{ detail: string }>('SELECT detail FROM analyses WHERE event_id = ? ORDER BY id DESC LIMIT 1', burst.id)[0].detail) as { background: number; deployment: boolean; neighbours: Array<{ kept: boolean }> };
    const kept = detail.neighbours.filter((x) => x.kept).length;
    expect(detail.background).toBeGreaterThan(0);
    expect(await text('[data-testid=background-note]')).toBe(detail.deployment ? `compared with ${kept} of ${detail.background} neighbouring triggers` : `neighbouring triggers too unlike this one (${kept} of ${detail.background} matched): an animal that never moved cannot show`);
    expect(await text('[data-testid=light-note]')).toMatch(/^light moving over the scene \(cloud or shade\)/);
    // Which rule decided the verdict, as pass two recorded it.
    const rule = ledgerRows<{ rule: string; status: string }>(
      "SELECT a.rule, c.status FROM analyses a JOIN events e ON e.id = a.event_id JOIN deployment_calibrations c ON c.deployment_id = e.deployment_id WHERE a.event_id = ?",
      burst.id,
    )[0];
    expect(await page.locator('[data-testid=rule-note]').getAttribute('data-rule')).toBe(rule.rule);
    expect(await text('[data-testid=rule-note]')).toMatch(rule.rule === 'deployment' ? /^Likely blank by this deployment's own calibration/ : rule.status === 'too-few' ? /too few for a calibration of its own/ : /^Decided by the fitted model/);
    await page.keyboard.press('ArrowRight'); // past the last frame: stays
    expect(await text('[data-testid=frame-counter]')).toBe(`frame ${burst.n} of ${burst.n}`);
    expect(await page.locator('[data-testid=blob-layer]').count()).toBe(1);
    await page.keyboard.press('Escape');
    await until('the grid', async () => (await page.locator('.grid-scroll').count()) === 1);
  });

  it('plays the clip and jumps between its activity windows', async () => {
    const clip = ledgerRows<{ id: string; analysis: number }>("SELECT e.id, a.id AS analysis FROM events e JOIN analyses a ON a.event_id = e.id WHERE e.kind = 'clip'")[0];
    const windows = ledgerRows<{ start_s: number; end_s: number }>('SELECT start_s, end_s FROM windows WHERE analysis_id = ? ORDER BY start_s', clip.analysis);
    expect(windows.length).toBeGreaterThanOrEqual(2); // the sample clip has two fish visits
    await page.locator(`.card[data-event="${clip.id}"]`).click();
    await page.keyboard.press('Enter');
    await until('the clip to load', async () => (await page.locator('[data-testid=clip-video]').evaluate((v: HTMLVideoElement) => v.readyState)) >= 2);
    // The player fills the page's width or most of its height, not a small box in an empty page.
    const [player, viewport] = [(await page.locator('[data-testid=clip-video]').boundingBox())!, page.viewportSize()!];
    expect(player.width >= 0.9 * (viewport.width - 40) || player.height >= 0.6 * viewport.height).toBe(true);
    const now = () => page.locator('[data-testid=clip-video]').evaluate((v: HTMLVideoElement) => v.currentTime);
    for (const w of windows.filter((w) => w.start_s > 0.05)) {
      await page.keyboard.press(']');
      await until(`window at ${w.start_s}s`, async () => Math.abs((await now()) - w.start_s) < 0.05);
      expect(await text('[data-testid=clip-window]')).toMatch(/^in window/);
    }
    await page.screenshot({ path: path.join(SHOTS, 'clip.png') });
    await page.keyboard.press('[');
    await page.keyboard.press('ArrowRight');
    await until('2 s step', async () => (await now()) > 0);
    await page.keyboard.press('Escape');
  });

  it('filters by a score range stepped from the keyboard', async () => {
    const scores = ledgerRows<{ score: number }>('SELECT score FROM analyses').map((r) => r.score);
    for (let i = 0; i < 10; i++) await page.keyboard.press('.'); // at least 0.50
    for (let i = 0; i < 1; i++) await page.keyboard.press('-'); // at most 0.95
    const want = scores.filter((x) => x >= 0.5 && x <= 0.95).length;
    await until('the score range', async () => (await page.locator('[data-chip="score at least"] b').textContent()) === '0.50' && (await page.locator('[data-chip="score at most"] b').textContent()) === '0.95');
    await until('the range applied', async () => (want === 0 ? (await page.locator('.empty-note').count()) === 1 : (await shownCount()) === want));
    for (let i = 0; i < 10; i++) await page.keyboard.press(',');
    await page.keyboard.press('=');
    await until('every score again', async () => (await shownCount()) === 25);
  });

  it('asks before undoing decisions a command made, naming who and when; Enter leaves them', async () => {
    await page.keyboard.press('0');
    await until('every verdict', async () => (await shownCount()) === 25);
    const decisionsBefore = latest();
    const r = runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank', '--who', 'field-lead']);
    expect(r.code, r.stderr).toBe(0);
    const n = Number(/Set aside (\d+) event/.exec(r.stdout)![1]);
    const decided = latest();
    await page.keyboard.press('u');
    await until('the question', async () => (await page.locator('[role=dialog]').count()) === 1);
    expect(await text('#confirm-title')).toBe(`Undo ${n} decisions made by field-lead?`);
    expect(await text('[role=dialog] p')).toMatch(/^The latest decisions were made with the movesift decide command by field-lead at \d{4}-\d\d-\d\d \d\d:\d\d:\d\d UTC: \d+ events set aside\.$/);
    await page.screenshot({ path: path.join(SHOTS, 'undo-command.png') });
    await page.keyboard.press('Enter'); // the safe answer: no
    await until('the dialog gone', async () => (await page.locator('[role=dialog]').count()) === 0);
    expect(latest()).toEqual(decided);
    await page.keyboard.press('u');
    await until('the question again', async () => (await page.locator('[role=dialog]').count()) === 1);
    await page.keyboard.press('y');
    // Every event has again the decision it had before the command (undecided ones none).
    await until('the command batch undone', async () => [...latest()].every(([id, d]) => d === (decisionsBefore.get(id) ?? null)));
  });

  it('lists every key in the help overlay', async () => {
    await page.keyboard.press('?');
    await until('help', async () => (await page.locator('.dialog-help').count()) === 1);
    const help = await text('.dialog-help');
    for (const phrase of ['set aside', 'undo', 'previous / next activity window', 'select every event']) expect(help).toContain(phrase);
    await page.screenshot({ path: path.join(SHOTS, 'help.png') });
    await page.keyboard.press('Escape');
  });
});
