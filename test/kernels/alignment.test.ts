/**
 * Phase correlation and shift compensation. Ground truth is analytic: the same continuous
 * texture sampled at positions offset by a known sub-pixel shift; and real images (fixtures)
 * box-downsampled at offsets a known fraction of a pixel apart.
 */
import { describe, expect, it } from 'vitest';
import { makeGrey, makeRgb, type GreyFrame } from '../../src/kernels/frame.js';
import { fft2dRealHalf, ifft2dHalfToReal } from '../../src/kernels/fft2d.js';
import { estimateShift, shiftReference } from '../../src/kernels/phase-correlate.js';
import { toLuma } from '../../src/kernels/luma.js';
import { translateBilinear } from '../../src/kernels/translate.js';
import { applyGainOffset, fitGainOffset } from '../../src/kernels/photometric.js';
import { ErrorCode } from '../../src/shared/errors.js';
import { makeRng } from '../../tools/scenes/random.js';
import { valueNoise, type Field } from '../../tools/scenes/texture.js';
import { readRgb } from '../helpers/fixtures.js';

function sample(field: Field, w: number, h: number, dx: number, dy: number, noise = 0, seed = 1): GreyFrame {
  const rng = makeRng(seed);
  const f = makeGrey(w, h);
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const v = 255 * field(x - dx, y - dy) + noise * rng.normal();
      f.data[y * w + x] = Math.max(0, Math.min(255, Math.round(v)));
    }
  }
  return f;
}

describe('phase correlation recovers known shifts within 0.1 px (analytic ground truth)', () => {
  // Textures with detail down to one or two pixels (four octaves of value noise: a fifth octave
  // puts detail above the sampling limit, and an aliased texture is not a pure phase shift,
  // which a real lens's low-pass prevents), full contrast, sensor noise sigma 2.
  it.each([1, 2, 3, 4, 5, 6, 7, 8])('seed %i', (seed) => {
    const rng = makeRng(seed);
    const w = rng.pick([200, 320, 480, 640]);
    const h = Math.round((w * rng.pick([9, 12, 16])) / 16);
    const field = valueNoise(rng, rng.pick([10, 16, 24]), 4);
    const dx = rng.range(-8, 8);
    const dy = rng.range(-5, 5);
    const a = sample(field, w, h, 0, 0, 2, seed);
    const b = sample(field, w, h, dx, dy, 2, seed + 50);
    const s = estimateShift(a, b);
    expect(Math.abs(s.dx - dx)).toBeLessThan(0.1);
    expect(Math.abs(s.dy - dy)).toBeLessThan(0.1);
    expect(s.confidence).toBeGreaterThan(0.2);
  });
  // Smoother textures (three octaves, larger cells): most of the spectrum is noise there, which
  // once moved the sub-pixel estimate by up to a pixel.
  it.each([11, 12, 13, 14, 15, 16, 17, 18, 19, 20, 21, 22])('smooth texture, seed %i', (seed) => {
    const rng = makeRng(seed);
    const w = rng.pick([200, 320, 480]);
    const h = Math.round((w * rng.pick([9, 12, 16])) / 16);
    const field = valueNoise(rng, rng.pick([10, 16, 24]), 3);
    const dx = rng.range(-8, 8);
    const dy = rng.range(-5, 5);
    const s = estimateShift(sample(field, w, h, 0, 0, 2, seed), sample(field, w, h, dx, dy, 2, seed + 50));
    expect(Math.abs(s.dx - dx)).toBeLessThan(0.1);
    expect(Math.abs(s.dy - dy)).toBeLessThan(0.1);
  });
  it('gives the same answer for RGB frames as for their luma, and with the reference transformed once', () => {
    const rng = makeRng(40);
    const field = valueNoise(rng, 16, 4);
    const w = 240, h = 160;
    const rgb = (dx: number, dy: number, seed: number): ReturnType<typeof makeRgb> => {
      const f = makeRgb(w, h);
      const r = makeRng(seed);
      for (let y = 0; y < h; y++) {
        for (let x = 0; x < w; x++) {
          for (let c = 0; c < 3; c++) f.data[(y * w + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(255 * field(x - dx + 9 * c, y - dy) + 2 * r.normal())));
        }
      }
      return f;
    };
    const a = rgb(0, 0, 1);
    const ref = shiftReference(a);
    for (const [dx, dy, seed] of [[2.3, -1.6, 2], [-0.4, 0.7, 3]]) {
      const b = rgb(dx, dy, seed);
      const fromLuma = estimateShift(toLuma(a), toLuma(b));
      expect(estimateShift(a, b)).toEqual(fromLuma);
      expect(estimateShift(ref, b)).toEqual(fromLuma);
      expect(Math.abs(fromLuma.dx - dx)).toBeLessThan(0.1);
      expect(Math.abs(fromLuma.dy - dy)).toBeLessThan(0.1);
    }
  });
  it('identical frames give zero shift and confidence 1', () => {
    const a = sample(valueNoise(makeRng(9), 8, 3), 64, 32, 0, 0);
    const s = estimateShift(a, a);
    expect(Math.abs(s.dx) + Math.abs(s.dy)).toBeLessThan(1e-6);
    expect(s.confidence).toBeCloseTo(1, 6);
  });
  it('unrelated frames give low confidence', () => {
    const a = sample(valueNoise(makeRng(10), 16, 4), 256, 128, 0, 0);
    const b = sample(valueNoise(makeRng(11), 16, 4), 256, 128, 0, 0);
    expect(estimateShift(a, b).confidence).toBeLessThan(0.1);
  });
  it('rejects mismatched sizes and empty frames with stable codes', () => {
    expect(() => estimateShift(makeGrey(64, 64), makeGrey(64, 32))).toThrowError(
      expect.objectContaining({ code: ErrorCode.sizeMismatch }),
    );
    expect(() => estimateShift(makeGrey(0, 64), makeGrey(0, 64))).toThrowError(
      expect.objectContaining({ code: ErrorCode.emptyFrame }),
    );
  });
});

