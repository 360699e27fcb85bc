/**
 * Dense optical flow by Farnebäck's polynomial-expansion method (G. Farnebäck, "Two-Frame
 * Motion Estimation Based on Polynomial Expansion", SCIA 2003): both frames are expanded into
 * local quadratics; a displacement d makes A1 = A2 and b2 = b1 - 2 A1 d, solved per pixel in
 * the least-squares sense over a box window (sections 4-5), iterated with the current estimate
 * (section 5.1) over a Gaussian pyramid, coarse to fine (section 7).
 *
 * The numerical choices (edge damping, the averaged A, the regularising 1e-3 in the 2x2 solve,
 * matrices refreshed in stripes behind the sweep) follow OpenCV's calcOpticalFlowFarneback, the
 * reference the tests compare against, so that the two agree to a fraction of a pixel.
 * Output: float32, two channels (dx, dy) per pixel: prev(x, y) ~ next(x + dx, y + dy).
 */
import { invalidArgument, sizeMismatch } from '../../shared/errors.js';
import { checkInteger, checkNumber } from '../../shared/validate.js';
import { checkFrame, checkSameShape, type FloatImage, type GreyFrame } from '../frame.js';
import { polyExpansion } from './poly-expansion.js';
import { blurThenResize, resizeBilinear } from './resample.js';

export interface FlowParams {
  pyrScale: number;
  levels: number;
  winSize: number;
  iterations: number;
  polyN: number;
  polySigma: number;
}

/** Commonly used settings (OpenCV's samples use these for video): 3 levels, 15 px window. */
export const DEFAULT_FLOW: FlowParams = { pyrScale: 0.5, levels: 3, winSize: 15, iterations: 3, polyN: 5, polySigma: 1.2 };

const BORDER = [0.14, 0.14, 0.4472, 0.8943, 1].map(Math.fround);

function updateMatrices(R0: Float32Array, R1: Float32Array, flow: Float32Array, M: Float32Array, w: number, h: number, y0: number, y1: number): void {
  for (let y = y0; y < y1; y++) {
    // Flow and matrix indices stepped along the row.
    for (let x = 0, f = y * w * 2, r0 = y * w * 5; x < w; x++, f += 2, r0 += 5) {
      const dx = flow[f];
      const dy = flow[f + 1];
      let fx = x + dx;
      let fy = y + dy;
      const x1 = Math.floor(fx);
      const y1i = Math.floor(fy);
      fx -= x1;
      fy -= y1i;
      let r2: number, r3: number, r4: number, r5: number, r6: number;
      if (x1 >= 0 && x1 < w - 1 && y1i >= 0 && y1i < h - 1) {
        const a00 = (1 - fx) * (1 - fy), a01 = fx * (1 - fy), a10 = (1 - fx) * fy, a11 = fx * fy;
        const p = (y1i * w + x1) * 5;
        const q = p + w * 5;
        r2 = a00 * R1[p] + a01 * R1[p + 5] + a10 * R1[q] + a11 * R1[q + 5];
        r3 = a00 * R1[p + 1] + a01 * R1[p + 6] + a10 * R1[q + 1] + a11 * R1[q + 6];
        r4 = (R0[r0 + 2] + a00 * R1[p + 2] + a01 * R1[p + 7] + a10 * R1[q + 2] + a11 * R1[q + 7]) * 0.5;
        r5 = (R0[r0 + 3] + a00 * R1[p + 3] + a01 * R1[p + 8] + a10 * R1[q + 3] + a11 * R1[q + 8]) * 0.5;
        r6 = (R0[r0 + 4] + a00 * R1[p + 4] + a01 * R1[p + 9] + a10 * R1[q + 4] + a11 * R1[q + 9]) * 0.25;
      } else {
        r2 = r3 = 0;
        r4 = R0[r0 + 2];
        r5 = R0[r0 + 3];
        r6 = R0[r0 + 4] * 0.5;
      }
      r2 = (R0[r0] - r2) * 0.5;
      r3 = (R0[r0 + 1] - r3) * 0.5;
      r2 += r4 * dy + r6 * dx;
      r3 += r6 * dy + r5 * dx;
      if (x < 5 || x >= w - 5 || y < 5 || y >= h - 5) {
        const s = (x < 5 ? BORDER[x] : 1) * (x >= w - 5 ? BORDER[w - x - 1] : 1) * (y < 5 ? BORDER[y] : 1) * (y >= h - 5 ? BORDER[h - y - 1] : 1);
        r2 *= s;
        r3 *= s;
        r4 *= s;
        r5 *= s;
        r6 *= s;
      }
      M[r0] = r4 * r4 + r6 * r6;
      M[r0 + 1] = (r4 + r5) * r6;
      M[r0 + 2] = r5 * r5 + r6 * r6;
      M[r0 + 3] = r4 * r2 + r6 * r3;
      M[r0 + 4] = r6 * r2 + r5 * r3;
    }
  }
}

