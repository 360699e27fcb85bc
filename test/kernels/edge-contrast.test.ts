/**
 * edgeContrast: its value on shapes whose answer follows from their construction (a flat disc
 * over a flat floor: 1 - floor / disc; a Gaussian bump cut at a level: the few per cent the
 * profile falls across one pixel there), against a slow obvious version on random masks, and
 * its independence of the noise scale.
 */
import { describe, expect, it } from 'vitest';
import { labelComponents } from '../../src/kernels/components.js';
import { edgeContrast } from '../../src/kernels/edge-contrast.js';
import { makeGrey, type GreyFrame } from '../../src/kernels/frame.js';
import { thresholdBinary } from '../../src/kernels/threshold.js';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

function image(w: number, h: number, f: (x: number, y: number) => number): GreyFrame {
  const g = makeGrey(w, h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) g.data[y * w + x] = Math.max(0, Math.min(255, Math.round(f(x, y))));
  return g;
}
const firstBlob = (snr: GreyFrame, t: number) => {
  const c = labelComponents(thresholdBinary(snr, t), snr);
  return { labels: c.labels, blob: c.blobs.sort((a, b) => b.area - a.area)[0] };
};

/** The definition, written plainly: every pixel, every 4-neighbour. */
function slow(snr: GreyFrame, labels: Int32Array, label: number): number {
  const { width: w, height: h } = snr;
  const inner: number[] = [], outer: number[] = [];
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const me = labels[y * w + x] === label;
      const nb = [[x - 1, y], [x + 1, y], [x, y - 1], [x, y + 1]].filter(([a, b]) => a >= 0 && b >= 0 && a < w && b < h);
      if (!nb.some(([a, b]) => (labels[b * w + a] === label) !== me)) continue;
      (me ? inner : outer).push(snr.data[y * w + x]);
    }
  }
  const mean = (v: number[]) => v.reduce((a, b) => a + b, 0) / v.length;
  if (!inner.length || mean(inner) <= 0) return 0;
  if (!outer.length) return 1;
  return Math.max(0, Math.min(1, 1 - mean(outer) / mean(inner)));
}

describe('edge contrast', () => {
  it('a flat disc over a flat floor gives 1 - floor / disc', () => {
    const snr = image(80, 60, (x, y) => ((x - 40) ** 2 + (y - 30) ** 2 <= 15 ** 2 ? 80 : 5));
    const { labels, blob } = firstBlob(snr, 20);
    expect(edgeContrast(snr, labels, blob)).toBeCloseTo(1 - 5 / 80, 10);
  });
  it('a smooth bump (light, out of focus) scores far below a crisp outline', () => {
    const snr = image(80, 60, (x, y) => 80 * Math.exp(-((x - 40) ** 2 + (y - 30) ** 2) / (2 * 10 ** 2)));
    const { labels, blob } = firstBlob(snr, 20);
    const e = edgeContrast(snr, labels, blob);
    // Cut at 20 of 80 (r = 16.7 px), the profile falls by r / sigma^2 = 17% of its value per
    // pixel: the ring outside holds about 85% of the ring inside.
    expect(e).toBeGreaterThan(0.05);
    expect(e).toBeLessThan(0.3);
  });
  it('does not change when the change is twice as strong (noise-scaled input)', () => {
    const shape = (x: number, y: number) => 30 * Math.exp(-((x - 30) ** 2 + (y - 20) ** 2) / (2 * 8 ** 2)) + ((x - 30) ** 2 + (y - 20) ** 2 <= 36 ? 40 : 0);
    const a = image(60, 40, shape), b = image(60, 40, (x, y) => 2 * shape(x, y));
    const ba = firstBlob(a, 10), bb = firstBlob(b, 20);
    // Equal up to the rounding of the 8-bit images (within 0.01 here).
    expect(Math.abs(edgeContrast(b, bb.labels, bb.blob) - edgeContrast(a, ba.labels, ba.blob))).toBeLessThan(0.02);
  });
  it('the image border is not an outline', () => {
    const snr = image(40, 30, (x) => (x < 10 ? 60 : 6));
    const { labels, blob } = firstBlob(snr, 20);
    expect(edgeContrast(snr, labels, blob)).toBeCloseTo(1 - 6 / 60, 10);
  });
  it.each([1, 2, 3, 4, 5])('equals the plain definition on random blobs (seed %i)', (seed) => {
    const r = mulberry32(seed);
    const snr = image(50, 40, () => Math.floor(r() * 120));
    const c = labelComponents(thresholdBinary(snr, 70), snr);
    for (const b of c.blobs.slice(0, 20)) expect(edgeContrast(snr, c.labels, b)).toBeCloseTo(slow(snr, c.labels, b.label), 12);
  });
});
