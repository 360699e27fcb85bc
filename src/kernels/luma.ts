/**
 * Luma per ITU-R BT.601: Y' = 0.299 R' + 0.587 G' + 0.114 B'.
 * Output type: uint8 for the grey path (rounded half up), float for kernels that need precision.
 */
import { checkFrame, makeFloat, makeGrey, type FloatImage, type GreyFrame, type RgbFrame } from './frame.js';

export const BT601 = { r: 0.299, g: 0.587, b: 0.114 } as const;

export function toLuma(rgb: RgbFrame): GreyFrame {
  checkFrame('rgb', rgb, 3);
  const out = makeGrey(rgb.width, rgb.height);
  const src = rgb.data;
  const dst = out.data;
  for (let i = 0, j = 0; j < dst.length; i += 3, j++) {
    dst[j] = Math.round(BT601.r * src[i] + BT601.g * src[i + 1] + BT601.b * src[i + 2]);
  }
  return out;
}

export function toLumaFloat(rgb: RgbFrame): FloatImage {
  checkFrame('rgb', rgb, 3);
  const out = makeFloat(rgb.width, rgb.height);
  const src = rgb.data;
  const dst = out.data;
  for (let i = 0, j = 0; j < dst.length; i += 3, j++) {
    dst[j] = BT601.r * src[i] + BT601.g * src[i + 1] + BT601.b * src[i + 2];
  }
  return out;
}
