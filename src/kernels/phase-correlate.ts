/**
 * Global translation between two frames by phase correlation (Kuglin and Hines, 1975): the
 * inverse transform of the normalised cross-power spectrum peaks at the shift. A Hann window
 * suppresses the edge discontinuity. The integer peak is refined by evaluating the inverse DFT
 * on a 0.2 px grid around it (the matrix-multiply upsampling of Guizar-Sicairos, Thurman and
 * Fienup, Opt. Lett. 2008) and then a parabola through the best grid point and its neighbours;
 * the refinement reads a less whitened spectrum than the peak search (see EPS_LOCATE).
 *
 * Convention: the returned (dx, dy) moves `reference` onto `current`:
 * current(x, y) ~ reference(x - dx, y - dy). Confidence is the correlation peak height, 1 for
 * a pure circular shift, near 0 when nothing matches.
 *
 * Frames may be grey, float or RGB; an RGB frame's BT.601 luma is computed on the window only
 * (rounded as toLuma rounds it, so the result is the same as passing toLuma of the frame). A burst
 * aligns every frame to one reference: `shiftReference` transforms it once for all of them.
 */
import { checkFrame, perSize, type FloatImage, type Frame } from './frame.js';
import { fft2dRealHalf, ifft2dHalfToReal } from './fft2d.js';
import { sizeMismatch } from '../shared/errors.js';
import { upperMedian } from './select.js';

type Image = Frame | FloatImage;

/** A reference frame with its windowed spectrum, made once and used for many estimateShift calls. */
export interface ShiftReference {
  readonly width: number;
  readonly height: number;
  /** The transposed half spectrum of the centred window (fft2dRealHalf layout). */
  readonly spectrum: Float64Array;
}

export interface Shift {
  dx: number;
  dy: number;
  confidence: number;
}

/** Below this a shift is not worth a resampling, which softens the frame a little. */
const MIN_COMPENSATED_PX = 0.3;

/** Whether a found shift is worth compensating: confident enough and at least 0.3 px long. The
 *  caller still checks that it makes the frames agree better (a moving subject can pull it). */
export function worthCompensating(shift: Shift, minConfidence: number): boolean {
  return shift.confidence >= minConfidence && Math.hypot(shift.dx, shift.dy) >= MIN_COMPENSATED_PX;
}

// 128 px windows: enough texture for 0.1 px at analysis sizes, 4x cheaper than 256.
const MAX_WINDOW = 128;
const EPS_FACTOR = 1;
// The sub-pixel position is read from a correlation weighted nearly by the cross-power magnitude
// (plain cross-correlation, which weights each frequency by how much signal it carries) with only
// the very strongest frequencies, those above 1000 times the median magnitude, held back (the
// lowest ones, where a light gradient lives). Whitening at the median, used for finding the
// integer peak and for the confidence, gives noise-dominated frequencies half weight, and their
// noise moved the sub-pixel estimate: on smooth textures it was up to a pixel off. Measured on
// 60 random textures and shifts each (one-off experiment): mean error 0.056 / 0.19 / 0.086 px
// for fine / smooth / medium textures with the whitened surface, 0.015 / 0.018 / 0.018 with this
// one (worst 0.05 / 0.10 / 0.05); with a light gradient added 0.056 -> 0.015; plain
// cross-correlation did worse there (0.030). Shifts of real images by box downsampling
// (test/kernels/alignment.test.ts): mean 0.080 -> 0.050 px.
const EPS_LOCATE = 1000;
// The integer peak is within half a pixel of the true one; the grid reaches one step beyond, so
// a peak at +-0.5 still has neighbours on both sides for the parabola.
const GRID = 7;
// 0.2 px steps: the peak is smooth at that scale, so the parabola through grid points is as
// accurate as on a 0.1 px grid (measured over 60 random textures and shifts: mean error 0.056 px
// either way), at under half the cost.
const STEP = 0.2;

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

