/**
 * Float image helpers for the flow pyramid: separable Gaussian blur with mirrored borders
 * (reflect-101, "dcb|abcd|cba") and bilinear resize with pixel-centre alignment
 * (src = (dst + 0.5) * scale - 0.5, clamped at the edges). These are the conventions of the
 * reference implementation the flow is checked against (OpenCV's GaussianBlur and resize).
 */
import type { FloatImage } from '../frame.js';

/** Gaussian taps for an odd size; sigma <= 0 takes the fixed 3-tap [1/4, 1/2, 1/4] kernel. */
export function gaussianTaps(size: number, sigma: number): Float64Array {
  if (sigma <= 0 && size === 3) return Float64Array.of(0.25, 0.5, 0.25);
  const s = sigma > 0 ? sigma : 0.3 * ((size - 1) * 0.5 - 1) + 0.8;
  const taps = new Float64Array(size);
  const c = (size - 1) / 2;
  let sum = 0;
  for (let i = 0; i < size; i++) {
    taps[i] = Math.exp(-((i - c) ** 2) / (2 * s * s));
    sum += taps[i];
  }
  for (let i = 0; i < size; i++) taps[i] /= sum;
  return taps;
}

function reflect101(i: number, n: number): number {
  if (n === 1) return 0;
  while (i < 0 || i >= n) i = i < 0 ? -i : 2 * n - 2 - i;
  return i;
}

export function gaussianBlur(src: FloatImage, size: number, sigma: number): FloatImage {
  const taps = gaussianTaps(size, sigma);
  const r = (size - 1) / 2;
  const { width: w, height: h, channels: ch } = src;
  // Border indices precomputed once per axis: the inner loops then only multiply and add.
  const xs = new Int32Array((w + 2 * r));
  for (let i = -r; i < w + r; i++) xs[i + r] = reflect101(i, w);
  const ys = new Int32Array((h + 2 * r));
  for (let i = -r; i < h + r; i++) ys[i + r] = reflect101(i, h);
  const tmp = new Float32Array(src.data.length);
  const out = new Float32Array(src.data.length);
  const s = src.data;
  for (let y = 0; y < h; y++) {
    const row = y * w;
    for (let x = 0; x < w; x++) {
      for (let c = 0; c < ch; c++) {
        let acc = 0;
        for (let k = 0; k < size; k++) acc += taps[k] * s[(row + xs[x + k]) * ch + c];
        tmp[(row + x) * ch + c] = acc;
      }
    }
  }
  const stride = w * ch;
  for (let y = 0; y < h; y++) {
    const o = y * stride;
    for (let k = 0; k < size; k++) {
      const t = taps[k];
      const src0 = ys[y + k] * stride;
      for (let i = 0; i < stride; i++) out[o + i] += t * tmp[src0 + i];
    }
  }
  return { width: w, height: h, channels: ch, data: out };
}

/** Source index and fraction of each output position along one axis, clamped at the edges. */
function sourceTaps(outSize: number, inSize: number): { index: Int32Array; frac: Float64Array } {
  const scale = inSize / outSize;
  const index = new Int32Array(outSize);
  const frac = new Float64Array(outSize);
  for (let o = 0; o < outSize; o++) {
    const f = (o + 0.5) * scale - 0.5;
    const i = Math.floor(f);
    if (i < 0) index[o] = 0;
    else if (i >= inSize - 1) index[o] = inSize - 1;
    else {
      index[o] = i;
      frac[o] = f - i;
    }
  }
  return { index, frac };
}

export function resizeBilinear(src: FloatImage, width: number, height: number): FloatImage {
  const { width: sw, height: sh, channels: ch } = src;
  const out = new Float32Array(width * height * ch);
  const xt = sourceTaps(width, sw);
  const yt = sourceTaps(height, sh);
  for (let y = 0; y < height; y++) {
    const iy = yt.index[y];
    const fy = yt.frac[y];
    const iy1 = Math.min(sh - 1, iy + 1);
    for (let x = 0; x < width; x++) {
      const i0 = xt.index[x];
      const i1 = Math.min(sw - 1, i0 + 1);
      const fx = xt.frac[x];
      for (let c = 0; c < ch; c++) {
        const a = src.data[(iy * sw + i0) * ch + c];
        const b = src.data[(iy * sw + i1) * ch + c];
        const d = src.data[(iy1 * sw + i0) * ch + c];
        const e = src.data[(iy1 * sw + i1) * ch + c];
        out[(y * width + x) * ch + c] = (a + fx * (b - a)) * (1 - fy) + (d + fx * (e - d)) * fy;
      }
    }
  }
  return { width, height, channels: ch, data: out };
}
