/**
 * Camera problems in a real Chromium, on a card with a fogged lens for two triggers and a clock
 * reset on the last (test/helpers/faulty-card.ts): the grid says so under the toolbar, and an
 * open trigger of the fogged run says which problem concerns it; a healthy trigger says nothing.
 */
import path from 'node:path';
import type { Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { scan } from '../../src/pipeline/scan.js';
import { buildReport } from '../../src/pipeline/report.js';
import { openAppPage, type AppPage } from '../helpers/app-page.js';
import { ROOT, tempDir } from '../helpers/cli.js';
import { writeFaultyCard } from '../helpers/faulty-card.js';
import { until } from '../helpers/until.js';

const SHOTS = path.join(ROOT, 'test-artifacts');
const dir = tempDir('movesift-e2e-health-');
const ledger = path.join(dir, 'health.ledger');
let app: AppPage | undefined;
let page: Page;

beforeAll(async () => {
  await writeFaultyCard(path.join(dir, 'cards'));
  await scan({ roots: [path.join(dir, 'cards')], ledger });
  app = await openAppPage(ledger);
  page = app.page;
}, 180_000);
afterAll(async () => {
  await app?.close();
});

describe('camera problems in the app', () => {
  it('the grid names them; a fogged trigger says so when opened, a healthy one does not', async () => {
    await until('the problems line', async () => (await page.getByTestId('camera-problems').count()) === 1);
    const text = (await page.getByTestId('camera-problems').textContent())!;
    expect(text).toMatch(/ridge-trail: 2 day triggers .* far less detail/);
    expect(text).toMatch(/capture time before 2001/);
    await page.screenshot({ path: path.join(SHOTS, 'camera-problems.png') });

    const report = buildReport(ledger);
    const fog = report.deployments.find((d) => d.id === 'ridge-trail')!.health.find((f) => f.code === 'lens-obscured')!;
    const healthy = report.events.find((e) => e.deployment === 'creek-bend')!;
    for (const [id, shows] of [[fog.from, true], [healthy.id, false]] as const) {
      await page.locator(`.card[data-event="${id}"]`).scrollIntoViewIfNeeded();
      await page.locator(`.card[data-event="${id}"]`).dblclick();
      await until('the event', async () => (await page.locator(`[data-testid=detail][data-event="${id}"]`).count()) === 1);
      expect(await page.getByTestId('event-problems').count()).toBe(shows ? 1 : 0);
      if (shows) {
        expect(await page.getByTestId('event-problems').textContent()).toMatch(/Camera problem for this trigger: .*fogged, wet or covered/);
        await page.screenshot({ path: path.join(SHOTS, 'camera-problem-event.png') });
      }
      await page.keyboard.press('Escape');
      await until('the grid', async () => (await page.locator('.card[data-event]').count()) > 0);
    }
  });
});
