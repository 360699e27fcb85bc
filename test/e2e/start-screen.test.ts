/**
 * The start screen in a real Chromium: `movesift review` with no ledger, a folder typed in, a new
 * ledger named, the scan's live progress followed to the end, then the grid over what it found.
 */
import { cpSync } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { Browser } from 'playwright-core';
import { afterAll, expect, it } from 'vitest';
import { launchChromium } from '../helpers/browser.js';
import { ROOT, tempDir } from '../helpers/cli.js';
import { startReview, type RunningReview } from '../helpers/review-server.js';

let review: RunningReview | undefined;
let browser: Browser | undefined;
afterAll(async () => {
  await browser?.close();
  await review?.stop();
});

it('scans a typed folder into a new ledger with live progress, then opens the grid', async () => {
  const dir = tempDir('movesift-start-');
  const media = path.join(dir, 'card');
  cpSync(path.join(ROOT, 'sample-media/creek-bend'), path.join(media, 'creek-bend'), { recursive: true });
  const ledger = path.join(dir, 'night.ledger');
  review = await startReview([]);
  browser = await launchChromium();
  const page = await browser.newPage({ viewport: { width: 1200, height: 800 } });
  await page.goto(review.url);
  await page.getByLabel('folders to scan, one per line').fill(media);
  await page.getByLabel('ledger to scan into').fill(ledger);
  // The deployment's own cut costs animals: off unless ticked, and the box says what it costs.
  const cut = page.getByTestId('deployment-cut');
  expect(await cut.isChecked()).toBe(false);
  expect(await page.locator('label.check-row').textContent()).toMatch(/some low-scoring animals/);
  await cut.check();
  await page.getByRole('button', { name: 'Scan' }).click();
  const phases = new Set<string>();
  const end = Date.now() + 120_000;
  let status = 'running';
  while (Date.now() < end) {
    status = (await page.locator('[data-testid=scan-panel]').getAttribute('data-status').catch(() => null)) ?? 'running';
    const h = await page.locator('[data-testid=scan-panel] h2').textContent().catch(() => '');
    if (h) phases.add(h);
    if (status !== 'running') break;
    await new Promise((r) => setTimeout(r, 50));
  }
  expect(status).toBe('done');
  expect([...phases].some((p) => /in progress/.test(p))).toBe(true); // progress was seen live, not only the end
  const db = new Database(ledger, { readonly: true });
  const events = (db.prepare('SELECT count(*) AS n FROM analyses').get() as { n: number }).n;
  // The tick reached the scan: its settings record the option, and pass two ran with it on.
  expect(JSON.parse((db.prepare('SELECT params FROM scans ORDER BY id DESC LIMIT 1').get() as { params: string }).params)).toMatchObject({ deploymentCut: true });
  expect((db.prepare("SELECT count(*) AS n FROM deployment_calibrations WHERE status = 'off'").get() as { n: number }).n).toBe(0);
  db.close();
  expect(await page.locator('[data-testid=scan-summary]').textContent()).toContain(`${events} events`);
  await page.getByTestId('review-button').click();
  const endGrid = Date.now() + 15_000;
  while (Date.now() < endGrid && (await page.locator('.card[data-event]').count()) === 0) await new Promise((r) => setTimeout(r, 100));
  expect(Number((await page.getByTestId('shown-count').textContent())!.replace(/\D/g, ''))).toBe(events);
}, 180_000);
