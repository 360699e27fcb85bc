/**
 * 3x3 binary morphology on uint8 masks (0/255). Pixels outside the image are ignored, which is
 * OpenCV's default border for erode/dilate/morphologyEx (the constant "morphology default
 * border"). Opening removes speckle (rain, sensor noise); closing bridges small gaps inside a
 * subject so that one animal gives one blob.
 */
import { checkFrame, makeGrey, type GreyFrame } from './frame.js';

function pass(src: GreyFrame, isErode: boolean): GreyFrame {
  const { width: w, height: h } = src;
  const s = src.data;
  // Separable: a 3x3 square is a 1x3 then a 3x1 min/max.
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    for (let x = 0; x < w; x++) {
      let v = s[r + x];
      if (x > 0) v = isErode ? Math.min(v, s[r + x - 1]) : Math.max(v, s[r + x - 1]);
      if (x < w - 1) v = isErode ? Math.min(v, s[r + x + 1]) : Math.max(v, s[r + x + 1]);
      tmp[r + x] = v;
    }
  }
  const out = makeGrey(w, h);
  const d = out.data;
  for (let y = 0; y < h; y++) {
    const r = y * w;
    for (let x = 0; x < w; x++) {
      let v = tmp[r + x];
      if (y > 0) v = isErode ? Math.min(v, tmp[r - w + x]) : Math.max(v, tmp[r - w + x]);
      if (y < h - 1) v = isErode ? Math.min(v, tmp[r + w + x]) : Math.max(v, tmp[r + w + x]);
      d[r + x] = v;
    }
  }
  return out;
}

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
