/**
 * unexplainedShare against a slow obvious version (every displacement tried, the ring's
 * least-squares line solved from its normal equations in floating point), and its behaviour on
 * the cases it exists for: a shifted texture (sway) and a brightness step (a lamp) are explained;
 * a new textured object is not; pure sensor noise is explained.
 */
import { describe, expect, it } from 'vitest';
import type { Blob } from '../../src/kernels/components.js';
import { unexplainedShare } from '../../src/kernels/explained-change.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

function texture(w: number, h: number, seed: number): RgbFrame {
  const f = makeRgb(w, h);
  const r = mulberry32(seed);
  for (let i = 0; i < f.data.length; i++) f.data[i] = 40 + Math.floor(r() * 170);
  return f;
}
function boxBlob(x: number, y: number, bw: number, bh: number, w: number, labels: Int32Array): Blob {
  for (let yy = y; yy < y + bh; yy++) for (let xx = x; xx < x + bw; xx++) labels[yy * w + xx] = 1;
  return { label: 1, area: bw * bh, x, y, width: bw, height: bh, cx: x + bw / 2, cy: y + bh / 2, meanChange: 0, peakChange: 0 };
}

function slow(frame: RgbFrame, ref: RgbFrame, labels: Int32Array, b: Blob, sigma: number, radius: number, k: number): number {
  const { width: w, height: h } = frame;
  const limit = k * Math.max(sigma, 0.5);
  const pad = Math.max(3, Math.round(0.5 * Math.sqrt(b.area)));
  const fitLine = (c: number): [number, number] => {
    const xs: number[] = [], ys: number[] = [];
    for (let y = Math.max(0, b.y - pad); y <= Math.min(h - 1, b.y + b.height - 1 + pad); y++)
      for (let x = Math.max(0, b.x - pad); x <= Math.min(w - 1, b.x + b.width - 1 + pad); x++)
        if (labels[y * w + x] !== b.label) (xs.push(ref.data[(y * w + x) * 3 + c]), ys.push(frame.data[(y * w + x) * 3 + c]));
    if (xs.length < 8) return [1, 0];
    const n = xs.length, mx = xs.reduce((a, v) => a + v, 0) / n, my = ys.reduce((a, v) => a + v, 0) / n;
    const vx = xs.reduce((a, v) => a + (v - mx) ** 2, 0) / n;
    const g = vx > 4 ? xs.reduce((a, v, i) => a + (v - mx) * (ys[i] - my), 0) / n / vx : 1;
    return [g, my - g * mx];
  };
  const lines = [0, 1, 2].map(fitLine);
  let bad = 0;
  for (let y = b.y; y < b.y + b.height; y++)
    for (let x = b.x; x < b.x + b.width; x++) {
      if (labels[y * w + x] !== b.label) continue;
      const p = (y * w + x) * 3;
      const light = Math.max(...[0, 1, 2].map((c) => Math.abs(frame.data[p + c] - (lines[c][0] * ref.data[p + c] + lines[c][1]))));
      const shifts: number[] = [];
      for (let dy = -radius; dy <= radius; dy++)
        for (let dx = -radius; dx <= radius; dx++) {
          const xx = x + dx, yy = y + dy;
          if (xx < 0 || yy < 0 || xx >= w || yy >= h) continue;
          const q = (yy * w + xx) * 3;
          shifts.push(Math.max(...[0, 1, 2].map((c) => Math.abs(frame.data[p + c] - ref.data[q + c]))));
        }
      if (light > limit && Math.min(...shifts) > limit) bad++;
    }
  return bad / b.area;
}

describe('unexplainedShare', () => {
  it('equals the slow obvious version on random scenes', () => {
    for (let s = 1; s <= 6; s++) {
      const ref = texture(48, 40, s);
      const frame = texture(48, 40, s + 100);
      // Half the frame is the reference shifted, half is new.
      for (let y = 0; y < 40; y++) for (let x = 0; x < 24; x++) for (let c = 0; c < 3; c++) frame.data[(y * 48 + x) * 3 + c] = ref.data[(y * 48 + Math.min(47, x + (s % 3))) * 3 + c];
      const labels = new Int32Array(48 * 40);
      const b = boxBlob(10, 8, 28, 20, 48, labels);
      for (const sigma of [1, 4, 12]) expect(unexplainedShare(frame, ref, labels, b, sigma)).toBeCloseTo(slow(frame, ref, labels, b, sigma, 3, 3), 12);
    }
  });
  it('explains a shifted texture and a brightness step, not a new object, and not noise', () => {
    const w = 64, h = 48;
    const ref = texture(w, h, 7);
    const labels = new Int32Array(w * h);
    const b = boxBlob(20, 14, 20, 16, w, labels);
    const shifted = makeRgb(w, h);
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) for (let c = 0; c < 3; c++) shifted.data[(y * w + x) * 3 + c] = ref.data[(y * w + Math.min(w - 1, x + 2)) * 3 + c];
    expect(unexplainedShare(shifted, ref, labels, b, 2)).toBeLessThan(0.05);
    const brighter = makeRgb(w, h);
    for (let i = 0; i < brighter.data.length; i++) brighter.data[i] = Math.min(255, Math.round(ref.data[i] * 1.2 + 5));
    expect(unexplainedShare(brighter, ref, labels, b, 2)).toBeLessThan(0.05);
    const animal = makeRgb(w, h);
    animal.data.set(ref.data);
    const fur = texture(w, h, 99);
    for (let y = 14; y < 30; y++) for (let x = 20; x < 40; x++) for (let c = 0; c < 3; c++) animal.data[(y * w + x) * 3 + c] = Math.min(255, fur.data[(y * w + x) * 3 + c] * 0.3 + 170 * (c === 0 ? 1 : 0.5));
    expect(unexplainedShare(animal, ref, labels, b, 2)).toBeGreaterThan(0.8);
    const noisy = makeRgb(w, h);
    const r = mulberry32(3);
    for (let i = 0; i < noisy.data.length; i++) noisy.data[i] = Math.max(0, Math.min(255, Math.round(ref.data[i] + (r() - 0.5) * 4)));
    expect(unexplainedShare(noisy, ref, labels, b, 2)).toBe(0);
  });
});
