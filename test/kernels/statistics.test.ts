/**
 * Background and noise kernels against slow obvious versions and known distributions.
 */
import { describe, expect, it } from 'vitest';
import { makeGrey, makeRgb } from '../../src/kernels/frame.js';
import { temporalMedian } from '../../src/kernels/temporal-median.js';
import { estimateChangeNoise, MAX3_HALF_NORMAL_MEDIAN, HALF_NORMAL_MEDIAN } from '../../src/kernels/noise.js';
import { maxChannelChange } from '../../src/kernels/change-image.js';
import { absDiff } from '../../src/kernels/abs-diff.js';
import { thresholdHysteresis } from '../../src/kernels/threshold.js';
import { learningRate, startBackground, updateBackground } from '../../src/kernels/running-background.js';
import { ErrorCode } from '../../src/shared/errors.js';
import { selectKth } from '../../src/kernels/select.js';
import { fitGainOffset } from '../../src/kernels/photometric.js';
import { makeRng } from '../../tools/scenes/random.js';

describe('temporal median equals a brute-force sort', () => {
  it.each([1, 2, 3, 4, 7, 10, 16])('%i frames', (n) => {
    const rng = makeRng(n);
    const frames = Array.from({ length: n }, () => {
      const f = makeRgb(23, 11);
      for (let i = 0; i < f.data.length; i++) f.data[i] = rng.int(0, 255);
      return f;
    });
    const ours = temporalMedian(frames).data;
    for (let i = 0; i < ours.length; i++) {
      const v = frames.map((f) => f.data[i]).sort((a, b) => a - b);
      const m = n % 2 ? v[(n - 1) / 2] : Math.round((v[n / 2 - 1] + v[n / 2]) / 2);
      if (ours[i] !== m) throw new Error(`pixel ${i}: ${ours[i]} vs ${m}`);
    }
  });
  it('rejects an empty list and mixed sizes with stable codes', () => {
    expect(() => temporalMedian([])).toThrowError(expect.objectContaining({ code: ErrorCode.notEnoughFrames }));
    expect(() => temporalMedian([makeGrey(4, 4), makeGrey(4, 5)])).toThrowError(
      expect.objectContaining({ code: ErrorCode.sizeMismatch }),
    );
  });
});

describe('noise estimate within 5% on Gaussian noise of known sigma', () => {
  // The constants are quantiles of the normal distribution; check them by numeric integration.
  it('quantile constants', () => {
    const phi = (z: number): number => {
      let s = 0;
      const steps = 20000;
      for (let i = 0; i < steps; i++) {
        const t = ((i + 0.5) / steps) * z;
        s += Math.exp(-t * t / 2);
      }
      return 0.5 + (s * z) / steps / Math.sqrt(2 * Math.PI);
    };
    expect(2 * phi(HALF_NORMAL_MEDIAN) - 1).toBeCloseTo(0.5, 5);
    expect((2 * phi(MAX3_HALF_NORMAL_MEDIAN) - 1) ** 3).toBeCloseTo(0.5, 3);
  });
  it.each([1.5, 3, 6, 12])('sigma %f through the max-of-channels change image', (sigma) => {
    const rng = makeRng(Math.round(sigma * 10));
    const w = 320, h = 180;
    const a = makeRgb(w, h), b = makeRgb(w, h);
    for (let i = 0; i < a.data.length; i++) {
      const base = 128;
      a.data[i] = Math.round(base + sigma * rng.normal());
      b.data[i] = Math.round(base + sigma * rng.normal());
    }
    // Difference of two noisy frames: per channel sigma * sqrt(2).
    const est = estimateChangeNoise(maxChannelChange(a, b), 'max3');
    expect(Math.abs(est / (sigma * Math.SQRT2) - 1)).toBeLessThan(0.05);
    const single = estimateChangeNoise({ ...makeGrey(w, h), data: absDiff(a, b).data.filter((_, i) => i % 3 === 0) }, 'single');
    expect(Math.abs(single / (sigma * Math.SQRT2) - 1)).toBeLessThan(0.05);
  });
  // With 20% of pixels far above the noise, the median reads the noise's 62.5th percentile:
  // (2 Phi(z) - 1)^3 = 0.625 gives z = 1.458, 15% above 1.2637. Bound: 20%.
  it('a subject covering 20% of the frame moves the estimate by at most 20%', () => {
    const rng = makeRng(5);
    const w = 200, h = 100;
    const a = makeRgb(w, h), b = makeRgb(w, h);
    for (let p = 0; p < w * h; p++) {
      for (let c = 0; c < 3; c++) {
        a.data[p * 3 + c] = Math.round(100 + 4 * rng.normal());
        b.data[p * 3 + c] = p % w < 40 ? 240 : Math.round(100 + 4 * rng.normal());
      }
    }
    const est = estimateChangeNoise(maxChannelChange(a, b), 'max3');
    expect(Math.abs(est / (4 * Math.SQRT2) - 1)).toBeLessThan(0.2);
  });
  it('names a bad rule', () => {
    expect(() => estimateChangeNoise(makeGrey(2, 2), 'mean' as never)).toThrowError(/rule: wanted one of single\|max3/);
  });
});

