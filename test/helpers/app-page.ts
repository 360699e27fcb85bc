/** The review app on a ledger in a real Chromium: `movesift review`, a 1400x900 page on its
 *  address, page errors printed, and the grid's first cards waited for. */
import type { Browser, Page } from 'playwright-core';
import { launchChromium } from './browser.js';
import { startReview, type RunningReview } from './review-server.js';
import { until } from './until.js';

export interface AppPage {
  review: RunningReview;
  browser: Browser;
  page: Page;
  close(): Promise<void>;
}

export async function openAppPage(ledger: string): Promise<AppPage> {
  const review = await startReview([ledger]);
  const browser = await launchChromium();
  const page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
  page.on('pageerror', (e) => console.error('page error:', e.message));
  await page.goto(review.url);
  await until('cards', async () => (await page.locator('.card[data-event]').count()) > 0);
  return {
    review,
    browser,
    page,
    close: async () => {
      await browser.close();
      await review.stop();
    },
  };
}
