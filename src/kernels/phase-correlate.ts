/**
 * Global translation between two frames by phase correlation (Kuglin and Hines, 1975): the
 * inverse transform of the normalised cross-power spectrum peaks at the shift. A Hann window
 * suppresses the edge discontinuity. The integer peak is refined by evaluating the inverse DFT
 * on a 0.1 px grid around it (the matrix-multiply upsampling of Guizar-Sicairos, Thurman and
 * Fienup, Opt. Lett. 2008) and then a parabola through the best grid point and its neighbours.
 *
 * Convention: the returned (dx, dy) moves `reference` onto `current`:
 * current(x, y) ~ reference(x - dx, y - dy). Confidence is the correlation peak height, 1 for
 * a pure circular shift, near 0 when nothing matches.
 */
import { checkSameShape, checkFrame, type FloatImage, type GreyFrame } from './frame.js';
import { fft2d, fft2dReal } from './fft2d.js';
import { upperMedian } from './select.js';

export interface Shift {
  dx: number;
  dy: number;
  confidence: number;
}

// 128 px windows: enough texture for 0.1 px at analysis sizes, 4x cheaper than 256.
const MAX_WINDOW = 128;
const EPS_FACTOR = 1;
const GRID = 21;

function largestPow2(n: number): number {
  let p = 2;
  while (p * 2 <= n && p * 2 <= MAX_WINDOW) p *= 2;
  return p;
}

/** A Hann taper of n points (separable: the 2-D window is the product of a row and a column taper). */
function hann(n: number): Float64Array {
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * (i + 0.5)) / n);
  return t;
}

/** The w x h crop at (x0, y0), mean removed and Hann-windowed, as a real image. */
function windowed(img: GreyFrame | FloatImage, w: number, h: number, x0: number, y0: number, wx: Float64Array, wy: Float64Array): Float64Array {
  const out = new Float64Array(w * h);
  const src = img.data;
  const stride = img.width;
  let mean = 0;
  for (let y = 0; y < h; y++) for (let x = 0, p = (y0 + y) * stride + x0; x < w; x++, p++) mean += src[p];
  mean /= w * h;
  for (let y = 0; y < h; y++) {
    const a = wy[y];
    for (let x = 0, p = (y0 + y) * stride + x0; x < w; x++, p++) out[y * w + x] = (src[p] - mean) * wx[x] * a;
  }
  return out;
}

/** Value of the inverse DFT of `spec` at fractional positions xs (per column) and ys (per row). */
function upsampledPeak(spec: Float64Array, w: number, h: number, xs: number[], ys: number[]): Float64Array {
  // Stage 1: for every spectrum row v and every x in xs, sum over u.
  const k = xs.length;
  const partRe = new Float64Array(h * k);
  const partIm = new Float64Array(h * k);
  for (let j = 0; j < k; j++) {
    const cosT = new Float64Array(w);
    const sinT = new Float64Array(w);
    for (let u = 0; u < w; u++) {
      const us = u < w / 2 ? u : u - w;
      const a = (2 * Math.PI * us * xs[j]) / w;
      cosT[u] = Math.cos(a);
      sinT[u] = Math.sin(a);
    }
    for (let v = 0; v < h; v++) {
      let re = 0;
      let im = 0;
      const row = v * w * 2;
      for (let u = 0; u < w; u++) {
        const sr = spec[row + 2 * u];
        const si = spec[row + 2 * u + 1];
        re += sr * cosT[u] - si * sinT[u];
        im += sr * sinT[u] + si * cosT[u];
      }
      partRe[v * k + j] = re;
      partIm[v * k + j] = im;
    }
  }
  // Stage 2: sum over v for every y in ys; keep the real part.
  const out = new Float64Array(ys.length * k);
  for (let i = 0; i < ys.length; i++) {
    for (let v = 0; v < h; v++) {
      const vs = v < h / 2 ? v : v - h;
      const a = (2 * Math.PI * vs * ys[i]) / h;
      const c = Math.cos(a);
      const s = Math.sin(a);
      for (let j = 0; j < k; j++) out[i * k + j] += partRe[v * k + j] * c - partIm[v * k + j] * s;
    }
  }
  return out;
}

function parabola(m: number, c: number, p: number): number {
  const den = m - 2 * c + p;
  return den < 0 ? (0.5 * (m - p)) / den : 0;
}