describe('shift compensation', () => {
  it('translating back a shifted texture leaves only interpolation error', () => {
    const field = valueNoise(makeRng(21), 20, 3);
    const a = sample(field, 160, 120, 0, 0);
    const b = sample(field, 160, 120, 3.4, -2.2);
    const { frame, valid } = translateBilinear(b, 3.4, -2.2);
    let err = 0, n = 0, before = 0;
    for (let i = 0; i < a.data.length; i++) {
      if (!valid.data[i]) continue;
      err += Math.abs(frame.data[i] - a.data[i]);
      before += Math.abs(b.data[i] - a.data[i]);
      n++;
    }
    expect(err / n).toBeLessThan(1.5);
    expect(before / n).toBeGreaterThan(5 * (err / n));
    // The uncovered border strip (about 4 columns and 3 rows) is marked invalid.
    expect(n).toBeLessThan(157 * 118);
    expect(n).toBeGreaterThan(155 * 116);
  });
  it('names the parameter of an out-of-range shift', () => {
    expect(() => translateBilinear(makeGrey(10, 10), Number.NaN, 0)).toThrowError(/dx: wanted number/);
  });
});

describe('photometric normalisation', () => {
  it('recovers a known per-channel gain and offset despite a bright subject', () => {
    const rng = makeRng(31);
    const field = valueNoise(rng, 30, 4);
    const w = 200, h = 150;
    const ref = makeRgb(w, h);
    const cur = makeRgb(w, h);
    const gains = [0.7, 0.8, 0.9], offsets = [12, -5, 3];
    for (let p = 0; p < w * h; p++) {
      const x = p % w, y = Math.floor(p / w);
      const subject = (x - 60) ** 2 + (y - 70) ** 2 < 30 ** 2; // ~10% of the frame
      for (let c = 0; c < 3; c++) {
        const base = 30 + 190 * field(x + c * 7, y);
        ref.data[p * 3 + c] = Math.round(base);
        // current = (reference - offset) / gain, plus a subject only in the current frame
        const v = subject ? 250 : (base - offsets[c]) / gains[c] + rng.normal();
        cur.data[p * 3 + c] = Math.max(0, Math.min(255, Math.round(v)));
      }
    }
    const go = fitGainOffset(ref, cur);
    for (let c = 0; c < 3; c++) {
      expect(go.gain[c]).toBeCloseTo(gains[c], 1);
      expect(Math.abs(go.offset[c] - offsets[c])).toBeLessThan(3);
    }
    const fixed = applyGainOffset(cur, go);
    let err = 0;
    for (let i = 0; i < fixed.data.length; i++) err += Math.abs(fixed.data[i] - ref.data[i]);
    expect(err / fixed.data.length).toBeLessThan(12); // the subject's 10% dominates what is left
  });
});

