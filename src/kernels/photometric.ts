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

export interface GainOffset {
  gain: number[];
  offset: number[];
}

const MAX_SAMPLES = 6000;
const GAIN_LIMITS = [0.25, 4] as const;

function fitChannel(ref: Uint8Array, cur: Uint8Array, ch: number, c: number, valid?: Uint8Array): [number, number] {
  const nPix = ref.length / ch;
  const step = Math.max(1, Math.floor(nPix / MAX_SAMPLES));
  const xs: number[] = [];
  const ys: number[] = [];
  for (let p = 0; p < nPix; p += step) {
    if (valid && !valid[p]) continue;
    const x = cur[p * ch + c];
    const y = ref[p * ch + c];
    if (x === 0 || x === 255 || y === 0 || y === 255) continue;
    xs.push(x);
    ys.push(y);
  }
  if (xs.length < 16) return [1, 0];
  // Start from a Theil-Sen estimate (median of pairwise slopes, breakdown point 29%), so the
  // trimming below starts from a fit the subject has not pulled. Pairs are a fixed stride apart:
  // deterministic, and far enough to span the brightness range.
  const slopes: number[] = [];
  const stride = Math.max(1, Math.floor(xs.length / 3) + 1);
  for (let i = 0; i < xs.length; i += Math.max(1, Math.floor(xs.length / 4000))) {
    const j = (i + stride) % xs.length;
    const ddx = xs[j] - xs[i];
    if (Math.abs(ddx) >= 8) slopes.push((ys[j] - ys[i]) / ddx);
  }
  let gain = slopes.length ? median(slopes) : 1;
  gain = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], gain));
  let offset = median(xs.map((x, i) => ys[i] - gain * x));
  let keep = residualKeep(xs, ys, gain, offset);
  for (let iter = 0; iter < 3; iter++) {
    let n = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
    for (let i = 0; i < xs.length; i++) {
      if (!keep[i]) continue;
      n++;
      sx += xs[i];
      sy += ys[i];
      sxx += xs[i] * xs[i];
      sxy += xs[i] * ys[i];
    }
    if (n < 16) break;
    const vx = sxx - (sx * sx) / n;
    gain = vx > 1e-6 ? (sxy - (sx * sy) / n) / vx : 1;
    gain = Math.min(GAIN_LIMITS[1], Math.max(GAIN_LIMITS[0], gain));
    offset = (sy - gain * sx) / n;
    keep = residualKeep(xs, ys, gain, offset);
  }
  return [gain, offset];
}

function median(values: number[]): number {
  const s = Float64Array.from(values).sort();
  return s[s.length >> 1];
}

function residualKeep(xs: number[], ys: number[], gain: number, offset: number): Uint8Array {
  const res = xs.map((x, i) => Math.abs(ys[i] - (gain * x + offset)));
  const sigma = Math.max(1, 1.4826 * median(res));
  return Uint8Array.from(res, (r) => (r <= 3 * sigma ? 1 : 0));
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
  for (let c = 0; c < ch; c++) {
    const lut = new Uint8Array(256);
    for (let v = 0; v < 256; v++) lut[v] = Math.min(255, Math.max(0, Math.round(go.gain[c] * v + go.offset[c])));
    for (let i = c; i < s.length; i += ch) out[i] = lut[s[i]];
  }
  return { ...frame, data: out };
}