/** The 2-D Hann window (row taper times column taper), built once per size. */
const hann2d = perSize((w, h): Float64Array => {
  const wx = hann(w), wy = hann(h);
  const win = new Float64Array(w * h);
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) win[y * w + x] = wx[x] * wy[y];
  return win;
});

/**
 * Working arrays for one window size, reused by every call. Calls are synchronous, so one set
 * per size is enough; nothing in them outlives a call.
 */
interface Scratch {
  /** The windowed crop (input of a forward transform). */
  crop: Float64Array;
  /** The current frame's spectrum. */
  spectrum: Float64Array;
  /** The whitened cross-power spectrum and its magnitudes. */
  cross: Float64Array;
  /** The cross-power spectrum weighted for locating the peak to a fraction of a pixel. */
  locate: Float64Array;
  mags: Float64Array;
  sampled: Float64Array;
  /** The correlation surface. */
  surface: Float64Array;
}
const scratchFor = perSize((w, h): Scratch => {
  const half = ((w >> 1) + 1) * h;
  return {
    crop: new Float64Array(w * h),
    spectrum: new Float64Array(2 * half),
    cross: new Float64Array(2 * half),
    locate: new Float64Array(2 * half),
    mags: new Float64Array(half),
    sampled: new Float64Array(Math.ceil(half / MEDIAN_EVERY)),
    surface: new Float64Array(w * h),
  };
});

/** The w x h crop at (x0, y0), mean removed and Hann-windowed, as a real image (into `out`). */
function windowed(img: Image, w: number, h: number, x0: number, y0: number, out: Float64Array = new Float64Array(w * h)): Float64Array {
  const sum = img.channels === 3 ? cropLuma(img.data as Uint8Array, img.width, out, w, h, x0, y0) : cropGrey(img.data, img.width, out, w, h, x0, y0);
  const mean = sum / (w * h);
  const win = hann2d(w, h);
  // Four at a time (the window sides are powers of two of at least 2, so the length is a
  // multiple of 4): V8 does not unroll, and the loop is otherwise mostly its own overhead.
  for (let q = 0; q < out.length; q += 4) {
    out[q] = (out[q] - mean) * win[q];
    out[q + 1] = (out[q + 1] - mean) * win[q + 1];
    out[q + 2] = (out[q + 2] - mean) * win[q + 2];
    out[q + 3] = (out[q + 3] - mean) * win[q + 3];
  }
  return out;
}

/** BT.601 luma of an RGB crop in 16-bit fixed point, rounded half up (exactly toLuma's value); returns the sum. */
function cropLuma(src: Uint8Array, stride: number, out: Float64Array, w: number, h: number, x0: number, y0: number): number {
  let sum = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0, p = 3 * ((y0 + y) * stride + x0), q = y * w; x < w; x++, p += 3, q++) {
      const v = (19595 * src[p] + 38470 * src[p + 1] + 7471 * src[p + 2] + 32768) >>> 16;
      out[q] = v;
      sum += v;
    }
  }
  return sum;
}

/** A grey or float crop copied out; returns the sum. */
function cropGrey(src: ArrayLike<number>, stride: number, out: Float64Array, w: number, h: number, x0: number, y0: number): number {
  let sum = 0;
  for (let y = 0; y < h; y++) {
    for (let x = 0, p = (y0 + y) * stride + x0, q = y * w; x < w; x++, p++, q++) {
      const v = src[p];
      out[q] = v;
      sum += v;
    }
  }
  return sum;
}

/**
 * Value of the inverse DFT at fractional positions xs (per column) and ys (per row), from the
 * transposed half spectrum (fft2dRealHalf layout). The image is real, so every column u other
 * than 0 and width/2 stands for itself and its conjugate partner: weight 2 on the real part.
 */
