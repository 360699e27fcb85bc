/**
 * The review grid at 100,000 events, measured in a real Chromium, side by side with the same grid
 * over a small ledger (2,000 events, enough to scroll for the whole measurement) in the same run (this machine is shared and noisy, so the
 * ratio is what to read): time to the first cards, frame rate and slowest frames while scrolling
 * steadily, and the time for a jump to the far end to show cards.
 *   npm run bench:review [-- --events 100000 --seconds 5]
 */
import path from 'node:path';
import { parseArgs } from 'node:util';
import { launchChromium, chromiumPath } from '../test/helpers/browser.js';
import { startReview } from '../test/helpers/review-server.js';
import { tempDir } from '../test/helpers/cli.js';
import { makeBigLedger } from './make-big-ledger.js';

const { values } = parseArgs({ options: { events: { type: 'string', default: '100000' }, seconds: { type: 'string', default: '5' } } });
const events = Number(values.events);
const seconds = Number(values.seconds);

interface Measure {
  events: number;
  firstCardsMs: number;
  fps: number;
  p95FrameMs: number;
  worstFrameMs: number;
  emptyCardShare: number;
  jumpToEndMs: number;
}

async function measure(ledger: string): Promise<Measure> {
  const review = await startReview([ledger]);
  const browser = await launchChromium();
  try {
    const page = await browser.newPage({ viewport: { width: 1400, height: 900 } });
    await page.goto(review.url);
    // Page scripts are passed as text: tsx adds a naming helper to compiled functions that the page does not have.
    const firstCardsMs = (await page.evaluate(`new Promise((resolve) => {
      const poll = () => { const m = performance.getEntriesByName('movesift:first-cards')[0]; if (m) resolve(m.startTime); else setTimeout(poll, 20); };
      poll();
    })`)) as number;
    const total = Number((await page.getByTestId('shown-count').textContent())!.replace(/\D/g, ''));
    // A steady fling: 3,000 px per second for the given seconds, one step per animation frame.
    const scroll = (await page.evaluate(`(async (s) => {
      const el = document.querySelector('.grid-scroll');
      const frames = [];
      let empty = 0, seen = 0, last = performance.now();
      const end = last + s * 1000;
      await new Promise((done) => {
        const step = (t) => {
          frames.push(t - last);
          el.scrollTop += ((t - last) / 1000) * 3000;
          last = t;
          seen += el.querySelectorAll('.card').length;
          empty += el.querySelectorAll('.card.is-loading').length;
          if (t < end) requestAnimationFrame(step); else done();
        };
        requestAnimationFrame(step);
      });
      frames.shift();
      const sorted = [...frames].sort((a, b) => a - b);
      return { fps: frames.length / s, p95: sorted[Math.floor(sorted.length * 0.95)], worst: sorted[sorted.length - 1], empty: seen ? empty / seen : 0 };
    })(${seconds})`)) as { fps: number; p95: number; worst: number; empty: number };
    const t0 = Date.now();
    await page.keyboard.press('End');
    while ((await page.locator('.card.is-focused[data-event]').count()) === 0) await new Promise((r) => setTimeout(r, 10));
    const jumpToEndMs = Date.now() - t0;
    return { events: total, firstCardsMs, fps: scroll.fps, p95FrameMs: scroll.p95, worstFrameMs: scroll.worst, emptyCardShare: scroll.empty, jumpToEndMs };
  } finally {
    await browser.close();
    await review.stop();
  }
}

const dir = tempDir('movesift-bench-review-');
const big = path.join(dir, 'big.ledger');
const small = path.join(dir, 'small.ledger');
const SMALL = 2000;
console.log(`Chromium: ${(await chromiumPath()).source}; making ledgers of ${events} and ${SMALL} events...`);
await makeBigLedger(big, events);
await makeBigLedger(small, SMALL);
const rows: Measure[] = [];
for (const l of [small, big, small, big]) rows.push(await measure(l)); // interleaved, twice each
const pick = (n: number) => rows.filter((r) => r.events === n);
const med = (xs: number[]) => [...xs].sort((a, b) => a - b)[xs.length >> 1];
const summary = [SMALL, events].map((n) => {
  const r = pick(n);
  return { events: n, 'first cards ms': Math.round(med(r.map((x) => x.firstCardsMs))), fps: +med(r.map((x) => x.fps)).toFixed(1), 'p95 frame ms': +med(r.map((x) => x.p95FrameMs)).toFixed(1), 'worst frame ms': +med(r.map((x) => x.worstFrameMs)).toFixed(1), 'loading cards seen': `${(med(r.map((x) => x.emptyCardShare)) * 100).toFixed(1)}%`, 'jump to end ms': Math.round(med(r.map((x) => x.jumpToEndMs))) };
});
console.table(summary);
console.log(`ratios (${events} / ${SMALL} events): first cards ${(summary[1]['first cards ms'] / summary[0]['first cards ms']).toFixed(2)}x, scroll fps ${(summary[1].fps / summary[0].fps).toFixed(2)}x`);
