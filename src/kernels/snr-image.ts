/**
 * Change image in units of noise: snr = round(SNR_SCALE * change / sigma), clipped to 255,
 * times a per-pixel weight (0 in ignore regions, the restless discount elsewhere). Putting every
 * change image on this one scale makes the thresholds noise-adaptive: the same settings hold
 * in bright day, grainy infrared night and murky water.
 */
import { SNR_SCALE } from './params.js';
import { makeGrey, type GreyFrame } from './frame.js';
import { estimateChangeNoise } from './noise.js';

export function toSnr(change: GreyFrame, minNoise: number, mask?: Uint8Array, weight?: Float32Array): { snr: GreyFrame; sigma: number } {
  const sigma = Math.max(minNoise, estimateChangeNoise(change, 'max3', mask));
  const out = makeGrey(change.width, change.height);
  const k = SNR_SCALE / sigma;
  const c = change.data;
  const d = out.data;
  for (let i = 0; i < c.length; i++) {
    if (mask && !mask[i]) continue;
    let v = c[i] * k;
    if (weight) v *= weight[i];
    d[i] = v > 255 ? 255 : Math.round(v);
  }
  return { snr: out, sigma };
}

export function maxImage(a: GreyFrame, b: GreyFrame): GreyFrame {
  const out = makeGrey(a.width, a.height);
  for (let i = 0; i < out.data.length; i++) out.data[i] = a.data[i] > b.data[i] ? a.data[i] : b.data[i];
  return out;
}

export function orMask(a: GreyFrame, b: GreyFrame): GreyFrame {
  const out = makeGrey(a.width, a.height);
  for (let i = 0; i < out.data.length; i++) out.data[i] = a.data[i] | b.data[i];
  return out;
}

export function minImage(a: GreyFrame, b: GreyFrame): GreyFrame {
  const out = makeGrey(a.width, a.height);
  for (let i = 0; i < out.data.length; i++) out.data[i] = a.data[i] < b.data[i] ? a.data[i] : b.data[i];
  return out;
}
