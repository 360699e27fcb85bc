/**
 * The data strip by consensus of a deployment's triggers (src/kernels/data-strip.ts,
 * detectDataStripConsensus), against constructed layouts whose rows are known: top, bottom and
 * both edges, 3-9% of the height, light text on dark and the reverse, icons, a clock and
 * counter that change every frame, text spread over the whole width with fixed labels. Each
 * card is rendered larger than the analysis size, written as a JPEG (quality 60) and shrunk to
 * 384 px as a scan decodes it. Then the real infrared burst of ../shared/fixtures (Camtrap DP
 * 1.0.2 example data, MICA project, CC-BY 4.0), whose strips the per-frame test finds.
 */
import { describe, expect, it } from 'vitest';
import sharp from 'sharp';
import { detectDataStripConsensus, detectDataStripInFrames, widerStrip } from '../../src/kernels/data-strip.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { renderScene } from '../../tools/scenes/render.js';
import { Category } from '../../tools/scenes/categories.js';
import type { StripStyle } from '../../tools/scenes/data-strip.js';
import { decodeImage } from '../../src/media/decode-image.js';
import { FIXTURES, IR_BURST } from '../helpers/fixtures.js';
import path from 'node:path';

const W = 640, H = 480, ANALYSIS = 384;

async function asScanned(f: RgbFrame, quality = 60): Promise<RgbFrame> {
  const jpeg = await sharp(f.data, { raw: { width: f.width, height: f.height, channels: 3 } }).jpeg({ quality }).toBuffer();
  const h = Math.round((f.height * ANALYSIS) / f.width);
  const { data } = await sharp(jpeg).resize(ANALYSIS, h).raw().toBuffer({ resolveWithObject: true });
  return { width: ANALYSIS, height: h, channels: 3, data: new Uint8Array(data) };
}

/** Middle frames of `n` triggers of one camera: day and night, calm and windy, strip painted. */
async function deploymentFrames(strip: StripStyle | undefined, n = 8, world = 41, size = { width: W, height: H, quality: 60 }): Promise<RgbFrame[]> {
  const out: RgbFrame[] = [];
  for (let i = 0; i < n; i++) {
    const s = renderScene({ seed: 4100 + i, world, category: i % 2 ? Category.wind : Category.empty, light: i % 3 ? 'day' : 'ir', frames: 1, width: size.width, height: size.height, strip, neighbours: false });
    out.push(await asScanned(s.frames[0], size.quality));
  }
  return out;
}

describe('data strip by consensus of a deployment', () => {
  it.each([
    ['top', 0.07, 10, 230, 'spread'],
    ['both', 0.08, 220, 20, 'spread'],
    ['top', 0.09, 10, 230, 'left'],
    ['both', 0.06, 225, 10, 'left'],
    ['bottom', 0.05, 0, 255, 'spread'],
    ['top', 0.05, 230, 30, 'left'],
  ] as const)('%s strip, %f of the height, bar %i ink %i, text %s', async (edge, share, bar, ink, layout) => {
    const frames = await deploymentFrames({ edge, share, bar, ink, layout, icon: true });
    const rows = Math.round(Math.max(5, Math.round(H * share)) * (ANALYSIS / W));
    const found = detectDataStripConsensus(frames);
    for (const side of ['top', 'bottom'] as const) {
      const painted = edge === side || edge === 'both';
      if (painted) {
        expect(found[side], side).toBeGreaterThanOrEqual(rows);
        expect(found[side], side).toBeLessThanOrEqual(rows + 2);
      } else expect(found[side], side).toBe(0);
    }
  }, 30_000);

  // Thin strips on large frames: shrunk 2.5 times, the glyphs of text spread over the width
  // leave no row two-valued, so only the steady-print cue finds them (these four layouts, from
  // held-out scene families, were found as 0, 0, 5 of 15 and 3 of 11 rows there before that
  // cue; drawn here on another world, three of the four still fail without it).
  it.each([
    ['top', 0.0275, 216, 5, false],
    ['top', 0.057, 211, 0, false],
    ['top', 0.024, 1, 244, true],
    ['both', 0.037, 16, 243, false],
  ] as const)('thin %s strip on a 960 px frame, %f of the height, bar %i ink %i, spread text', async (edge, share, bar, ink, icon) => {
    const size = { width: 960, height: 640, quality: 55 };
    const frames = await deploymentFrames({ edge, share, bar, ink, layout: 'spread', icon }, 12, 44, size);
    const h = frames[0].height;
    const rows = Math.round(Math.max(5, Math.round(size.height * share)) * (h / size.height));
    const found = detectDataStripConsensus(frames);
    for (const side of ['top', 'bottom'] as const) {
      if (edge === side || edge === 'both') {
        expect(found[side], side).toBeGreaterThanOrEqual(rows);
        expect(found[side], side).toBeLessThanOrEqual(rows + 2);
      } else expect(found[side], side).toBe(0);
    }
  }, 30_000);

  it('finds the whole strip where the per-frame test stops at its first rows of text', async () => {
    const frames = await deploymentFrames({ edge: 'both', share: 0.08, bar: 220, ink: 20, layout: 'spread', icon: true });
    const rows = Math.round(Math.round(H * 0.08) * (ANALYSIS / W));
    const perFrame = detectDataStripInFrames(frames);
    const consensus = detectDataStripConsensus(frames);
    // The construction that the per-frame test misses (measured: 0 and 3 rows of 23 at 1024 px).
    expect(Math.min(perFrame.top, perFrame.bottom)).toBeLessThan(rows);
    expect(Math.min(consensus.top, consensus.bottom)).toBeGreaterThanOrEqual(rows);
    expect(widerStrip(perFrame, consensus)).toEqual({ top: Math.max(perFrame.top, consensus.top), bottom: Math.max(perFrame.bottom, consensus.bottom) });
  }, 30_000);

  it('finds no strip in a deployment without one, day and night', async () => {
    expect(detectDataStripConsensus(await deploymentFrames(undefined, 8, 42))).toEqual({ top: 0, bottom: 0 });
    expect(detectDataStripConsensus(await deploymentFrames(undefined, 6, 43))).toEqual({ top: 0, bottom: 0 });
  }, 30_000);

  it('a flat dark picture taller than the strip limit is not a strip', () => {
    const f = makeRgb(100, 80);
    f.data.fill(5);
    expect(detectDataStripConsensus([f, f, f, f, f])).toEqual({ top: 0, bottom: 0 });
  });

  it('on the real infrared burst, agrees with the per-frame test (both strips, 1.8-4% of the height)', async () => {
    // Decoded as a scan decodes them (decode-image.ts at the analysis size).
    const frames = await Promise.all(IR_BURST.map((f) => decodeImage(path.join(FIXTURES, f), f, ANALYSIS, Math.round((1440 * ANALYSIS) / 2048))));
    const h = frames[0].height;
    const c = detectDataStripConsensus(frames);
    for (const side of [c.top, c.bottom]) {
      expect(side).toBeGreaterThanOrEqual(Math.floor(0.018 * h));
      expect(side).toBeLessThanOrEqual(Math.ceil(0.04 * h) + 1);
    }
  }, 30_000);

  it('refuses fewer than five frames and frames of different sizes, naming the problem', () => {
    const f = makeRgb(20, 10);
    expect(() => detectDataStripConsensus([f, f, f, f])).toThrowError(expect.objectContaining({ code: 'E_NOT_ENOUGH_FRAMES' }));
    expect(() => detectDataStripConsensus([f, f, f, f, makeRgb(20, 11)])).toThrowError(/frames\[4\]/);
  });
});
