/**
 * Per-pixel absolute difference of two frames of one shape, every channel kept.
 * Output type decision: |uint8 - uint8| -> uint8 (no sign kept; the sign of a change is not
 * evidence of a subject, and uint8 halves memory traffic). Same result as OpenCV's absdiff.
 */
import { checkFrame, checkSameShape, type Frame } from './frame.js';

export function absDiff<T extends Frame>(a: T, b: T, out?: Uint8Array): T {
  checkFrame('a', a);
  checkFrame('b', b);
  checkSameShape('a', a, 'b', b);
  const n = a.data.length;
  const dst = out ?? new Uint8Array(n);
  const x = a.data;
  const y = b.data;
  // Branch-free |d| (sign mask): the sign of a noise difference is a coin toss, and a
  // mispredicted branch per byte cost three times the arithmetic.
  for (let i = 0; i < n; i++) {
    const d = x[i] - y[i];
    const s = d >> 31;
    dst[i] = (d ^ s) - s;
  }
  return { ...a, data: dst };
}
