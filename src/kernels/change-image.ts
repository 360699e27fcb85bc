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
  for (let p = 0, i = 0; p < n; p++, i += 3) {
    let d = x[i] - y[i];
    let m = d < 0 ? -d : d;
    d = x[i + 1] - y[i + 1];
    if (d < 0) d = -d;
    if (d > m) m = d;
    d = x[i + 2] - y[i + 2];
    if (d < 0) d = -d;
    if (d > m) m = d;
    dst[p] = weight ? Math.round(m * weight[p]) : m;
  }
  return out;
}

/** Collapse an RGB difference image (from absDiff) by the same max rule. */
export function maxOfChannels(diff: RgbFrame): GreyFrame {
  checkFrame('diff', diff, 3);
  const out = makeGrey(diff.width, diff.height);
  const s = diff.data;
  for (let p = 0, i = 0; p < out.data.length; p++, i += 3) {
    let m = s[i];
    if (s[i + 1] > m) m = s[i + 1];
    if (s[i + 2] > m) m = s[i + 2];
    out.data[p] = m;
  }
  return out;
}
