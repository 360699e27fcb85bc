/**
 * Exact per-pixel temporal median over the frames of a burst: the background a burst's subject
 * stands out from, immune to a subject present in fewer than half the frames.
 * For an even count the two middle values are averaged and rounded half up (so the result is
 * the same as sorting and taking the mean of the middle pair, then Math.round).
 * Output type: same as the inputs (uint8).
 */
import { notEnoughFrames } from '../shared/errors.js';
import { checkFrame, checkSameShape, type Frame } from './frame.js';

export function temporalMedian<T extends Frame>(frames: readonly T[]): T {
  if (!Array.isArray(frames) || frames.length === 0) throw notEnoughFrames('frames', 1, frames?.length ?? 0);
  const first = checkFrame('frames[0]', frames[0]);
  for (let k = 1; k < frames.length; k++) {
    checkFrame(`frames[${k}]`, frames[k]);
    checkSameShape('frames[0]', first, `frames[${k}]`, frames[k]);
  }
  const n = frames.length;
  const len = first.data.length;
  const out = new Uint8Array(len);
  if (n === 1) return { ...first, data: first.data.slice() };
  const buf = new Uint8Array(n);
  const srcs = frames.map((f) => f.data);
  const mid = n >> 1;
  for (let i = 0; i < len; i++) {
    // Insertion sort: bursts hold 2-30 frames, where this beats any selection algorithm.
    for (let k = 0; k < n; k++) {
      const v = srcs[k][i];
      let j = k - 1;
      while (j >= 0 && buf[j] > v) {
        buf[j + 1] = buf[j];
        j--;
      }
      buf[j + 1] = v;
    }
    out[i] = n & 1 ? buf[mid] : (buf[mid - 1] + buf[mid] + 1) >> 1;
  }
  return { ...first, data: out };
}
