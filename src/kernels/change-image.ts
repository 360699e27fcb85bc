/**
 * One change image from per-channel differences.
 *
 * Rule: change = max(|dR|, |dG|, |dB|), optionally zeroed where the ignore weight is 0 and
 * scaled by a per-pixel weight in 0..1 (restless-pixel discount). The maximum, not luma, is
 * used so that a subject whose brightness matches the background but whose hue does not still
 * registers: a missed animal costs more than a blank kept. Under Gaussian sensor noise the max
 * of three half-normal channel differences has its median at 1.2637 sigma (see noise.ts), so
 * the noise estimate stays calibrated for this rule.
 */
import { checkFrame, checkSameShape, makeGrey, type GreyFrame, type RgbFrame } from './frame.js';
import { sizeMismatch } from '../shared/errors.js';

export function maxChannelChange(a: RgbFrame, b: RgbFrame, weight?: Float32Array): GreyFrame {
  checkFrame('a', a, 3);
  checkFrame('b', b, 3);
  checkSameShape('a', a, 'b', b);
  const n = a.width * a.height;
  if (weight && weight.length !== n) throw sizeMismatch('weight.length', String(n), String(weight.length));
  const out = makeGrey(a.width, a.height);
  const x = a.data;
  const y = b.data;
  const dst = out.data;
  // Branch-free absolute values and maxima (sign masks): noise differences have random signs
  // and random order, so every branch here would be mispredicted half the time (measured: a
  // branchy loop took 6x as long on real frames).
  for (let p = 0, i = 0; p < n; p++, i += 3) {
    let d0 = x[i] - y[i];
    let s = d0 >> 31;
    d0 = (d0 ^ s) - s;
    let d1 = x[i + 1] - y[i + 1];
    s = d1 >> 31;
    d1 = (d1 ^ s) - s;
    let d2 = x[i + 2] - y[i + 2];
    s = d2 >> 31;
    d2 = (d2 ^ s) - s;
    dst[p] = max3(d0, d1, d2);
  }
  if (weight) for (let p = 0; p < n; p++) dst[p] = Math.round(dst[p] * weight[p]);
  return out;
}

/** max(a, b, c) for small non-negative integers, without branches. */
function max3(a: number, b: number, c: number): number {
  let k = a - b;
  const m = a - (k & (k >> 31));
  k = m - c;
  return m - (k & (k >> 31));
}

/** Collapse an RGB difference image (from absDiff) by the same max rule. */
export function maxOfChannels(diff: RgbFrame): GreyFrame {
  checkFrame('diff', diff, 3);
  const out = makeGrey(diff.width, diff.height);
  const s = diff.data;
  const d = out.data;
  for (let p = 0, i = 0; p < d.length; p++, i += 3) d[p] = max3(s[i], s[i + 1], s[i + 2]);
  return out;
}
