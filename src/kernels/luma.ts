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
  // The same weights in 16-bit fixed point (0.299, 0.587, 0.114 times 65536, rounded so they sum
  // to 65536), plus a half for rounding: integer arithmetic, several times faster than floats.
  for (let i = 0, j = 0; j < dst.length; i += 3, j++) {
    dst[j] = (19595 * src[i] + 38470 * src[i + 1] + 7471 * src[i + 2] + 32768) >>> 16;
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

/** Median absolute difference of two luma images over valid pixels, interpolated in its bin. */
export function medianAbsLumaDiff(a: GreyFrame, b: GreyFrame, valid?: Uint8Array): number {
  const hist = new Uint32Array(256);
  let n = 0;
  for (let i = 0; i < a.data.length; i++) {
    if (valid && !valid[i]) continue;
    hist[Math.abs(a.data[i] - b.data[i])]++;
    n++;
  }
  let acc = 0;
  for (let v = 0; v < 256; v++) {
    acc += hist[v];
    if (acc >= n / 2) return v + 0.5 - (acc - n / 2) / Math.max(1, hist[v]);
  }
  return 255;
}