function upsampledPeak(spec: Float64Array, w: number, h: number, xs: number[], ys: number[]): Float64Array {
  const cols = (w >> 1) + 1;
  const k = ys.length;
  // Stage 1: for every column u and every y in ys, sum over v.
  const cosV = new Float64Array(k * h);
  const sinV = new Float64Array(k * h);
  for (let i = 0; i < k; i++) {
    for (let v = 0; v < h; v++) {
      const vs = v < h / 2 ? v : v - h;
      const a = (2 * Math.PI * vs * ys[i]) / h;
      cosV[i * h + v] = Math.cos(a);
      sinV[i * h + v] = Math.sin(a);
    }
  }
  const partRe = new Float64Array(cols * k);
  const partIm = new Float64Array(cols * k);
  for (let u = 0; u < cols; u++) {
    const base = 2 * u * h;
    // Two rows of ys at a time: each spectrum value is read once for both, and the two pairs of
    // sums, each still taken over v in order, are independent chains the processor overlaps
    // (about 1.3x faster, the same values).
    let i = 0;
    for (; i + 1 < k; i += 2) {
      let re = 0, im = 0, re2 = 0, im2 = 0;
      const t = i * h;
      const t2 = t + h;
      for (let v = 0; v < h; v++) {
        const sr = spec[base + 2 * v];
        const si = spec[base + 2 * v + 1];
        const c = cosV[t + v], s = sinV[t + v];
        re += sr * c - si * s;
        im += sr * s + si * c;
        const c2 = cosV[t2 + v], s2 = sinV[t2 + v];
        re2 += sr * c2 - si * s2;
        im2 += sr * s2 + si * c2;
      }
      partRe[u * k + i] = re;
      partIm[u * k + i] = im;
      partRe[u * k + i + 1] = re2;
      partIm[u * k + i + 1] = im2;
    }
    for (; i < k; i++) {
      let re = 0;
      let im = 0;
      const t = i * h;
      for (let v = 0; v < h; v++) {
        const sr = spec[base + 2 * v];
        const si = spec[base + 2 * v + 1];
        const c = cosV[t + v];
        const s = sinV[t + v];
        re += sr * c - si * s;
        im += sr * s + si * c;
      }
      partRe[u * k + i] = re;
      partIm[u * k + i] = im;
    }
  }
  // Stage 2: sum over u for every x in xs; keep the real part.
  const out = new Float64Array(k * xs.length);
  const nx = xs.length;
  for (let j = 0; j < nx; j++) {
    for (let u = 0; u < cols; u++) {
      const us = u < w / 2 ? u : u - w;
      const weight = u === 0 || u === w >> 1 ? 1 : 2;
      const a = (2 * Math.PI * us * xs[j]) / w;
      const c = weight * Math.cos(a);
      const s = weight * Math.sin(a);
      for (let i = 0; i < k; i++) out[i * nx + j] += partRe[u * k + i] * c - partIm[u * k + i] * s;
    }
  }
  return out;
}

function parabola(m: number, c: number, p: number): number {
  const den = m - 2 * c + p;
  return den < 0 ? (0.5 * (m - p)) / den : 0;
}

function checkImage(name: string, img: Image): void {
  checkFrame(name, img);
  if (img.channels !== 1 && img.channels !== 3) throw sizeMismatch(`${name}.channels`, '1 or 3', String(img.channels));
}

/** The window placement for a frame size: the largest power-of-two square-ish crop, centred. */
function placement(width: number, height: number): { w: number; h: number; x0: number; y0: number } {
  const w = largestPow2(width);
  const h = largestPow2(height);
  return { w, h, x0: (width - w) >> 1, y0: (height - h) >> 1 };
}

/** Transforms a reference frame once, for aligning many frames to it. */
export function shiftReference(reference: Image): ShiftReference {
  checkImage('reference', reference);
  const { w, h, x0, y0 } = placement(reference.width, reference.height);
  return { width: reference.width, height: reference.height, spectrum: fft2dRealHalf(windowed(reference, w, h, x0, y0), w, h) };
}

