/**
 * 2-D complex FFT over power-of-two sizes, row transforms then column transforms, on top of
 * the radix-4 1-D transform of the npm package fft.js. Data: interleaved re/im, row-major.
 */
import FFT from 'fft.js';
import { invalidArgument } from '../shared/errors.js';

export function isPowerOfTwo(n: number): boolean {
  return Number.isInteger(n) && n >= 2 && (n & (n - 1)) === 0;
}

export function fft2d(data: Float64Array, width: number, height: number, inverse: boolean): Float64Array {
  if (!isPowerOfTwo(width)) throw invalidArgument('width', 'power of two >= 2', width);
  if (!isPowerOfTwo(height)) throw invalidArgument('height', 'power of two >= 2', height);
  const out = new Float64Array(data.length);
  const rowIn = new Float64Array(width * 2);
  const rowOut = new Float64Array(width * 2);
  const fx = new FFT(width);
  for (let y = 0; y < height; y++) {
    rowIn.set(data.subarray(y * width * 2, (y + 1) * width * 2));
    if (inverse) fx.inverseTransform(rowOut, rowIn);
    else fx.transform(rowOut, rowIn);
    out.set(rowOut, y * width * 2);
  }
  const colIn = new Float64Array(height * 2);
  const colOut = new Float64Array(height * 2);
  const fy = new FFT(height);
  for (let x = 0; x < width; x++) {
    for (let y = 0; y < height; y++) {
      colIn[2 * y] = out[(y * width + x) * 2];
      colIn[2 * y + 1] = out[(y * width + x) * 2 + 1];
    }
    if (inverse) fy.inverseTransform(colOut, colIn);
    else fy.transform(colOut, colIn);
    for (let y = 0; y < height; y++) {
      out[(y * width + x) * 2] = colOut[2 * y];
      out[(y * width + x) * 2 + 1] = colOut[2 * y + 1];
    }
  }
  return out;
}
