/**
 * Photometric normalisation: a per-channel gain and offset that map `current` onto `reference`
 * (reference ~ gain * current + offset), fitted robustly so that a moving subject, which covers
 * a minority of pixels, does not bias it. Iteratively re-fitted least squares keeping pixels
 * whose residual is within 3 robust sigmas (1.4826 MAD) of the previous fit; clipped pixels
 * (0 or 255) are left out because they carry no exposure information.
 * This is what keeps an exposure step, a cloud or the IR lamp changing power from reading as
 * motion.
 */
import { LITTLE_ENDIAN, checkFrame, checkSameShape, type Frame } from './frame.js';

export interface GainOffset {
  gain: number[];
  offset: number[];
}

const MAX_SAMPLES = 6000;
const GAIN_LIMITS = [0.25, 4] as const;
// Trimmed least-squares refits after the robust start.
const ITERATIONS = 3;

// Scratch reused across calls, fixed in size: step = floor(nPix / MAX_SAMPLES) keeps the sample
// count below 2 * MAX_SAMPLES. Module constants rather than arguments: the histogram loops below
// ran about three times faster on them in V8 than on the same arrays passed in (measured
// 2026-12-03 on Node 20; the whole fit 1.6x); why V8 compiles them so differently we did not
// establish.
const SAMPLE_CAP = 2 * MAX_SAMPLES;
const xs = new Float64Array(SAMPLE_CAP);
const ys = new Float64Array(SAMPLE_CAP);
const res = new Float64Array(SAMPLE_CAP);

function fitChannel(ref: Uint8Array, cur: Uint8Array, ch: number, c: number, valid?: Uint8Array): [number, number] {
  const nPix = ref.length / ch;
  const step = Math.max(1, Math.floor(nPix / MAX_SAMPLES));
  let n = 0;
  for (let p = 0; p < nPix; p += step) {
    if (valid && !valid[p]) continue;
    const x = cur[p * ch + c];
    const y = ref[p * ch + c];
    // Branch-free: every sample is written, and counted only when neither value is clipped
    // ((v + 1) & 0xfe is 0 exactly for 0 and 255).
    xs[n] = x;
    ys[n] = y;
    n += +(((x + 1) & 0xfe) !== 0 && ((y + 1) & 0xfe) !== 0);
  }
  if (n < 16) return [1, 0];
  let gain = theilSenSlope(n);
  let offset = offsetMedian(n, gain);
  let limit = residualLimit(n, gain, offset);
  for (let iter = 0; iter < ITERATIONS; iter++) {
    let k = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    // Weighted by "kept" (0 or 1) rather than skipped: which samples are kept is unpredictable,
    // and a branch on it was mispredicted often enough to double the cost.
    for (let i = 0; i < n; i++) {
      const kw = +(res[i] <= limit);
      const x = kw * xs[i];
      k += kw;
      sx += x;
      sy += kw * ys[i];
      sxx += x * xs[i];
      sxy += x * ys[i];
    }
    if (k < 16) break;
    const vx = sxx - (sx * sx) / k;
    gain = vx > 1e-6 ? (sxy - (sx * sy) / k) / vx : 1;
    gain = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], gain));
    offset = (sy - gain * sx) / k;
    if (iter < ITERATIONS - 1) limit = residualLimit(n, gain, offset);
  }
  return [gain, offset];
}

/**
 * The median of a histogram's samples: the centre of the bin where the running count reaches
 * half of `total` (the upper median for an even count, as sorting would give at bin resolution).
 */
function histogramMedian(hist: Uint32Array, bins: number, total: number): number {
  let acc = 0;
  const half = total >> 1;
  for (let b = 0; b < bins; b++) {
    acc += hist[b];
    if (acc > half) return b;
  }
  return bins - 1;
}

// Starting gain: a Theil-Sen estimate (median of pairwise slopes, breakdown point 29%), so the
// trimming below starts from a fit the subject has not pulled. Pairs are a fixed stride apart:
// deterministic, and far enough to span the brightness range. Slopes are binned on the clamped
// gain range at 1/1024 steps (the median of clamped values is the clamped median); this is only
// the start of the trimmed least squares below, which sets the final value.
const SLOPE_STEP = 1 / 1024;
const SLOPE_BINS = Math.ceil((GAIN_LIMITS[1] - GAIN_LIMITS[0]) / SLOPE_STEP) + 1;
const slopeHist = new Uint32Array(SLOPE_BINS + 1);
// A starting value needs far fewer pairs than the fit has samples.
const SLOPE_PAIRS = 1500;
function theilSenSlope(n: number): number {
  const hist = slopeHist;
  hist.fill(0);
  const stride = Math.floor(n / 3) + 1;
  const every = Math.max(1, Math.floor(n / SLOPE_PAIRS));
  let m = 0;
  for (let i = 0; i < n; i += every) {
    // j = (i + stride) mod n, without the division.
    const j = i + stride - n * +(i + stride >= n);
    const ddx = xs[j] - xs[i];
    // Pairs closer than 8 levels in x give unstable slopes; they go to the spare last bin,
    // without a branch (which pairs qualify is data-dependent).
    const ok = +(Math.abs(ddx) >= 8);
    const slope = (ys[j] - ys[i]) / (ok * ddx + 1 - ok);
    // Clamped as a double, then truncated (a rounded double index is slower to use).
    const bin = Math.min(SLOPE_BINS - 1, Math.max(0, (slope - GAIN_LIMITS[0]) / SLOPE_STEP + 0.5)) | 0;
    hist[ok * bin + (1 - ok) * SLOPE_BINS]++;
    m += ok;
  }
  if (m === 0) return 1;
  return GAIN_LIMITS[0] + histogramMedian(hist, SLOPE_BINS, m) * SLOPE_STEP;
}

