/**
 * 2-D complex FFT over power-of-two sizes on top of the radix-4 1-D transform of the npm package
 * fft.js: rows transformed, the matrix transposed, rows transformed again, transposed back (the
 * transposes keep every 1-D transform on contiguous memory, which is what makes it fast in
 * JavaScript). Data: interleaved re/im, row-major. fft2dReal takes a real image and uses
 * fft.js's real-input row transform, half the work of the first pass.
 */
import FFT from 'fft.js';
import { invalidArgument } from '../shared/errors.js';

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

function checkSize(width: number, height: number): void {
  if (!isPowerOfTwo(width)) throw invalidArgument('width', 'power of two >= 2', width);
  if (!isPowerOfTwo(height)) throw invalidArgument('height', 'power of two >= 2', height);
}

/** Complex transpose of a w x h interleaved matrix into h x w. */
function transpose(src: Float64Array, w: number, h: number, dst: Float64Array): void {
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const s = (y * w + x) * 2;
      const d = (x * h + y) * 2;
      dst[d] = src[s];
      dst[d + 1] = src[s + 1];
    }
  }
}

/** Transforms every row of a (rows x n) interleaved matrix in place. */
function rows(data: Float64Array, n: number, count: number, inverse: boolean): void {
  const f = new FFT(n);
  const tmp = new Float64Array(2 * n);
  for (let r = 0; r < count; r++) {
    const row = data.subarray(r * 2 * n, (r + 1) * 2 * n);
    if (inverse) f.inverseTransform(tmp, row);
    else f.transform(tmp, row);
    row.set(tmp);
  }
}

function columnsThenBack(data: Float64Array, width: number, height: number, inverse: boolean): Float64Array {
  const t = new Float64Array(data.length);
  transpose(data, width, height, t);
  rows(t, height, width, inverse);
  transpose(t, height, width, data);
  return data;
}

export function fft2d(data: Float64Array, width: number, height: number, inverse: boolean): Float64Array {
  checkSize(width, height);
  const out = Float64Array.from(data);
  rows(out, width, height, inverse);
  return columnsThenBack(out, width, height, inverse);
}

/** Forward transform of a real width x height image (row-major); returns the full complex spectrum. */
export function fft2dReal(real: Float64Array, width: number, height: number): Float64Array {
  checkSize(width, height);
  if (real.length !== width * height) throw invalidArgument('real.length', String(width * height), real.length);
  const out = new Float64Array(width * height * 2);
  const f = new FFT(width);
  const tmp = new Float64Array(2 * width);
  for (let y = 0; y < height; y++) {
    f.realTransform(tmp, real.subarray(y * width, (y + 1) * width));
    f.completeSpectrum(tmp);
    out.set(tmp, y * 2 * width);
  }
  return columnsThenBack(out, width, height, false);
}