function isPrepared(r: Image | ShiftReference): r is ShiftReference {
  return (r as ShiftReference).spectrum !== undefined;
}

export function estimateShift(reference: Image | ShiftReference, current: Image): Shift {
  const ref = isPrepared(reference) ? reference : shiftReference(reference);
  checkImage('current', current);
  if (current.width !== ref.width || current.height !== ref.height) {
    throw sizeMismatch('current', `${ref.width}x${ref.height} like reference`, `${current.width}x${current.height}`);
  }
  const { w, h, x0, y0 } = placement(ref.width, ref.height);
  const fa = ref.spectrum;
  const sc = scratchFor(w, h);
  const first = correlate(fa, fft2dRealHalf(windowed(current, w, h, x0, y0, sc.crop), w, h, sc.spectrum), w, h, sc);
  // A window fixed in place on both frames biases the peak towards zero shift. When the shift
  // is a pixel or more, a second pass windows the current frame where the content went (the
  // integer shift), so only the fractional part is left to estimate.
  const ix = Math.max(-x0, Math.min(ref.width - w - x0, first.px));
  const iy = Math.max(-y0, Math.min(ref.height - h - y0, first.py));
  if (ix === 0 && iy === 0) return refine(first);
  const second = refine(correlateNearZero(fa, fft2dRealHalf(windowed(current, w, h, x0 + ix, y0 + iy, sc.crop), w, h, sc.spectrum), w, h, sc));
  return { dx: second.dx + ix, dy: second.dy + iy, confidence: second.confidence };
}

interface Peak {
  spec: Float64Array;
  locate: Float64Array;
  w: number;
  h: number;
  px: number;
  py: number;
  peakNorm: number;
}

/** The whitened cross-power spectrum Fb conj(Fa) and the height a perfect match would give. */
interface CrossPower {
  spec: Float64Array;
  locate: Float64Array;
  peakNorm: number;
}

// The whitening constant is the median magnitude over every 4th frequency: a regulariser needs
// its scale, not the exact order statistic, and a quarter of the values is a quarter of the work.
const MEDIAN_EVERY = 4;

function crossPower(fa: Float64Array, fb: Float64Array, w: number, h: number, sc: Scratch): CrossPower {
  const cols = (w >> 1) + 1;
  const { cross: spec, locate, mags, sampled } = sc;
  for (let i = 0; i < spec.length; i += 2) {
    // Fb * conj(Fa)
    const re = fb[i] * fa[i] + fb[i + 1] * fa[i + 1];
    const im = fb[i + 1] * fa[i] - fb[i] * fa[i + 1];
    spec[i] = re;
    spec[i + 1] = im;
    mags[i >> 1] = Math.sqrt(re * re + im * im);
  }
  for (let i = 0, j = 0; i < mags.length; i += MEDIAN_EVERY, j++) sampled[j] = mags[i];
  // Regularised whitening X / (|X| + eps): pure phase (eps = 0) gives the many weak,
  // noise-dominated frequencies of a smooth natural scene the same say as the strong ones.
  // eps at the median magnitude halves the weight of a typical frequency and leaves strong
  // ones near unit weight. The median is taken over the half spectrum (the other half mirrors it).
  const median = upperMedian(sampled);
  const eps = median * EPS_FACTOR + 1e-12;
  const epsLocate = median * EPS_LOCATE + 1e-12;
  let peakNorm = 0;
  for (let u = 0; u < cols; u++) {
    let sum = 0;
    for (let j = u * h, end = j + h; j < end; j++) {
      const m = mags[j];
      const k = 1 / (m + eps);
      const kl = 1 / (m + epsLocate);
      const re = spec[2 * j], im = spec[2 * j + 1];
      locate[2 * j] = re * kl;
      locate[2 * j + 1] = im * kl;
      spec[2 * j] = re * k;
      spec[2 * j + 1] = im * k;
      sum += m * k;
    }
    peakNorm += (u === 0 || u === cols - 1 ? 1 : 2) * sum;
  }
  return { spec, locate, peakNorm };
}

