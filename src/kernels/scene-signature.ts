/**
 * Two numbers that describe what a camera sees in one frame, kept per trigger so that a whole
 * deployment's health can be judged afterwards without decoding anything again
 * (deployment-health.ts): how bright (mean luma, ITU-R BT.601 weights) and how much detail (mean
 * absolute luma difference between horizontal and vertical neighbours: a fogged, wet or covered
 * lens loses it). Pixels outside an ignore mask (the data strip) are left out.
 */
import { checkFrame, checkSameShape, type GreyFrame, type RgbFrame } from './frame.js';
import { toLuma } from './luma.js';

export interface SceneSignature {
  /** Mean luma, 0-255. */
  luma: number;
  /** Mean absolute difference between neighbouring pixels' luma, grey levels. */
  texture: number;
}

export function sceneSignature(frame: RgbFrame, mask?: GreyFrame): SceneSignature {
  checkFrame('frame', frame, 3);
  if (mask) checkSameShape('frame', { ...frame, channels: 1 }, 'mask', mask);
  const { width: w, height: h } = frame;
  const y = toLuma(frame).data;
  const m = mask?.data;
  let total = 0, n = 0, diff = 0, pairs = 0;
  for (let r = 0; r < h; r++) {
    for (let c = 0; c < w; c++) {
      const i = r * w + c;
      if (m && !m[i]) continue;
      const v = y[i];
      total += v;
      n++;
      if (c + 1 < w && (!m || m[i + 1])) {
        diff += Math.abs(v - y[i + 1]);
        pairs++;
      }
      if (r + 1 < h && (!m || m[i + w])) {
        diff += Math.abs(v - y[i + w]);
        pairs++;
      }
    }
  }
  const round = (v: number, d: number) => Math.round(v * 10 ** d) / 10 ** d;
  return { luma: round(n ? total / n : 0, 2), texture: round(pairs ? diff / pairs : 0, 3) };
}
