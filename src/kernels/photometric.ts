/**
 * Photometric normalisation: a per-channel gain and offset that map `current` onto `reference`
 * (reference ~ gain * current + offset), fitted robustly so that a moving subject, which covers
 * a minority of pixels, does not bias it. Iteratively re-fitted least squares keeping pixels
 * whose residual is within 3 robust sigmas (1.4826 MAD) of the previous fit; clipped pixels
 * (0 or 255) are left out because they carry no exposure information.
 * This is what keeps an exposure step, a cloud or the IR lamp changing power from reading as
 * motion.
 */
import { checkFrame, checkSameShape, type Frame } from './frame.js';
import { upperMedian } from './select.js';

export interface GainOffset {
  gain: number[];
  offset: number[];
}

const MAX_SAMPLES = 6000;
const GAIN_LIMITS = [0.25, 4] as const;

function fitChannel(ref: Uint8Array, cur: Uint8Array, ch: number, c: number, valid?: Uint8Array): [number, number] {
  const nPix = ref.length / ch;
  const step = Math.max(1, Math.floor(nPix / MAX_SAMPLES));
  const xs = new Float64Array(Math.ceil(nPix / step));
  const ys = new Float64Array(xs.length);
  let n = 0;
  for (let p = 0; p < nPix; p += step) {
    if (valid && !valid[p]) continue;
    const x = cur[p * ch + c];
    const y = ref[p * ch + c];
    if (x === 0 || x === 255 || y === 0 || y === 255) continue;
    xs[n] = x;
    ys[n++] = y;
  }
  if (n < 16) return [1, 0];
  // Start from a Theil-Sen estimate (median of pairwise slopes, breakdown point 29%), so the
  // trimming below starts from a fit the subject has not pulled. Pairs are a fixed stride apart:
  // deterministic, and far enough to span the brightness range.
  const stride = Math.floor(n / 3) + 1;
  const slopes = new Float64Array(Math.min(n, 4000));
  let m = 0;
  for (let i = 0; i < n && m < slopes.length; i += Math.max(1, Math.floor(n / 4000))) {
    const j = (i + stride) % n;
    const ddx = xs[j] - xs[i];
    if (Math.abs(ddx) >= 8) slopes[m++] = (ys[j] - ys[i]) / ddx;
  }
  let gain = m ? median(slopes.subarray(0, m)) : 1;
  gain = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], gain));
  const res = new Float64Array(n);
  for (let i = 0; i < n; i++) res[i] = ys[i] - gain * xs[i];
  let offset = median(res);
  const keep = new Uint8Array(n);
  residualKeep(xs, ys, n, gain, offset, res, keep);
  for (let iter = 0; iter < 3; iter++) {
    let k = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    // Weighted by keep (0 or 1) rather than skipped: which samples are kept is unpredictable,
    // and a branch on it was mispredicted often enough to double the cost.
    for (let i = 0; i < n; i++) {
      const kw = keep[i];
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
    residualKeep(xs, ys, n, gain, offset, res, keep);
  }
  return [gain, offset];
}

/** The upper median, as sorting a copy would give it, by selection (select.ts). */
const median = (values: Float64Array): number => upperMedian(values);

const BINS = 2048;
const residualHist = new Uint32Array(BINS);

/** Marks samples within 3 robust sigmas of the line; the sigma's median comes from a 1/8-level histogram. */
function residualKeep(xs: Float64Array, ys: Float64Array, n: number, gain: number, offset: number, res: Float64Array, keep: Uint8Array): void {
  const hist = residualHist;
  hist.fill(0);
  for (let i = 0; i < n; i++) {
    const r = Math.abs(ys[i] - (gain * xs[i] + offset));
    res[i] = r;
    hist[Math.min(BINS - 1, (r * 8) | 0)]++;
  }
  let acc = 0;
  let med = 0;
  for (let b = 0; b < BINS; b++) {
    acc += hist[b];
    if (acc >= n / 2) {
      med = (b + 0.5) / 8;
      break;
    }
  }
  const limit = 3 * Math.max(1, 1.4826 * med);
  for (let i = 0; i < n; i++) keep[i] = +(res[i] <= limit);
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
    // One pass over interleaved RGB (three strided passes cost twice as much).
    const [l0, l1, l2] = luts;
    for (let i = 0; i < s.length; i += 3) {
      out[i] = l0[s[i]];
      out[i + 1] = l1[s[i + 1]];
      out[i + 2] = l2[s[i + 2]];
    }
  } else {
    for (let c = 0; c < ch; c++) for (let i = c; i < s.length; i += ch) out[i] = luts[c][s[i]];
  }
  return { ...frame, data: out };
}
