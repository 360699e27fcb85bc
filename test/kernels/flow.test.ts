/**
 * Farnebäck flow against OpenCV's calcOpticalFlowFarneback (npm @techstark/opencv-js, same
 * parameters) on the real pairs of ../shared/fixtures/flow-pairs (Middlebury RubberWhale and
 * OpenCV's basketball sample), by warp error, and against analytic sub-pixel shifts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { farnebackFlow, farnebackFlowPrepared, flowPyramid, DEFAULT_FLOW } from '../../src/kernels/flow/farneback.js';
import { polyExpansion, polyExpansionGeneric } from '../../src/kernels/flow/poly-expansion.js';
import { blurThenResize, gaussianBlur, resizeBilinear } from '../../src/kernels/flow/resample.js';
import { makeGrey, type FloatImage, type GreyFrame } from '../../src/kernels/frame.js';
import { toLuma } from '../../src/kernels/luma.js';
import { ErrorCode } from '../../src/shared/errors.js';
import { makeRng } from '../../tools/scenes/random.js';
import { valueNoise } from '../../tools/scenes/texture.js';
import { readRgb } from '../helpers/fixtures.js';
import { loadOpenCv, type Cv } from '../helpers/opencv.js';

let cv: Cv;
beforeAll(async () => {
  cv = await loadOpenCv();
});

function cvFlow(a: GreyFrame, b: GreyFrame, p = DEFAULT_FLOW): Float32Array {
  const ma = new cv.Mat(a.height, a.width, cv.CV_8UC1);
  ma.data.set(a.data);
  const mb = new cv.Mat(b.height, b.width, cv.CV_8UC1);
  mb.data.set(b.data);
  const flow = new cv.Mat();
  cv.calcOpticalFlowFarneback(ma, mb, flow, p.pyrScale, p.levels, p.winSize, p.iterations, p.polyN, p.polySigma, 0);
  const out = Float32Array.from(flow.data32F);
  [ma, mb, flow].forEach((m) => m.delete());
  return out;
}

/** Mean |prev(x) - next(x + flow(x))| with bilinear sampling; flow undefined = no motion. */
function warpError(a: GreyFrame, b: GreyFrame, flow?: Float32Array): number {
  let err = 0;
  const { width: w, height: h } = a;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = y * w + x;
      const sx = Math.min(w - 1.001, Math.max(0, x + (flow ? flow[i * 2] : 0)));
      const sy = Math.min(h - 1.001, Math.max(0, y + (flow ? flow[i * 2 + 1] : 0)));
      const x0 = Math.floor(sx), y0 = Math.floor(sy), fx = sx - x0, fy = sy - y0;
      const v = (b.data[y0 * w + x0] * (1 - fx) + b.data[y0 * w + x0 + 1] * fx) * (1 - fy) + (b.data[(y0 + 1) * w + x0] * (1 - fx) + b.data[(y0 + 1) * w + x0 + 1] * fx) * fy;
      err += Math.abs(a.data[i] - v);
    }
  }
  return err / (w * h);
}

describe('Farnebäck flow matches OpenCV on real pairs', () => {
  it.each([
    ['flow-pairs/rubberwhale1.png', 'flow-pairs/rubberwhale2.png'],
    ['flow-pairs/basketball1.png', 'flow-pairs/basketball2.png'],
  ])('%s', async (fa, fb) => {
    const a = toLuma(await readRgb(fa));
    const b = toLuma(await readRgb(fb));
    const ours = farnebackFlow(a, b).data;
    const ref = cvFlow(a, b);
    let epe = 0;
    for (let i = 0; i < ours.length; i += 2) epe += Math.hypot(ours[i] - ref[i], ours[i + 1] - ref[i + 1]);
    epe /= ours.length / 2;
    const none = warpError(a, b), oursErr = warpError(a, b, ours), refErr = warpError(a, b, ref);
    console.log(`${fa}: mean endpoint difference to OpenCV ${epe.toFixed(4)} px; warp error none ${none.toFixed(3)}, ours ${oursErr.toFixed(3)}, OpenCV ${refErr.toFixed(3)}`);
    expect(epe).toBeLessThanOrEqual(0.3);
    // Our flow must remove at least 95% as much photometric error as OpenCV's does.
    expect(none - oursErr).toBeGreaterThanOrEqual(0.95 * (none - refErr));
  });
});

describe('Farnebäck flow with a larger polynomial neighbourhood than the default (polyN 7)', () => {
  it('matches OpenCV on the RubberWhale pair', async () => {
    const p = { ...DEFAULT_FLOW, polyN: 7, polySigma: 1.5 };
    const a = toLuma(await readRgb('flow-pairs/rubberwhale1.png'));
    const b = toLuma(await readRgb('flow-pairs/rubberwhale2.png'));
    const ours = farnebackFlow(a, b, p).data;
    const ref = cvFlow(a, b, p);
    let epe = 0;
    for (let i = 0; i < ours.length; i += 2) epe += Math.hypot(ours[i] - ref[i], ours[i + 1] - ref[i + 1]);
    expect(epe / (ours.length / 2)).toBeLessThanOrEqual(0.3);
  });
});

