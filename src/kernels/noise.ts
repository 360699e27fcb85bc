/**
 * Noise level of a change image from the median, a robust estimator: the subject occupies a
 * minority of pixels, so the median sees only noise (Hampel, JASA 1974; the 1.4826 MAD factor).
 *
 * For |d| with d ~ N(0, s^2): median(|d|) = 0.6745 s. For the max over three channels of
 * independent |d_c| (change-image.ts): P(max < m) = (2 Phi(m/s) - 1)^3 = 1/2 gives
 * m = 1.2637 s. Both constants are exact quantiles of the normal distribution, computed below.
 */
import { checkOneOf } from '../shared/validate.js';
import { checkFrame, type GreyFrame } from './frame.js';

export const HALF_NORMAL_MEDIAN = 0.6744897501960817; // Phi^-1(0.75)
export const MAX3_HALF_NORMAL_MEDIAN = 1.2637; // solves (2 Phi(m) - 1)^3 = 0.5, see noise.test.ts

export type ChangeRule = 'single' | 'max3';

/** Median of a uint8 image (optionally where `mask` is nonzero), by histogram; -1 when empty. */
export function medianU8(data: Uint8Array, mask?: Uint8Array): number {
  const hist = new Uint32Array(256);
  let n = 0;
  for (let i = 0; i < data.length; i++) {
    if (mask && !mask[i]) continue;
    hist[data[i]]++;
    n++;
  }
  if (n === 0) return -1;
  // Interpolated median inside the bin, so quantised noise of small sigma does not snap to 0.
  const half = n / 2;
  let acc = 0;
  for (let v = 0; v < 256; v++) {
    if (acc + hist[v] >= half) {
      // Bin v holds values that rounded to v: [v - 0.5, v + 0.5), or [0, 0.5) for v = 0.
      const lo = v === 0 ? 0 : v - 0.5;
      const width = v === 0 ? 0.5 : 1;
      return lo + (width * (half - acc)) / hist[v];
    }
    acc += hist[v];
  }
  return 255;
}

/** Sigma of the per-channel noise behind a change image made with `rule`. */
export function estimateChangeNoise(change: GreyFrame, rule: ChangeRule, mask?: Uint8Array): number {
  checkFrame('change', change, 1);
  checkOneOf('rule', rule, ['single', 'max3'] as const);
  const med = medianU8(change.data, mask);
  if (med <= 0) return 0;
  return med / (rule === 'max3' ? MAX3_HALF_NORMAL_MEDIAN : HALF_NORMAL_MEDIAN);
}