/** Box-window least squares for the flow, with matrices refreshed in stripes behind the sweep. */
function updateFlowBox(R0: Float32Array, R1: Float32Array, flow: Float32Array, M: Float32Array, w: number, h: number, block: number, refresh: boolean): void {
  const m = block >> 1;
  let y0 = 0;
  const minStripe = Math.max(Math.floor(1024 / w), block);
  const scale = 1 / (block * block);
  const pad = (m + 1) * 5;
  const buf = new Float64Array((w + m * 2 + 2) * 5);

  for (let x = 0; x < w * 5; x++) buf[pad + x] = M[x] * (m + 2);
  for (let y = 1; y < m; y++) {
    const r = Math.min(y, h - 1) * w * 5;
    for (let x = 0; x < w * 5; x++) buf[pad + x] += M[r + x];
  }
  for (let y = 0; y < h; y++) {
    const s0 = Math.max(y - m - 1, 0) * w * 5;
    const s1 = Math.min(y + m, h - 1) * w * 5;
    // Five entries (one pixel's matrix) per step: V8 does not unroll loops, and this one is
    // mostly loop overhead otherwise (same sums in the same order).
    for (let x = 0, b = pad; x < w * 5; x += 5, b += 5) {
      buf[b] += M[s1 + x] - M[s0 + x];
      buf[b + 1] += M[s1 + x + 1] - M[s0 + x + 1];
      buf[b + 2] += M[s1 + x + 2] - M[s0 + x + 2];
      buf[b + 3] += M[s1 + x + 3] - M[s0 + x + 3];
      buf[b + 4] += M[s1 + x + 4] - M[s0 + x + 4];
    }
    for (let x = 0; x < (m + 1) * 5; x++) {
      buf[pad - 1 - x] = buf[pad + 4 - x];
      buf[pad + w * 5 + x] = buf[pad + w * 5 + x - 5];
    }
    let g11 = buf[pad + 0] * (m + 2), g12 = buf[pad + 1] * (m + 2), g22 = buf[pad + 2] * (m + 2), h1 = buf[pad + 3] * (m + 2), h2 = buf[pad + 4] * (m + 2);
    for (let x = 1; x < m; x++) {
      g11 += buf[pad + x * 5];
      g12 += buf[pad + x * 5 + 1];
      g22 += buf[pad + x * 5 + 2];
      h1 += buf[pad + x * 5 + 3];
      h2 += buf[pad + x * 5 + 4];
    }
    // The window's entering (i) and leaving (o) pixels' matrices, and the flow's index, stepped
    // along the row rather than computed anew for every read.
    for (let x = 0, i = pad + m * 5, o = pad - m * 5 - 5, f = y * w * 2; x < w; x++, i += 5, o += 5, f += 2) {
      g11 += buf[i] - buf[o];
      g12 += buf[i + 1] - buf[o + 1];
      g22 += buf[i + 2] - buf[o + 2];
      h1 += buf[i + 3] - buf[o + 3];
      h2 += buf[i + 4] - buf[o + 4];
      const a = g11 * scale, b = g12 * scale, c = g22 * scale, p = h1 * scale, q = h2 * scale;
      const idet = 1 / (a * c - b * b + 1e-3);
      flow[f] = (a * q - b * p) * idet;
      flow[f + 1] = (c * p - b * q) * idet;
    }
    const y1 = y === h - 1 ? h : y - block;
    if (refresh && (y1 === h || y1 >= y0 + minStripe)) {
      updateMatrices(R0, R1, flow, M, w, h, y0, y1);
      y0 = y1;
    }
  }
}