describe('Farnebäck flow on analytic shifts', () => {
  it.each([
    [1, 0.35, -0.6],
    [2, 1.7, 0.4],
    [3, -2.25, 1.5],
  ])('seed %i, shift (%f, %f): mean endpoint error <= 0.1 px', (seed, dx, dy) => {
    const field = valueNoise(makeRng(seed), 12, 4);
    const w = 160, h = 120;
    const a = makeGrey(w, h), b = makeGrey(w, h);
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        a.data[y * w + x] = Math.round(255 * field(x, y));
        b.data[y * w + x] = Math.round(255 * field(x - dx, y - dy));
      }
    }
    const flow: FloatImage = farnebackFlow(a, b);
    let e = 0, n = 0;
    // Inner region: the edge rows are damped by design and have no match for the shifted content.
    for (let y = 16; y < h - 16; y++) for (let x = 16; x < w - 16; x++) {
      const i = (y * w + x) * 2;
      e += Math.hypot(flow.data[i] - dx, flow.data[i + 1] - dy);
      n++;
    }
    expect(e / n).toBeLessThanOrEqual(0.1);
  });
  it('a frame prepared once serves every pair it belongs to: the same flow, bit for bit', () => {
    const field = valueNoise(makeRng(9), 10, 4);
    const w = 120, h = 90;
    const frames = [0, 0.8, 1.9].map((dx) => {
      const f = makeGrey(w, h);
      for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) f.data[y * w + x] = Math.round(255 * field(x - dx, y + dx / 2));
      return f;
    });
    const pyr = frames.map((f) => flowPyramid(f));
    // The middle frame is "next" of the first pair, then "prev" of the second, then "next" again.
    const pairs: Array<[number, number]> = [[0, 1], [1, 2], [2, 1], [1, 0]];
    for (const [i, j] of pairs) {
      expect(Buffer.from(farnebackFlowPrepared(pyr[i], pyr[j]).data.buffer).equals(Buffer.from(farnebackFlow(frames[i], frames[j]).data.buffer))).toBe(true);
    }
    expect(() => farnebackFlowPrepared(pyr[0], flowPyramid(makeGrey(w, h - 2)))).toThrowError(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
    expect(() => farnebackFlowPrepared(pyr[0], flowPyramid(frames[1], { ...DEFAULT_FLOW, iterations: 2 }))).toThrowError(/next.params/);
  });
  it('rejects an even window and mismatched frames with stable codes', () => {
    expect(() => farnebackFlow(makeGrey(64, 64), makeGrey(64, 64), { ...DEFAULT_FLOW, winSize: 14 })).toThrowError(/winSize: wanted odd integer/);
    expect(() => farnebackFlow(makeGrey(64, 64), makeGrey(64, 48))).toThrowError(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
  });
});

describe('pyramid levels: blurring only where the resize reads', () => {
  // Reference: the two-step blur then resize (each step checked against OpenCV through the flow
  // comparisons above). The shortcut must give the same floats bit for bit.
  it.each([[0.125, 17], [0.25, 9], [0.5, 3], [1, 3], [0.3, 7]])('scale %f, %i taps', (scale, size) => {
    const rng = makeRng(size * 10 + Math.round(scale * 100));
    const w = 157, h = 93;
    const src: FloatImage = { width: w, height: h, channels: 1, data: new Float32Array(w * h).map(() => rng.range(0, 255)) };
    const sigma = (1 / scale - 1) * 0.5;
    const ow = Math.round(w * scale), oh = Math.round(h * scale);
    const a = blurThenResize(src, size, sigma, ow, oh).data;
    const b = resizeBilinear(gaussianBlur(src, size, sigma), ow, oh).data;
    expect(a.length).toBe(b.length);
    expect(a.every((v, i) => Object.is(v, b[i]))).toBe(true);
  });
});

describe('polynomial expansion: the loops written out for the default polyN', () => {
  // Reference: the generic loops (checked against OpenCV through the flow comparisons above,
  // where polyN 7 takes them). The written-out n = 5 passes must give the same floats bit for
  // bit, borders included (frames narrower and shorter than the 11-tap window too).
  it.each([[157, 93], [40, 23], [7, 4]])('%i x %i', (w, h) => {
    const rng = makeRng(w * 7 + h);
    const src: FloatImage = { width: w, height: h, channels: 1, data: new Float32Array(w * h).map(() => rng.range(0, 255)) };
    const a = polyExpansion(src, 5, 1.1).data;
    const b = polyExpansionGeneric(src, 5, 1.1).data;
    expect(a.length).toBe(w * h * 5);
    expect(a.every((v, i) => Object.is(v, b[i]))).toBe(true);
  });
});