// Starting offset: the median residual at the starting gain, binned at 1/8 level over the
// range residuals can take (x, y in 1..254 and gain in [0.25, 4]: -1016 < y - gain x < 254).
const OFFSET_STEP = 1 / 8;
const OFFSET_MIN = -1024;
const OFFSET_BINS = (256 - OFFSET_MIN) / OFFSET_STEP;
const offsetHist = new Uint32Array(OFFSET_BINS);
function offsetMedian(n: number, gain: number): number {
  const hist = offsetHist;
  hist.fill(0);
  for (let i = 0; i < n; i++) hist[Math.min(OFFSET_BINS - 1, Math.max(0, (ys[i] - gain * xs[i] - OFFSET_MIN) / OFFSET_STEP + 0.5)) | 0]++;
  return OFFSET_MIN + histogramMedian(hist, OFFSET_BINS, n) * OFFSET_STEP;
}

const BINS = 2048;
const residualHist = new Uint32Array(BINS);

/**
 * Stores each sample's absolute residual from the line and returns the keep limit: 3 robust
 * sigmas (1.4826 MAD), the median taken from a 1/8-level histogram.
 */
function residualLimit(n: number, gain: number, offset: number): number {
  const hist = residualHist;
  hist.fill(0);
  for (let i = 0; i < n; i++) {
    const r = Math.abs(ys[i] - (gain * xs[i] + offset));
    res[i] = r;
    hist[Math.min(BINS - 1, r * 8) | 0]++;
  }
  const med = (histogramMedian(hist, BINS, n) + 0.5) / 8;
  return 3 * Math.max(1, 1.4826 * med);
}

export function fitGainOffset(reference: Frame, current: Frame, valid?: Uint8Array): GainOffset {
  checkFrame('reference', reference);
  checkFrame('current', current);
  checkSameShape('reference', reference, 'current', current);
  const gain: number[] = [];
  const offset: number[] = [];
  for (let c = 0; c < reference.channels; c++) {
    const [g, o] = fitChannel(reference.data, current.data, reference.channels, c, valid);
    gain.push(g);
    offset.push(o);
  }
  return { gain, offset };
}

export function applyGainOffset<T extends Frame>(frame: T, go: GainOffset): T {
  checkFrame('frame', frame);
  const ch = frame.channels;
  const out = new Uint8Array(frame.data.length);
  const s = frame.data;
  const luts: Uint8Array[] = [];
  for (let c = 0; c < ch; c++) {
    const lut = new Uint8Array(256);
    for (let v = 0; v < 256; v++) lut[v] = Math.min(255, Math.max(0, Math.round(go.gain[c] * v + go.offset[c])));
    luts.push(lut);
  }
  if (ch === 3) {
    // One pass over interleaved RGB (three strided passes cost twice as much). Where the bytes
    // sit on a 4-byte boundary, four pixels at a time as three 32-bit words, whose bytes cycle
    // R G B R | G B R G | B R G B (little-endian: the lowest byte first): 1.6x faster than bytes.
    const [l0, l1, l2] = luts;
    let i = 0;
    if (LITTLE_ENDIAN && s.byteOffset % 4 === 0) {
      const a = new Int32Array(s.buffer, s.byteOffset, s.length >> 2);
      const o = new Int32Array(out.buffer, 0, s.length >> 2);
      const n = a.length - (a.length % 3);
      for (let k = 0; k < n; k += 3) {
        const x = a[k], y = a[k + 1], z = a[k + 2];
        o[k] = l0[x & 255] | (l1[(x >>> 8) & 255] << 8) | (l2[(x >>> 16) & 255] << 16) | (l0[x >>> 24] << 24);
        o[k + 1] = l1[y & 255] | (l2[(y >>> 8) & 255] << 8) | (l0[(y >>> 16) & 255] << 16) | (l1[y >>> 24] << 24);
        o[k + 2] = l2[z & 255] | (l0[(z >>> 8) & 255] << 8) | (l1[(z >>> 16) & 255] << 16) | (l2[z >>> 24] << 24);
      }
      i = 4 * n;
    }
    for (; i < s.length; i += 3) {
      out[i] = l0[s[i]];
      out[i + 1] = l1[s[i + 1]];
      out[i + 2] = l2[s[i + 2]];
    }
  } else {
    for (let c = 0; c < ch; c++) for (let i = c; i < s.length; i += ch) out[i] = luts[c][s[i]];
  }
  return { ...frame, data: out };
}
