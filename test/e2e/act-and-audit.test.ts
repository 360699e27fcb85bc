/**
 * Acting on decisions in a real Chromium: the set-aside media moved from the app (the plan shown
 * first, the move confirmed, its progress followed) and put back; an audit drawn and answered
 * with the keyboard, its report updating. Checked on the page, on disk and in the ledger.
 */
import { cpSync, existsSync, readdirSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import { openAppPage, type AppPage } from '../helpers/app-page.js';
import { ROOT, runCli, tempDir } from '../helpers/cli.js';
import { until } from '../helpers/until.js';

const SHOTS = path.join(ROOT, 'test-artifacts');
const dir = tempDir('movesift-e2e-act-');
const cards = path.join(dir, 'cards');
const ledger = path.join(dir, 'act.ledger');
let app: AppPage | undefined;
let page: Page;

beforeAll(async () => {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(cards, 'ridge-trail'), { recursive: true });
  await scan({ roots: [cards], ledger });
  expect(runCli(['decide', ledger, '--set-aside', '--verdict', 'likely-blank']).code).toBe(0);
  app = await openAppPage(ledger);
  page = app.page;
}, 180_000);
afterAll(async () => {
  await app?.close();
});

describe('acting on decisions in the app', () => {
  it('shows what would move, moves it after a confirmation, and undoes it', async () => {
    await page.keyboard.press('m');
    await until('the act panel', async () => (await page.getByTestId('act-panel').count()) === 1);
    const aside = path.join(dir, 'aside');
    await page.getByLabel('set-aside folder').fill(aside);
    await page.getByRole('button', { name: 'Show what would move' }).click();
    await until('the plan', async () => (await page.getByTestId('apply-plan').count()) === 1);
    expect(existsSync(aside)).toBe(false);
    const files = Number((await page.getByTestId('apply-plan').textContent())!.match(/(\d+) files/)![1]);
    expect(files).toBeGreaterThan(0);
    await page.getByRole('button', { name: /^Move \d+ files/ }).click();
    await until('the confirmation', async () => (await page.locator('[role=dialog]').count()) === 1);
    await page.screenshot({ path: path.join(SHOTS, 'act-confirm.png') });
    await page.keyboard.press('y');
    await until('the apply to finish', async () => (await page.locator('[data-testid=task][data-kind=apply]').getAttribute('data-status')) === 'done');
    expect(readdirSync(path.join(aside, 'cards', 'ridge-trail'))).toHaveLength(files);
    await until('the applies list', async () => (await page.getByTestId('applies').count()) === 1);
    await page.screenshot({ path: path.join(SHOTS, 'act.png') });
    await page.getByRole('button', { name: /^Undo apply/ }).click();
    await until('the undo to finish', async () => (await page.locator('[data-testid=task][data-kind=undo]').getAttribute('data-status')) === 'done');
    expect(readdirSync(path.join(cards, 'ridge-trail'))).toHaveLength(32);
    await page.keyboard.press('Escape');
    await page.keyboard.press('Escape');
    await until('the grid', async () => (await page.locator('.grid-scroll').count()) === 1);
  });

  it('keeps an event whose files were already set aside: asks, then puts its files back', async () => {
    const aside = path.join(dir, 'aside-2');
    const applied = runCli(['apply', ledger, '--to', aside]);
    expect(applied.code, applied.stderr).toBe(0);
    for (let i = 0; i < 3; i++) await page.keyboard.press('d'); // any -> undecided -> kept -> set aside
    await until('the set-aside filter', async () => (await page.locator('[data-chip=decision] b').textContent()) === 'set aside');
    await until('a set-aside card', async () => (await page.locator('.card').count()) > 0);
    const id = (await page.locator('.card').first().getAttribute('data-event'))!;
    const db = new Database(ledger, { readonly: true });
    const files = (db.prepare('SELECT m.rel_path FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = ? ORDER BY em.position').all(id) as Array<{ rel_path: string }>).map((r) => r.rel_path);
    db.close();
    for (const f of files) expect(existsSync(path.join(cards, f))).toBe(false);
    await page.keyboard.press('k');
    await until('the question', async () => (await page.locator('[role=dialog]').count()) === 1);
    expect(await page.locator('#confirm-title').textContent()).toBe(`Keep 1 event and put back ${files.length} file${files.length === 1 ? '' : 's'}?`);
    await page.screenshot({ path: path.join(SHOTS, 'keep-moved.png') });
    await page.keyboard.press('y');
    await until('the files back in place', async () => files.every((f) => existsSync(path.join(cards, f))));
    for (const f of files) expect(existsSync(path.join(aside, 'cards', f))).toBe(false);
    const after = new Database(ledger, { readonly: true });
    expect(after.prepare('SELECT decision FROM latest_decisions WHERE event_id = ?').get(id)).toEqual({ decision: 'keep' });
    expect((after.prepare("SELECT DISTINCT state FROM moves WHERE event_id = ? AND apply_id = (SELECT max(id) FROM applies)").all(id) as Array<{ state: string }>).map((r) => r.state)).toEqual(['restored']);
    // The rest of that apply stays set aside.
    expect((after.prepare("SELECT count(*) AS n FROM moves WHERE state = 'moved'").get() as { n: number }).n).toBeGreaterThan(0);
    after.close();
    // Everything else back too, for the audit below (which reads its frames from where they are).
    expect(runCli(['undo', ledger]).code).toBe(0);
    await page.keyboard.press('d'); // back to any decision
    await until('every decision', async () => (await page.locator('[data-chip=decision] b').textContent()) === 'any');
  });

  it('says beside the export form, one line per cause, what a Camtrap DP package still needs', async () => {
    await page.keyboard.press('m');
    await until('the act panel', async () => (await page.getByTestId('act-panel').count()) === 1);
    await page.getByLabel('export destination').fill(path.join(dir, 'package'));
    await page.getByRole('button', { name: 'Export', exact: true }).click();
    await until('the refusal', async () => (await page.getByTestId('export-error').count()) === 1);
    const lines = await page.getByTestId('export-error').locator('div').allTextContents();
    expect(lines[0]).toBe('a Camtrap DP package needs facts this ledger does not have:');
    expect(lines.slice(1)).toEqual([
      'no latitude and longitude for ridge-trail: give a deployments table with them (columns folder, deploymentID, latitude, longitude)',
      expect.stringMatching(/^ridge-trail: 32 capture time\(s\) without a UTC offset \(such as .*\): give the cameras' UTC offset, \+HH:MM \(E_EXPORT_INCOMPLETE\)$/),
    ]);
    // Beside the form: inside the export section, not the panel's top line.
    expect(await page.locator('section', { has: page.getByLabel('export destination') }).getByTestId('export-error').count()).toBe(1);
    expect(await page.locator('.act > p[role=alert]').count()).toBe(0);
    await page.screenshot({ path: path.join(SHOTS, 'export-refusal.png') });
    await page.keyboard.press('Escape');
    await until('the grid', async () => (await page.locator('.grid-scroll').count()) === 1);
  });

  it('draws an audit and takes yes/no answers from the keyboard', async () => {
    await page.keyboard.press('v');
    await until('the draw form', async () => (await page.getByTestId('audit-draw').count()) === 1);
    await page.getByLabel('sample size').fill('2');
    await page.getByRole('button', { name: 'Draw the sample' }).click();
    await until('the audit view', async () => (await page.getByTestId('audit-view').count()) === 1);
    await until('the first event', async () => (await page.getByTestId('detail').count()) === 1);
    await page.locator('body').click({ position: { x: 5, y: 5 } }); // focus out of any input
    await page.keyboard.press('n');
    await until('one answer', async () => /1 of 2 answered/.test((await page.getByTestId('audit-summary').textContent()) ?? ''));
    await page.keyboard.press('y');
    await until('the verdict', async () => (await page.getByTestId('audit-summary').getAttribute('data-verdict')) === 'fail');
    await page.screenshot({ path: path.join(SHOTS, 'audit.png') });
    const db = new Database(ledger, { readonly: true });
    const rows = db.prepare('SELECT animal FROM audit_answers ORDER BY id').all() as Array<{ animal: number }>;
    db.close();
    expect(rows.map((r) => r.animal)).toEqual([0, 1]);
  });
});
