/**
 * A technician's whole day in a real Chromium, as a user would do it, with the mouse where a user
 * would reach for it: a card scanned from the start screen, the likely-blanks reviewed and set
 * aside, the set-aside media moved, a set-aside event opened with its frames (served from the
 * set-aside folder), an audit drawn over them and answered, one event kept after the move (the
 * app asks, then puts its files back), and the move undone. Checked on the page, on disk and in
 * the ledger; screenshots in test-artifacts/day-*.png.
 */
import { cpSync, existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { Browser, Page } from 'playwright-core';
import { afterAll, expect, it } from 'vitest';
import { launchChromium } from '../helpers/browser.js';
import { ROOT, tempDir } from '../helpers/cli.js';
import { startReview, type RunningReview } from '../helpers/review-server.js';
import { until } from '../helpers/until.js';

const SHOTS = path.join(ROOT, 'test-artifacts');
let review: RunningReview | undefined;
let browser: Browser | undefined;
afterAll(async () => {
  await browser?.close();
  await review?.stop();
});

const rows = <T,>(ledger: string, sql: string, ...args: unknown[]): T[] => {
  const db = new Database(ledger, { readonly: true });
  try {
    return db.prepare(sql).all(...args) as T[];
  } finally {
    db.close();
  }
};

it('scan, review, set aside, apply, open a set-aside event, audit, keep one after apply, undo', async () => {
  const dir = tempDir('movesift-day-');
  const card = path.join(dir, 'card');
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(card, 'ridge-trail'), { recursive: true });
  const ledger = path.join(dir, 'day.ledger');
  const aside = path.join(dir, 'set-aside');
  review = await startReview([]);
  browser = await launchChromium();
  const page: Page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
  page.on('pageerror', (e) => console.error('page error:', e.message));
  await page.goto(review.url);
  const shot = (name: string) => page.screenshot({ path: path.join(SHOTS, `day-${name}.png`) });

  // Morning: the card from the field, scanned into a new ledger.
  await page.getByLabel('folders to scan, one per line').fill(card);
  await page.getByLabel('ledger to scan into').fill(ledger);
  await page.getByRole('button', { name: 'Scan' }).click();
  await until('the scan', async () => (await page.locator('[data-testid=scan-panel]').getAttribute('data-status').catch(() => null)) === 'done', 120_000);
  await page.getByTestId('review-button').click();
  await until('the grid', async () => (await page.locator('.card[data-event]').count()) > 0);
  await shot('1-grid');

  // Review: the likely-blanks, all shown selected and set aside (asked when many).
  await page.keyboard.press('1');
  await until('the likely-blank filter', async () => (await page.locator('[data-chip=verdict] b').textContent()) === 'likely blank');
  const blanks = rows<{ n: number }>(ledger, "SELECT count(*) AS n FROM analyses WHERE verdict = 'likely-blank'")[0].n;
  expect(blanks).toBeGreaterThan(0);
  await until('the likely-blanks shown', async () => Number((await page.getByTestId('shown-count').textContent())!.replace(/\D/g, '')) === blanks);
  await page.keyboard.press('a');
  await until('all shown selected', async () => ((await page.locator('.status-line').textContent()) ?? '').includes(`Selected all ${blanks} events shown`));
  await page.keyboard.press('s');
  if (blanks >= 10) {
    await until('the question', async () => (await page.locator('[role=dialog]').count()) === 1);
    await page.keyboard.press('y');
  }
  await until('the set-asides in the ledger', async () => rows<{ n: number }>(ledger, "SELECT count(*) AS n FROM latest_decisions WHERE decision = 'set-aside'")[0].n === blanks);
  await page.keyboard.press('0');

  // Afternoon: the set-aside media moved, after the plan and a confirmation.
  await page.keyboard.press('m');
  await until('the act panel', async () => (await page.getByTestId('act-panel').count()) === 1);
  await page.getByLabel('set-aside folder').fill(aside);
  await page.getByRole('button', { name: 'Show what would move' }).click();
  await until('the plan', async () => (await page.getByTestId('apply-plan').count()) === 1);
  await page.getByRole('button', { name: /^Move \d+ files/ }).click();
  await until('the confirmation', async () => (await page.locator('[role=dialog]').count()) === 1);
  await page.keyboard.press('y');
  await until('the apply', async () => (await page.locator('[data-testid=task][data-kind=apply]').getAttribute('data-status')) === 'done');
  const moved = rows<{ event_id: string; source: string; dest: string }>(ledger, "SELECT event_id, source, dest FROM moves WHERE state = 'moved'");
  expect(moved.length).toBeGreaterThan(0);
  for (const m of moved) expect(existsSync(m.source) || !existsSync(m.dest)).toBe(false);
  await shot('2-applied');
  await page.keyboard.press('Escape');
  await until('the grid again', async () => (await page.locator('.grid-scroll').count()) === 1);

  // A set-aside event opened: its frames show, and its original is served from where it went.
  for (let i = 0; i < 3; i++) await page.keyboard.press('d');
  await until('the set-aside filter', async () => (await page.locator('[data-chip=decision] b').textContent()) === 'set aside');
  await page.keyboard.press('Home');
  await until('a set-aside card under the cursor', async () => (await page.locator('.card.is-focused').getAttribute('data-decision')) === 'set-aside');
  await page.keyboard.press('Enter');
  await until('the frames', async () => (await page.locator('[data-testid=burst-frame] img').count()) === 1);
  await until('the frame drawn', async () => page.locator('[data-testid=burst-frame] img').evaluate((img: HTMLImageElement) => img.complete && img.naturalWidth > 0));
  const opened = (await page.getByTestId('detail').getAttribute('data-event'))!;
  const mediaIds = rows<{ id: number }>(ledger, 'SELECT media_id AS id FROM event_media WHERE event_id = ? ORDER BY position', opened).map((r) => r.id);
  const statuses = await page.evaluate(async (ids) => Promise.all(ids.map(async (id) => (await fetch(`api/media/${id}`)).status)), mediaIds);
  expect(statuses.every((s) => s === 200)).toBe(true);
  await shot('3-set-aside-event');
  await page.keyboard.press('Escape');
  await until('the grid once more', async () => (await page.locator('.grid-scroll').count()) === 1);

  // The lead's audit of what was set aside: every one of so few is drawn, each answered.
  await page.keyboard.press('v');
  await until('the draw form', async () => (await page.getByTestId('audit-draw').count()) === 1);
  await until('the plan filled in', async () => (await page.getByLabel('sample size').inputValue()) !== '');
  expect(Number(await page.getByLabel('sample size').inputValue())).toBe(blanks); // too few for 299: all of them
  await page.getByRole('button', { name: 'Draw the sample' }).click();
  await until('the audit view', async () => (await page.getByTestId('audit-view').count()) === 1);
  await until('the first event', async () => (await page.getByTestId('detail').count()) === 1);
  await page.locator('body').click({ position: { x: 5, y: 5 } });
  for (let i = 0; i < blanks; i++) {
    await page.keyboard.press('n');
    // Until the last answer the summary counts them; then it gives the verdict instead.
    if (i < blanks - 1) await until(`answer ${i + 1}`, async () => new RegExp(`${i + 1} of ${blanks} answered`).test((await page.getByTestId('audit-summary').textContent()) ?? ''));
  }
  await until('the verdict', async () => (await page.getByTestId('audit-summary').getAttribute('data-verdict')) === 'pass');
  await shot('4-audit');
  await page.keyboard.press('Escape');
  await until('back to the grid', async () => (await page.locator('.grid-scroll').count()) === 1);

  // One of them kept after all, with the mouse: the app asks, then puts its files back.
  await page.keyboard.press('Home');
  await until('a set-aside card under the cursor again', async () => (await page.locator('.card.is-focused').getAttribute('data-decision')) === 'set-aside');
  await page.keyboard.press('Enter');
  await until('the event', async () => (await page.getByTestId('detail').count()) === 1);
  const kept = (await page.getByTestId('detail').getAttribute('data-event'))!;
  const itsFiles = moved.filter((m) => m.event_id === kept);
  expect(itsFiles.length).toBeGreaterThan(0);
  await page.getByRole('button', { name: /^Keep/ }).click();
  await until('the question', async () => (await page.locator('[role=dialog]').count()) === 1);
  expect(await page.locator('#confirm-title').textContent()).toBe(`Keep 1 event and put back ${itsFiles.length} file${itsFiles.length === 1 ? '' : 's'}?`);
  await shot('5-keep-after-apply');
  await page.keyboard.press('y');
  await until('its files back', async () => itsFiles.every((m) => existsSync(m.source) && !existsSync(m.dest)));
  expect(rows<{ decision: string }>(ledger, 'SELECT decision FROM latest_decisions WHERE event_id = ?', kept)[0].decision).toBe('keep');
  await page.keyboard.press('Escape');

  // Evening: the move undone; every file back, the set-aside folder empty but for its manifest.
  await page.keyboard.press('m');
  await until('the act panel again', async () => (await page.getByTestId('act-panel').count()) === 1);
  await until('the applies list', async () => (await page.getByTestId('applies').count()) === 1);
  await page.getByRole('button', { name: /^Undo apply/ }).click();
  // (The keep's own put-back was an undo task too: wait for the files, not the task line.)
  await until('every file back', async () => readdirSync(path.join(card, 'ridge-trail')).length === 32);
  await until('the undo', async () => (await page.locator('[data-testid=task][data-kind=undo]').getAttribute('data-status')) === 'done');
  for (const m of moved) expect(existsSync(m.source)).toBe(true);
  expect(readdirSync(aside).filter((f) => !f.startsWith('movesift-manifest-'))).toEqual([]);
  await shot('6-undone');
}, 240_000);