function toFloat(f: GreyFrame): FloatImage {
  return { width: f.width, height: f.height, channels: 1, data: Float32Array.from(f.data) };
}

function checkFlowParams(p: FlowParams): void {
  checkNumber('pyrScale', p.pyrScale, 0.1, 0.95);
  checkInteger('levels', p.levels, 0, 10);
  checkInteger('winSize', p.winSize, 3, 101);
  if (p.winSize % 2 === 0) throw invalidArgument('winSize', 'odd integer 3-101', p.winSize);
  checkInteger('iterations', p.iterations, 1, 50);
  checkInteger('polyN', p.polyN, 3, 9);
  checkNumber('polySigma', p.polySigma, 0.1, 5);
}

/**
 * One frame's polynomial expansion at every pyramid level, coarsest first. A frame's expansion
 * does not depend on the frame it is compared with, so a run of frames (a burst's consecutive
 * pairs) prepares each frame once and passes it to farnebackFlowPrepared as either side.
 */
export interface FlowPyramid {
  width: number;
  height: number;
  params: FlowParams;
  levels: Array<{ w: number; h: number; R: Float32Array }>;
}

export function flowPyramid(frame: GreyFrame, p: FlowParams = DEFAULT_FLOW): FlowPyramid {
  checkFrame('frame', frame, 1);
  checkFlowParams(p);
  const W = frame.width, H = frame.height;
  let levels = 0;
  for (let s = 1; levels < p.levels; levels++) {
    s *= p.pyrScale;
    if (W * s < 32 || H * s < 32) break;
  }
  const f = toFloat(frame);
  const out: FlowPyramid['levels'] = [];
  for (let k = levels; k >= 0; k--) {
    const scale = p.pyrScale ** k;
    const sigma = (1 / scale - 1) * 0.5;
    const smooth = Math.max(3, Math.round(sigma * 5) | 1);
    const w = Math.round(W * scale), h = Math.round(H * scale);
    out.push({ w, h, R: polyExpansion(blurThenResize(f, smooth, sigma, w, h), p.polyN, p.polySigma).data });
  }
  return { width: W, height: H, params: p, levels: out };
}

/** Flow between two prepared frames (same size, same parameters). */
export function farnebackFlowPrepared(prev: FlowPyramid, next: FlowPyramid): FloatImage {
  if (prev.width !== next.width || prev.height !== next.height) throw sizeMismatch('next', `${prev.width}x${prev.height} like prev`, `${next.width}x${next.height}`);
  if (prev.params !== next.params && JSON.stringify(prev.params) !== JSON.stringify(next.params)) throw invalidArgument('next.params', JSON.stringify(prev.params), JSON.stringify(next.params));
  const p = prev.params;
  let flow: FloatImage | undefined;
  prev.levels.forEach(({ w, h, R: R0 }, i) => {
    const R1 = next.levels[i].R;
    let cur: FloatImage;
    if (!flow) cur = { width: w, height: h, channels: 2, data: new Float32Array(w * h * 2) };
    else {
      cur = resizeBilinear(flow, w, h);
      for (let j = 0; j < cur.data.length; j++) cur.data[j] /= p.pyrScale;
    }
    const M = new Float32Array(w * h * 5);
    updateMatrices(R0, R1, cur.data, M, w, h, 0, h);
    for (let it = 0; it < p.iterations; it++) updateFlowBox(R0, R1, cur.data, M, w, h, p.winSize, it < p.iterations - 1);
    flow = cur;
  });
  return flow!;
}

export function farnebackFlow(prev: GreyFrame, next: GreyFrame, p: FlowParams = DEFAULT_FLOW): FloatImage {
  checkFrame('prev', prev, 1);
  checkFrame('next', next, 1);
  checkSameShape('prev', prev, 'next', next);
  return farnebackFlowPrepared(flowPyramid(prev, p), flowPyramid(next, p));
}
