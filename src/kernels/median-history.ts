/**
 * A video background from history: the exact per-pixel temporal median of frames sampled at an
 * even interval over the last `windowS` seconds. A subject that passes or hovers for less than
 * half the window never enters it, so when it leaves there is no "ghost" where it was, which an
 * exponential running average leaves for several of its time constants (the running average
 * learns whatever stays a while). Lighting that changes slowly is followed within the window.
 * The caller owns the state object; the kernel holds none.
 */
import { checkInteger, checkNumber } from '../shared/validate.js';
import { checkFrame, checkSameShape, type RgbFrame } from './frame.js';
import { temporalMedian } from './temporal-median.js';

export interface MedianHistory {
  windowS: number;
  samples: number;
  samplesTaken: RgbFrame[];
  lastSampleT: number;
  background: RgbFrame | undefined;
}

export function createMedianHistory(windowS: number, samples: number): MedianHistory {
  checkNumber('windowS', windowS, 0.1, 86_400);
  checkInteger('samples', samples, 1, 255);
  return { windowS, samples, samplesTaken: [], lastSampleT: -Infinity, background: undefined };
}

/** Offers a frame at time t (s); it is kept when a sample is due. Returns the current background. */
export function offerFrame(h: MedianHistory, frame: RgbFrame, t: number): RgbFrame {
  checkFrame('frame', frame, 3);
  if (h.samplesTaken.length) checkSameShape('history', h.samplesTaken[0], 'frame', frame);
  const every = h.samples > 1 ? h.windowS / (h.samples - 1) : h.windowS;
  if (t - h.lastSampleT >= every || !h.background) {
    h.samplesTaken.push(frame);
    if (h.samplesTaken.length > h.samples) h.samplesTaken.shift();
    h.lastSampleT = t;
    h.background = temporalMedian(h.samplesTaken);
  }
  return h.background;
}
