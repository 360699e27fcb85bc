/**
 * 2-D FFT of real images over power-of-two sizes, on top of the radix-4 1-D transforms of the
 * npm package fft.js. Only the non-redundant half of the spectrum is computed and kept (a real
 * image's spectrum is Hermitian), stored transposed so that every column transform runs on
 * contiguous memory, which is what makes it fast in JavaScript.
 */
import FFT from 'fft.js';
import { invalidArgument } from '../shared/errors.js';
import { perSize } from './frame.js';

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

function checkSize(width: number, height: number): void {
  if (!isPowerOfTwo(width)) throw invalidArgument('width', 'power of two >= 2', width);
  if (!isPowerOfTwo(height)) throw invalidArgument('height', 'power of two >= 2', height);
}

/** Scratch and transforms for one size, reused across calls. */
interface HalfPlan {
  fw: FFT;
  fh: FFT;
  /** One row's spectrum (forward) or one row pair's full spectrum and its inverse. */
  rowIn: Float64Array;
  rowOut: Float64Array;
  /** One column's transform. */
  colOut: Float64Array;
  /** The inverse column transforms, in the transposed half layout. */
  colsDone: Float64Array;
}
const plan = perSize(
  (w, h): HalfPlan => ({ fw: new FFT(w), fh: new FFT(h), rowIn: new Float64Array(2 * w), rowOut: new Float64Array(2 * w), colOut: new Float64Array(2 * h), colsDone: new Float64Array(((w >> 1) + 1) * h * 2) }),
);

/**
 * Forward transform of a real width x height image, keeping only the non-redundant half of the
 * spectrum (a real image's spectrum is Hermitian: F(-u, -v) = conj F(u, v)). The result is stored
 * transposed, one contiguous row of `height` complex values per horizontal frequency
 * u = 0..width/2: element (u, v) at index 2 * (u * height + v). Half the column work of fft2dReal.
 */
export function fft2dRealHalf(real: Float64Array, width: number, height: number, out?: Float64Array): Float64Array {
  checkSize(width, height);
  if (real.length !== width * height) throw invalidArgument('real.length', String(width * height), real.length);
  const p = plan(width, height);
  const cols = (width >> 1) + 1;
  const dst = out && out.length === cols * height * 2 ? out : new Float64Array(cols * height * 2);
  const row = p.rowOut;
  // Rows: real transforms, scattered straight into the transposed layout.
  for (let y = 0; y < height; y++) {
    p.fw.realTransform(row, real.subarray(y * width, (y + 1) * width));
    for (let u = 0; u < cols; u++) {
      const d = 2 * (u * height + y);
      dst[d] = row[2 * u];
      dst[d + 1] = row[2 * u + 1];
    }
  }
  // Columns: each is contiguous now.
  const n2 = 2 * height;
  const tmp = p.colOut;
  for (let u = 0; u < cols; u++) {
    const col = dst.subarray(u * n2, (u + 1) * n2);
    p.fh.transform(tmp, col);
    col.set(tmp);
  }
  return dst;
}

/**
 * Inverse of fft2dRealHalf: from the transposed half spectrum back to the real width x height
 * image (scaled by 1 / (width * height), like the complex inverse). The input is not changed.
 * Two image rows share one complex inverse transform (row a in the real part, row b in the
 * imaginary part), the usual two-for-one trick for real outputs.
 */
export function ifft2dHalfToReal(half: Float64Array, width: number, height: number, out?: Float64Array): Float64Array {
  checkSize(width, height);
  const cols = (width >> 1) + 1;
  if (half.length !== cols * height * 2) throw invalidArgument('half.length', String(cols * height * 2), half.length);
  const p = plan(width, height);
  const n2 = 2 * height;
  // Columns first (inverse over v), into a scratch of the same transposed layout.
  const colsDone = p.colsDone;
  for (let u = 0; u < cols; u++) p.fh.inverseTransform(colsDone.subarray(u * n2, (u + 1) * n2), half.subarray(u * n2, (u + 1) * n2));
  const dst = out && out.length === width * height ? out : new Float64Array(width * height);
  const z = p.rowIn;
  const zt = p.rowOut;
  for (let y = 0; y < height; y += 2) {
    const y2 = y + 1;
    // Z(u) = A(u) + i B(u) for the full row spectrum, A and B Hermitian in u:
    // A(width - u) = conj A(u).
    for (let u = 0; u < cols; u++) {
      const ia = 2 * (u * height + y);
      const ib = ia + 2;
      const ar = colsDone[ia], ai = colsDone[ia + 1];
      const br = colsDone[ib], bi = colsDone[ib + 1];
      z[2 * u] = ar - bi;
      z[2 * u + 1] = ai + br;
      if (u > 0 && u < cols - 1) {
        const m = 2 * (width - u);
        z[m] = ar + bi;
        z[m + 1] = br - ai;
      }
    }
    p.fw.inverseTransform(zt, z);
    for (let x = 0; x < width; x++) {
      dst[y * width + x] = zt[2 * x];
      dst[y2 * width + x] = zt[2 * x + 1];
    }
  }
  return dst;
}