describe('hysteresis threshold equals a slow flood fill', () => {
  it.each([1, 2, 3])('seed %i', (seed) => {
    const rng = makeRng(seed);
    const w = 60, h = 40;
    const src = makeGrey(w, h);
    for (let i = 0; i < src.data.length; i++) src.data[i] = rng.int(0, 60);
    const low = 30, high = 50;
    const ours = thresholdHysteresis(src, low, high).data;
    // Slow version: repeat until stable, a pixel > low with an 8-neighbour already on turns on.
    const ref = Uint8Array.from(src.data, (v) => (v > high ? 255 : 0));
    let changed = true;
    while (changed) {
      changed = false;
      for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
        const i = y * w + x;
        if (ref[i] || src.data[i] <= low) continue;
        for (let dy = -1; dy <= 1; dy++) for (let dx = -1; dx <= 1; dx++) {
          const xx = x + dx, yy = y + dy;
          if (xx >= 0 && yy >= 0 && xx < w && yy < h && ref[yy * w + xx] === 255 && !ref[i]) {
            ref[i] = 255;
            changed = true;
          }
        }
      }
    }
    expect(Array.from(ours)).toEqual(Array.from(ref));
  });
  it('rejects low above high, naming the parameter', () => {
    expect(() => thresholdHysteresis(makeGrey(3, 3), 40, 20)).toThrowError(/low: wanted number <= high/);
    expect(() => thresholdHysteresis(makeGrey(3, 3), Number.NaN, 20)).toThrowError(/low: wanted number 0-255, got NaN/);
  });
});

describe('running background', () => {
  it('forgets a step with the time constant given in seconds, at any frame rate', () => {
    for (const fps of [2, 5, 25]) {
      const bg = startBackground(makeGrey(1, 1));
      const frame = { ...makeGrey(1, 1), data: Uint8Array.of(100) };
      const alpha = learningRate(1 / fps, 4);
      for (let i = 0; i < fps * 4; i++) updateBackground(bg, frame, alpha);
      // After one time constant the background has covered 1 - 1/e of the step.
      expect(bg.data[0]).toBeCloseTo(100 * (1 - Math.exp(-1)), 1);
    }
  });
  it('rejects a zero or negative memory', () => {
    expect(() => learningRate(0.2, 0)).toThrowError(/tauSeconds: wanted finite number > 0, got 0/);
    expect(() => learningRate(Number.NaN, 1)).toThrowError(/dtSeconds/);
  });
});

describe('selection equals a brute-force sort', () => {
  // Reference: Array.prototype.sort. Ties matter: flat regions, clipped pixels and identical
  // frames give thousands of equal values.
  it.each([
    ['distinct', (r: ReturnType<typeof makeRng>) => r.range(-100, 100)],
    ['few values', (r: ReturnType<typeof makeRng>) => Math.floor(r.range(0, 4))],
    ['mostly one value', (r: ReturnType<typeof makeRng>) => (r.chance(0.9) ? 7 : r.range(0, 10))],
    ['all equal', () => 3],
  ] as const)('%s', (_, draw) => {
    const rng = makeRng(11);
    for (const n of [1, 2, 3, 10, 101, 5000]) {
      const v = Array.from({ length: n }, () => draw(rng));
      const sorted = [...v].sort((a, b) => a - b);
      for (const k of [0, n >> 1, n - 1, Math.floor(n / 3)]) expect(selectKth(v, k)).toBe(sorted[k]);
    }
  });
  it('fits gain and offset of two identical frames as 1 and 0', () => {
    const rng = makeRng(3);
    const f = makeRgb(320, 180);
    for (let i = 0; i < f.data.length; i++) f.data[i] = Math.floor(rng.range(1, 255));
    const go = fitGainOffset(f, f);
    go.gain.forEach((g) => expect(g).toBeCloseTo(1, 9));
    go.offset.forEach((o) => expect(o).toBeCloseTo(0, 9));
  });
  it('recovers a known gain and offset at every sample count up to its fixed scratch', () => {
    // The fit samples every floor(n / 6000)-th pixel into scratch of 12000: the counts just
    // below 6000, 12000 and 18000 pixels take the most samples (5999, 11999, 9000).
    const rng = makeRng(5);
    for (const n of [16, 5999, 6000, 11999, 12000, 17999, 250000]) {
      const cur = makeRgb(n, 1);
      const ref = makeRgb(n, 1);
      for (let i = 0; i < cur.data.length; i++) {
        cur.data[i] = Math.floor(rng.range(20, 200));
        ref.data[i] = Math.round(1.2 * cur.data[i] - 10);
      }
      const go = fitGainOffset(ref, cur);
      go.gain.forEach((g) => expect(g).toBeCloseTo(1.2, 2));
      go.offset.forEach((o) => expect(o).toBeCloseTo(-10, 0));
    }
  });
});