export function estimateShift(reference: GreyFrame | FloatImage, current: GreyFrame | FloatImage): Shift {
  checkFrame('reference', reference, 1);
  checkFrame('current', current, 1);
  checkSameShape('reference', reference, 'current', current);
  const w = largestPow2(reference.width);
  const h = largestPow2(reference.height);
  const x0 = (reference.width - w) >> 1;
  const y0 = (reference.height - h) >> 1;
  const wx = hann(w), wy = hann(h);
  const fa = fft2dReal(windowed(reference, w, h, x0, y0, wx, wy), w, h);
  const first = correlate(fa, fft2dReal(windowed(current, w, h, x0, y0, wx, wy), w, h), w, h);
  // A window fixed in place on both frames biases the peak towards zero shift. When the shift
  // is a pixel or more, a second pass windows the current frame where the content went (the
  // integer shift), so only the fractional part is left to estimate.
  const ix = Math.max(-x0, Math.min(reference.width - w - x0, first.px));
  const iy = Math.max(-y0, Math.min(reference.height - h - y0, first.py));
  if (ix === 0 && iy === 0) return refine(first);
  const second = refine(correlate(fa, fft2dReal(windowed(current, w, h, x0 + ix, y0 + iy, wx, wy), w, h), w, h));
  return { dx: second.dx + ix, dy: second.dy + iy, confidence: second.confidence };
}

interface Peak {
  spec: Float64Array;
  w: number;
  h: number;
  px: number;
  py: number;
  peakNorm: number;
}

function correlate(fa: Float64Array, fb: Float64Array, w: number, h: number): Peak {
  const spec = new Float64Array(w * h * 2);
  const mags = new Float64Array(w * h);
  for (let i = 0; i < spec.length; i += 2) {
    // Fb * conj(Fa)
    spec[i] = fb[i] * fa[i] + fb[i + 1] * fa[i + 1];
    spec[i + 1] = fb[i + 1] * fa[i] - fb[i] * fa[i + 1];
    mags[i >> 1] = Math.hypot(spec[i], spec[i + 1]);
  }
  // Regularised whitening X / (|X| + eps): pure phase (eps = 0) gives the many weak,
  // noise-dominated frequencies of a smooth natural scene the same say as the strong ones.
  // eps at the median magnitude halves the weight of a typical frequency and leaves strong
  // ones near unit weight.
  const eps = upperMedian(mags) * EPS_FACTOR + 1e-12;
  let peakNorm = 0;
  for (let i = 0; i < spec.length; i += 2) {
    const k = 1 / (mags[i >> 1] + eps);
    spec[i] *= k;
    spec[i + 1] *= k;
    peakNorm += mags[i >> 1] * k;
  }
  const corr = fft2d(spec, w, h, true);
  let best = -Infinity;
  let bx = 0;
  let by = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const v = corr[(y * w + x) * 2];
      if (v > best) {
        best = v;
        bx = x;
        by = y;
      }
    }
  }
  return { spec, w, h, px: bx < w / 2 ? bx : bx - w, py: by < h / 2 ? by : by - h, peakNorm };
}

/** Sub-pixel refinement of an integer peak: the inverse DFT on a 0.1 px grid, then a parabola. */
function refine({ spec, w, h, px, py, peakNorm }: Peak): Shift {
  // The integer peak is within half a pixel of the true one: +-1 px at 0.1 px steps.
  const steps = Array.from({ length: GRID }, (_, i) => (i - (GRID >> 1)) / 10);
  const grid = upsampledPeak(spec, w, h, steps.map((s) => px + s), steps.map((s) => py + s));
  // Peak height relative to a perfect match (all weight at one point) is the confidence.
  for (let i = 0; i < grid.length; i++) grid[i] /= peakNorm;
  let gi = 0;
  for (let i = 1; i < grid.length; i++) if (grid[i] > grid[gi]) gi = i;
  const gy = Math.floor(gi / GRID);
  const gx = gi % GRID;
  const at = (yy: number, xx: number): number => grid[yy * GRID + xx];
  const fx = gx > 0 && gx < GRID - 1 ? parabola(at(gy, gx - 1), at(gy, gx), at(gy, gx + 1)) : 0;
  const fy = gy > 0 && gy < GRID - 1 ? parabola(at(gy - 1, gx), at(gy, gx), at(gy + 1, gx)) : 0;
  return {
    dx: px + steps[gx] + fx / 10,
    dy: py + steps[gy] + fy / 10,
    confidence: Math.max(0, Math.min(1, grid[gi])),
  };
}
