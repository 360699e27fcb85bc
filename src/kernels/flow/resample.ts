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
  // Vertically: each output summed over the taps in double precision, rounded to float32 once.
  const stride = w * ch;
  const rows = new Int32Array(size);
  for (let y = 0; y < h; y++) {
    const o = y * stride;
    for (let k = 0; k < size; k++) rows[k] = ys[y + k] * stride;
    for (let i = 0; i < stride; i++) {
      let acc = 0;
      for (let k = 0; k < size; k++) acc += taps[k] * tmp[rows[k] + i];
      out[o + i] = acc;
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
  // Everything the loops read is a local: property loads inside them left the optimised code
  // without feedback for the lines after the loop, and each call fell back to the interpreter.
  if (ch === 1) resizeRows1(src.data, out, sw, sh, width, height, xt.index, xt.frac, yt.index, yt.frac);
  else resizeRows(src.data, out, sw, sh, ch, width, height, xt.index, xt.frac, yt.index, yt.frac);
  return { width, height, channels: ch, data: out };
}

function resizeRows(s: Float32Array, out: Float32Array, sw: number, sh: number, ch: number, width: number, height: number, xi: Int32Array, xf: Float64Array, yi: Int32Array, yf: Float64Array): void {
  for (let y = 0; y < height; y++) {
    const iy = yi[y];
    const fy = yf[y];
    const iy1 = Math.min(sh - 1, iy + 1);
    for (let x = 0; x < width; x++) {
      const i0 = xi[x];
      const i1 = Math.min(sw - 1, i0 + 1);
      const fx = xf[x];
      for (let c = 0; c < ch; c++) {
        const a = s[(iy * sw + i0) * ch + c];
        const b = s[(iy * sw + i1) * ch + c];
        const d = s[(iy1 * sw + i0) * ch + c];
        const e = s[(iy1 * sw + i1) * ch + c];
        out[(y * width + x) * ch + c] = (a + fx * (b - a)) * (1 - fy) + (d + fx * (e - d)) * fy;
      }
    }
  }
}

/** resizeRows for one channel (the pyramid's images): no loop of one inside, the same arithmetic. */
function resizeRows1(s: Float32Array, out: Float32Array, sw: number, sh: number, width: number, height: number, xi: Int32Array, xf: Float64Array, yi: Int32Array, yf: Float64Array): void {
  for (let y = 0, o = 0; y < height; y++) {
    const fy = yf[y];
    const r = yi[y] * sw;
    const r1 = Math.min(sh - 1, yi[y] + 1) * sw;
    for (let x = 0; x < width; x++, o++) {
      const i0 = xi[x];
      const i1 = Math.min(sw - 1, i0 + 1);
      const fx = xf[x];
      const a = s[r + i0];
      const b = s[r + i1];
      const d = s[r1 + i0];
      const e = s[r1 + i1];
      out[o] = (a + fx * (b - a)) * (1 - fy) + (d + fx * (e - d)) * fy;
    }
  }
}

/**
 * resizeBilinear(gaussianBlur(src, size, sigma), width, height) for a grey image, computing the
 * blur only where the resize reads it: the source columns and rows its bilinear taps touch. A
 * coarse pyramid level reads a few percent of the blurred image, so this skips most of the
 * blur. The arithmetic is the same, in the same order and with the same float32 roundings, so
 * the result is bit for bit the two-step one (tested).
 */
export function blurThenResize(src: FloatImage, size: number, sigma: number, width: number, height: number): FloatImage {
  if (src.channels !== 1) return resizeBilinear(gaussianBlur(src, size, sigma), width, height);
  const taps = gaussianTaps(size, sigma);
  const r = (size - 1) / 2;
  const { width: w, height: h } = src;
  const s = src.data;
  const xt = sourceTaps(width, w);
  const yt = sourceTaps(height, h);
  // Which source columns and rows the resize reads (each output tap and its right/lower neighbour).
  const needCol = new Uint8Array(w);
  for (let x = 0; x < width; x++) {
    needCol[xt.index[x]] = 1;
    needCol[Math.min(w - 1, xt.index[x] + 1)] = 1;
  }
  const needRow = new Uint8Array(h);
  for (let y = 0; y < height; y++) {
    needRow[yt.index[y]] = 1;
    needRow[Math.min(h - 1, yt.index[y] + 1)] = 1;
  }
  const xs = new Int32Array(w + 2 * r);
  for (let i = -r; i < w + r; i++) xs[i + r] = reflect101(i, w);
  const ys = new Int32Array(h + 2 * r);
  for (let i = -r; i < h + r; i++) ys[i + r] = reflect101(i, h);
  // Rows the vertical taps of the needed rows reach.
  const needTmpRow = new Uint8Array(h);
  for (let y = 0; y < h; y++) if (needRow[y]) for (let k = 0; k < size; k++) needTmpRow[ys[y + k]] = 1;
  // Horizontal pass at the needed columns of those rows (float32, as gaussianBlur stores it),
  // then the vertical pass at the needed rows and columns, each sum in double precision in
  // gaussianBlur's order, rounded to float32 once. Each loop shape is a function of its own: one
  // function holding them all was optimised for the first shape it ran and thrown back to the
  // interpreter whenever a pyramid level took another.
  const colList = Int32Array.from(needCol.keys()).filter((x) => needCol[x] === 1);
  const all = colList.length === w;
  const tmp = new Float32Array(w * h);
  const blurred = new Float32Array(w * h);
  if (size === 3 && all && w > 2) {
    for (let y = 0; y < h; y++) if (needTmpRow[y]) rowBlur3(s, tmp, y * w, w, taps, xs);
    for (let y = 0; y < h; y++) if (needRow[y]) columnBlur3(tmp, blurred, y * w, ys[y] * w, ys[y + 1] * w, ys[y + 2] * w, w, taps);
  } else {
    for (let y = 0; y < h; y++) if (needTmpRow[y]) rowBlurAt(s, tmp, y * w, w, colList, taps, xs);
    const rows = new Int32Array(size);
    for (let y = 0; y < h; y++) {
      if (!needRow[y]) continue;
      for (let k = 0; k < size; k++) rows[k] = ys[y + k] * w;
      columnBlurAt(tmp, blurred, y * w, rows, colList, taps);
    }
  }
  const image: FloatImage = { width: w, height: h, channels: 1, data: blurred };
  // At the same size the bilinear taps fall on the pixels themselves (fraction 0): the resize
  // would copy every value unchanged.
  return width === w && height === h ? image : resizeBilinear(image, width, height);
}

/** One row with the 3-tap kernel unrolled, the two end pixels through the mirror table. */
function rowBlur3(s: Float32Array, tmp: Float32Array, row: number, w: number, taps: Float64Array, xs: Int32Array): void {
  const t0 = taps[0], t1 = taps[1], t2 = taps[2];
  tmp[row] = 0 + t0 * s[row + xs[0]] + t1 * s[row + xs[1]] + t2 * s[row + xs[2]];
  // The three source values slide along in locals, two outputs a step (one new read each);
  // with the column pass below two a step, the 3-tap levels about 1.3x faster.
  let p = s[row], q = s[row + 1];
  let b = row + 2;
  for (const end = row + w - 1; b < end; b += 2) {
    const r = s[b], u = s[b + 1];
    tmp[b - 1] = 0 + t0 * p + t1 * q + t2 * r;
    tmp[b] = 0 + t0 * q + t1 * r + t2 * u;
    p = r;
    q = u;
  }
  if (b === row + w - 1) tmp[b - 1] = 0 + t0 * p + t1 * q + t2 * s[b];
  tmp[row + w - 1] = 0 + t0 * s[row + xs[w - 1]] + t1 * s[row + xs[w]] + t2 * s[row + xs[w + 1]];
}

/** One output row of the 3-tap vertical pass from source rows a, b, c. */
function columnBlur3(tmp: Float32Array, out: Float32Array, o: number, a: number, b: number, c: number, w: number, taps: Float64Array): void {
  const t0 = taps[0], t1 = taps[1], t2 = taps[2];
  // Two a step (V8 does not unroll).
  let x = 0;
  for (; x + 1 < w; x += 2) {
    out[o + x] = 0 + t0 * tmp[a + x] + t1 * tmp[b + x] + t2 * tmp[c + x];
    out[o + x + 1] = 0 + t0 * tmp[a + x + 1] + t1 * tmp[b + x + 1] + t2 * tmp[c + x + 1];
  }
  if (x < w) out[o + x] = 0 + t0 * tmp[a + x] + t1 * tmp[b + x] + t2 * tmp[c + x];
}

/** One row at the listed columns: straight along the row away from the ends, through the mirror table near them. */
function rowBlurAt(s: Float32Array, tmp: Float32Array, row: number, w: number, cols: Int32Array, taps: Float64Array, xs: Int32Array): void {
  const size = taps.length;
  const r = (size - 1) >> 1;
  for (let c = 0; c < cols.length; c++) {
    const x = cols[c];
    let acc = 0;
    if (x >= r && x + r < w) {
      // Two taps a step (V8 does not unroll loops), added in the same order: the 9-tap level
      // 14% faster. The size is odd: the last tap after the loop.
      const b = row + x - r;
      let k = 0;
      for (; k < size - 1; k += 2) {
        acc += taps[k] * s[b + k];
        acc += taps[k + 1] * s[b + k + 1];
      }
      acc += taps[k] * s[b + k];
    } else {
      for (let k = 0; k < size; k++) acc += taps[k] * s[row + xs[x + k]];
    }
    tmp[row + x] = acc;
  }
}

/** One output row of the vertical pass at the listed columns, from the source rows `rows`. */
function columnBlurAt(tmp: Float32Array, out: Float32Array, o: number, rows: Int32Array, cols: Int32Array, taps: Float64Array): void {
  const size = taps.length;
  for (let c = 0; c < cols.length; c++) {
    const x = cols[c];
    let acc = 0;
    let k = 0;
    for (; k < size - 1; k += 2) {
      acc += taps[k] * tmp[rows[k] + x];
      acc += taps[k + 1] * tmp[rows[k + 1] + x];
    }
    acc += taps[k] * tmp[rows[k] + x];
    out[o + x] = acc;
  }
}
