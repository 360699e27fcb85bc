/**
 * Shift compensation: resample a frame so that content moved by (dx, dy) goes back, by bilinear
 * interpolation: out(x, y) = src(x + dx, y + dy). Pixels whose source lies outside the frame get
 * validity 0, so differencing ignores the strip the camera shake uncovered.
 */
import { invalidArgument } from '../shared/errors.js';
import { checkNumber } from '../shared/validate.js';
import { checkFrame, makeGrey, type Frame, type GreyFrame } from './frame.js';

export function translateBilinear<T extends Frame>(src: T, dx: number, dy: number): { frame: T; valid: GreyFrame } {
  checkFrame('src', src);
  checkNumber('dx', dx, -src.width, src.width);
  checkNumber('dy', dy, -src.height, src.height);
  const { width: w, height: h, channels: ch } = src;
  const out = new Uint8Array(src.data.length);
  const s = src.data;
  for (let y = 0; y < h; y++) {
    const sy = y + dy;
    const y0 = Math.min(h - 1, Math.max(0, Math.floor(sy)));
    const y1 = Math.min(h - 1, y0 + 1);
    const fy = Math.min(1, Math.max(0, sy - y0));
    for (let x = 0; x < w; x++) {
      const sx = x + dx;
      const x0 = Math.min(w - 1, Math.max(0, Math.floor(sx)));
      const x1 = Math.min(w - 1, x0 + 1);
      const fx = Math.min(1, Math.max(0, sx - x0));
      const o = (y * w + x) * ch;
      const a = (y0 * w + x0) * ch;
      const b = (y0 * w + x1) * ch;
      const c = (y1 * w + x0) * ch;
      const d = (y1 * w + x1) * ch;
      for (let k = 0; k < ch; k++) {
        const top = s[a + k] + fx * (s[b + k] - s[a + k]);
        const bot = s[c + k] + fx * (s[d + k] - s[c + k]);
        out[o + k] = Math.round(top + fy * (bot - top));
      }
    }
  }
  return { frame: { ...src, data: out }, valid: makeGrey(w, h, translateValidity(w, h, dx, dy)) };
}

/** Intersection of two validity masks (255 = valid); `a` absent means everything valid. */
export function andValidity(a: Uint8Array | undefined, b: Uint8Array): Uint8Array {
  if (!a) return b;
  const out = new Uint8Array(b.length);
  for (let i = 0; i < b.length; i++) out[i] = a[i] && b[i] ? 255 : 0;
  return out;
}

/**
 * Where a frame shifted by translateBilinear(src, dx, dy) still holds analysable data: 255 where
 * the source lies inside the frame and all four source pixels are analysable in `mask` (255 =
 * analyse), 0 elsewhere. Without the mask, only the frame's edges count. An ignored region (a
 * camera's data strip) moves with the frame it belongs to: a shift of a pixel brings the strip's
 * edge into the analysed area unless the mask moves too.
 */
export function translateValidity(width: number, height: number, dx: number, dy: number, mask?: Uint8Array): Uint8Array {
  checkNumber('dx', dx, -width, width);
  checkNumber('dy', dy, -height, height);
  if (mask && mask.length !== width * height) throw invalidArgument('mask.length', String(width * height), mask.length);
  const out = new Uint8Array(width * height);
  for (let y = 0; y < height; y++) {
    const sy = y + dy;
    if (sy < 0 || sy > height - 1) continue;
    const y0 = Math.floor(sy);
    const y1 = Math.min(height - 1, y0 + 1);
    for (let x = 0; x < width; x++) {
      const sx = x + dx;
      if (sx < 0 || sx > width - 1) continue;
      const x0 = Math.floor(sx);
      const x1 = Math.min(width - 1, x0 + 1);
      if (mask && !(mask[y0 * width + x0] && mask[y0 * width + x1] && mask[y1 * width + x0] && mask[y1 * width + x1])) continue;
      out[y * width + x] = 255;
    }
  }
  return out;
}
