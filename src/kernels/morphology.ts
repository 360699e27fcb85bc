/**
 * 3x3 binary morphology on uint8 masks (0/255). Pixels outside the image are ignored, which is
 * OpenCV's default border for erode/dilate/morphologyEx (the constant "morphology default
 * border"). Opening removes speckle (rain, sensor noise); closing bridges small gaps inside a
 * subject so that one animal gives one blob.
 */
import { checkFrame, makeGrey, type GreyFrame } from './frame.js';

/** Branch-free minimum and maximum of two bytes (sign mask of the difference). */
function min(a: number, b: number): number {
  const k = a - b;
  return b + (k & (k >> 31));
}
function max(a: number, b: number): number {
  const k = a - b;
  return a - (k & (k >> 31));
}

// Separable: a 3x3 square is a 1x3 then a 3x1 min (erode) or max (dilate). Written out once per
// operation, borders apart from the interior, so the inner loops have no branches on the
// operation, the position or the data (masks flip unpredictably at blob edges).
function erodePass(src: GreyFrame): GreyFrame {
  const { width: w, height: h } = src;
  const s = src.data;
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    if (w === 1) {
      tmp[r] = s[r];
      continue;
    }
    tmp[r] = s[r] < s[r + 1] ? s[r] : s[r + 1];
    for (let x = r + 1, end = r + w - 1; x < end; x++) {
      tmp[x] = min(min(s[x - 1], s[x]), s[x + 1]);
    }
    const e = r + w - 1;
    tmp[e] = s[e] < s[e - 1] ? s[e] : s[e - 1];
  }
  const out = makeGrey(w, h);
  const d = out.data;
  if (h === 1) {
    d.set(tmp);
    return out;
  }
  for (let x = 0; x < w; x++) d[x] = tmp[x] < tmp[x + w] ? tmp[x] : tmp[x + w];
  for (let i = w, end = (h - 1) * w; i < end; i++) {
    d[i] = min(min(tmp[i - w], tmp[i]), tmp[i + w]);
  }
  for (let i = (h - 1) * w; i < h * w; i++) d[i] = tmp[i] < tmp[i - w] ? tmp[i] : tmp[i - w];
  return out;
}

function dilatePass(src: GreyFrame): GreyFrame {
  const { width: w, height: h } = src;
  const s = src.data;
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    if (w === 1) {
      tmp[r] = s[r];
      continue;
    }
    tmp[r] = s[r] > s[r + 1] ? s[r] : s[r + 1];
    for (let x = r + 1, end = r + w - 1; x < end; x++) {
      tmp[x] = max(max(s[x - 1], s[x]), s[x + 1]);
    }
    const e = r + w - 1;
    tmp[e] = s[e] > s[e - 1] ? s[e] : s[e - 1];
  }
  const out = makeGrey(w, h);
  const d = out.data;
  if (h === 1) {
    d.set(tmp);
    return out;
  }
  for (let x = 0; x < w; x++) d[x] = tmp[x] > tmp[x + w] ? tmp[x] : tmp[x + w];
  for (let i = w, end = (h - 1) * w; i < end; i++) {
    d[i] = max(max(tmp[i - w], tmp[i]), tmp[i + w]);
  }
  for (let i = (h - 1) * w; i < h * w; i++) d[i] = tmp[i] > tmp[i - w] ? tmp[i] : tmp[i - w];
  return out;
}

const pass = (src: GreyFrame, isErode: boolean): GreyFrame => (isErode ? erodePass(src) : dilatePass(src));

export function erode3x3(src: GreyFrame): GreyFrame {
  return pass(checkFrame('src', src, 1), true);
}
export function dilate3x3(src: GreyFrame): GreyFrame {
  return pass(checkFrame('src', src, 1), false);
}
export function open3x3(src: GreyFrame): GreyFrame {
  return pass(pass(checkFrame('src', src, 1), true), false);
}
export function close3x3(src: GreyFrame): GreyFrame {
  return pass(pass(checkFrame('src', src, 1), false), true);
}