/** The integer peak of the whole correlation surface (one inverse transform). */
function correlate(fa: Float64Array, fb: Float64Array, w: number, h: number, sc: Scratch): Peak {
  const { spec, locate, peakNorm } = crossPower(fa, fb, w, h, sc);
  const corr = ifft2dHalfToReal(spec, w, h, sc.surface);
  let best = -Infinity;
  let bi = 0;
  for (let i = 0; i < corr.length; i++) {
    if (corr[i] > best) {
      best = corr[i];
      bi = i;
    }
  }
  const bx = bi % w;
  const by = (bi / w) | 0;
  return { spec, locate, w, h, px: bx < w / 2 ? bx : bx - w, py: by < h / 2 ? by : by - h, peakNorm };
}

/**
 * The second pass: the window has been moved by the first pass's integer shift, so the peak is
 * near zero; refine() picks the best integer neighbour itself. No inverse transform is needed.
 */
function correlateNearZero(fa: Float64Array, fb: Float64Array, w: number, h: number, sc: Scratch): Peak {
  const { spec, locate, peakNorm } = crossPower(fa, fb, w, h, sc);
  return { spec, locate, w, h, px: 0, py: 0, peakNorm };
}

/**
 * Sub-pixel refinement of an integer peak: the correlation of the locating spectrum on a 0.2 px
 * grid, then a parabola; the confidence is the whitened correlation's height there.
 */
function refine({ spec, locate, w, h, px: px0, py: py0, peakNorm }: Peak): Shift {
  // The integer peak again, among its neighbours, on the locating spectrum: where the whitened
  // surface peaks can be a pixel away from where the better-weighted one does.
  const near = [-1, 0, 1];
  const values = upsampledPeak(locate, w, h, near.map((d) => px0 + d), near.map((d) => py0 + d));
  let bi = 0;
  for (let i = 1; i < values.length; i++) if (values[i] > values[bi]) bi = i;
  let px = px0 + near[bi % 3];
  let py = py0 + near[Math.floor(bi / 3)];
  // +-0.6 px at 0.2 px steps; a best point on the grid's edge (a skewed peak) moves the grid a
  // pixel that way, once, so the parabola has neighbours on both sides.
  const steps = Array.from({ length: GRID }, (_, i) => (i - (GRID >> 1)) * STEP);
  let grid: Float64Array = new Float64Array(0);
  let gx = 0;
  let gy = 0;
  for (let round = 0; round < 2; round++) {
    grid = upsampledPeak(locate, w, h, steps.map((s) => px + s), steps.map((s) => py + s));
    let gi = 0;
    for (let i = 1; i < grid.length; i++) if (grid[i] > grid[gi]) gi = i;
    gy = Math.floor(gi / GRID);
    gx = gi % GRID;
    const mx = gx === 0 ? -1 : gx === GRID - 1 ? 1 : 0;
    const my = gy === 0 ? -1 : gy === GRID - 1 ? 1 : 0;
    if ((mx === 0 && my === 0) || round === 1) break;
    px += mx;
    py += my;
  }
  const at = (yy: number, xx: number): number => grid[yy * GRID + xx];
  const fx = gx > 0 && gx < GRID - 1 ? parabola(at(gy, gx - 1), at(gy, gx), at(gy, gx + 1)) : 0;
  const fy = gy > 0 && gy < GRID - 1 ? parabola(at(gy - 1, gx), at(gy, gx), at(gy + 1, gx)) : 0;
  const dx = px + steps[gx] + fx * STEP;
  const dy = py + steps[gy] + fy * STEP;
  // Peak height relative to a perfect match (all weight at one point) is the confidence.
  const height = upsampledPeak(spec, w, h, [dx], [dy])[0] / peakNorm;
  return { dx, dy, confidence: Math.max(0, Math.min(1, height)) };
}