describe('phase correlation on real images shifted by a known fraction of a pixel', () => {
  // Two box downsamplings (4x4 pixel means) of the same real image, the second starting o pixels
  // further in: both sample one box-filtered image, a quarter of an output pixel apart per o,
  // so the second is the first moved by -o/4 output pixels. Images: the Middlebury RubberWhale
  // frame and OpenCV's basketball frame (../shared/fixtures/flow-pairs, see SOURCES.md).
  const F = 4;
  function boxDown(src: GreyFrame, ox: number, oy: number, w: number, h: number): GreyFrame {
    const out = makeGrey(w, h);
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        let sum = 0;
        for (let j = 0; j < F; j++) for (let i = 0; i < F; i++) sum += src.data[(F * y + oy + j) * src.width + F * x + ox + i];
        out.data[y * w + x] = Math.round(sum / (F * F));
      }
    }
    return out;
  }
  it.each(['flow-pairs/rubberwhale1.png', 'flow-pairs/basketball1.png'])('%s', async (file) => {
    const src = toLuma(await readRgb(file));
    const w = Math.floor((src.width - 32) / F), h = Math.floor((src.height - 32) / F);
    const a = boxDown(src, 0, 0, w, h);
    for (const [ox, oy] of [[1, 0], [2, 3], [5, 2], [7, 9], [13, 6], [3, 14], [22, 1], [9, 30]]) {
      const s = estimateShift(a, boxDown(src, ox, oy, w, h));
      expect(Math.abs(s.dx + ox / F)).toBeLessThan(0.1);
      expect(Math.abs(s.dy + oy / F)).toBeLessThan(0.1);
    }
  });
});

describe('applying a gain and offset', () => {
  // The rule, value by value: round(gain * v + offset), clamped to 0..255. The four-pixel word
  // path must give exactly this for every pixel count (tails of 1 to 3 pixels) and for data that
  // does not start on a 4-byte boundary (which takes the byte path).
  it.each([[1, 1], [3, 1], [4, 1], [5, 3], [7, 2], [16, 9]])('equals the per-value rule on %i x %i', (w, h) => {
    const rng = makeRng(w * 7 + h);
    const go = { gain: [1.13, 0.61, 2.4], offset: [-7.5, 20.2, -100] };
    for (const start of [0, 1]) {
      const buf = new Uint8Array(w * h * 3 + start);
      for (let i = 0; i < buf.length; i++) buf[i] = Math.floor(rng.range(0, 256));
      const frame = makeRgb(w, h, buf.subarray(start));
      const out = applyGainOffset(frame, go);
      for (let i = 0; i < out.data.length; i++) {
        const c = i % 3;
        expect(out.data[i]).toBe(Math.min(255, Math.max(0, Math.round(go.gain[c] * frame.data[i] + go.offset[c]))));
      }
    }
  });
});

describe('half-spectrum 2-D FFT equals the DFT by its definition', () => {
  // Reference: the 2-D DFT summed term by term, F(u, v) = sum_xy f(x, y) e^(-2 pi i (ux/W + vy/H)).
  it.each([[8, 4], [16, 16], [4, 32]])('%i x %i', (w, h) => {
    const rng = makeRng(w * 100 + h);
    const img = new Float64Array(w * h).map(() => rng.range(-1, 1));
    const half = fft2dRealHalf(img, w, h);
    let worst = 0;
    for (let u = 0; u <= w / 2; u++) {
      for (let v = 0; v < h; v++) {
        let re = 0, im = 0;
        for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
          const a = -2 * Math.PI * ((u * x) / w + (v * y) / h);
          re += img[y * w + x] * Math.cos(a);
          im += img[y * w + x] * Math.sin(a);
        }
        const i = 2 * (u * h + v);
        worst = Math.max(worst, Math.abs(half[i] - re), Math.abs(half[i + 1] - im));
      }
    }
    expect(worst).toBeLessThan(1e-9);
    // And back: the inverse restores the image.
    const back = ifft2dHalfToReal(half, w, h);
    expect(Math.max(...back.map((b, i) => Math.abs(b - img[i])))).toBeLessThan(1e-12);
  });
});
