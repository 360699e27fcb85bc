/**
 * A clean plate: what a camera sees with nobody there, from several of its triggers, each of
 * which may hold a visitor of its own. A plain per-pixel median removes a visitor that stands in
 * fewer than half of the triggers; on a game trail or at a bait station visitors stand at the
 * same place in half of them or more, and the median keeps their ghost. Subject rejection: each
 * trigger says where it saw something move (its own burst's frames disagree there), and at each
 * pixel the median is taken only over the triggers that saw nothing move there.
 *
 * Leaving samples judged foreground out of the background estimate is common practice in
 * background modelling (the "selective update" that Toyama et al. review in "Wallflower",
 * ICCV 1999; cited from memory); here the estimate is a median. The foreground of a
 * trigger comes from two of its own frames, so it marks where its visitor moved; a visitor that
 * stood still through its whole burst is not marked, and only the median (others outnumbering
 * it) removes it.
 *
 * Output type: uint8 RGB like the inputs.
 *
 * Change together: deployment-background.ts (which aligns the triggers and their masks and calls
 * this), pipeline/scan.ts imageNeighbours (which picks each trigger's second frame).
 */
import { notEnoughFrames, sizeMismatch } from '../shared/errors.js';
import { checkNumber } from '../shared/validate.js';
import { maxChannelChange } from './change-image.js';
import { checkFrame, checkSameShape, makeGrey, type GreyFrame, type RgbFrame } from './frame.js';
import { dilate3x3, open3x3 } from './morphology.js';
import { estimateChangeNoise } from './noise.js';

/**
 * A pixel is the trigger's foreground where its two frames differ by more than this many noise
 * sigmas (the per-channel sigma of the pair, noise.ts) and by more than FOREGROUND_LEVELS grey
 * levels. Four sigmas: under Gaussian noise the max of three channels passes it at about 2 in
 * 10,000 pixels, so a still trigger marks almost nothing. Our choice, not fitted: marking too
 * much only leaves fewer triggers at a pixel, marking too little leaves a ghost.
 */
export const FOREGROUND_SIGMAS = 4;
export const FOREGROUND_LEVELS = 6;
/** Dilations (3x3 each) of the marked pixels: a subject's soft edge and shadow differ by less
 *  than the threshold but are still the subject's. */
export const FOREGROUND_GROW = 2;

export interface ForegroundOptions {
  /** 255 = compare, 0 = ignore (data strip): ignored pixels are never foreground. */
  mask?: Uint8Array;
  sigmas?: number;
  levels?: number;
  grow?: number;
}

/**
 * Where a trigger saw something move, from two of its own frames (255 = moved), and the noise
 * sigma of the pair (noise.ts, from the median change): a pair whose sigma is well above its
 * peers' was shaken or changed exposure between its frames, and its marks follow every edge of
 * the picture, not a visitor (cleanPlate leaves such marks out).
 */
export function triggerForeground(first: RgbFrame, second: RgbFrame, o: ForegroundOptions = {}): { marks: GreyFrame; sigma: number } {
  checkFrame('first', first, 3);
  checkFrame('second', second, 3);
  checkSameShape('first', first, 'second', second);
  const n = first.width * first.height;
  if (o.mask && o.mask.length !== n) throw sizeMismatch('mask.length', String(n), String(o.mask.length));
  const sigmas = o.sigmas ?? FOREGROUND_SIGMAS;
  const levels = o.levels ?? FOREGROUND_LEVELS;
  const grow = o.grow ?? FOREGROUND_GROW;
  checkNumber('sigmas', sigmas, 0, 100);
  checkNumber('levels', levels, 0, 255);
  checkNumber('grow', grow, 0, 20);
  const change = maxChannelChange(first, second);
  const sigma = estimateChangeNoise(change, 'max3', o.mask);
  const limit = Math.max(levels, sigmas * sigma);
  let fg = makeGrey(first.width, first.height);
  for (let i = 0; i < n; i++) if (change.data[i] > limit && (!o.mask || o.mask[i])) fg.data[i] = 255;
  // Opened first: a visitor is a solid region, while single noisy pixels and the thin edges of
  // a data strip's changing glyphs are not, and those are marked in every trigger alike.
  fg = open3x3(fg);
  for (let k = 0; k < grow; k++) fg = dilate3x3(fg);
  return { marks: fg, sigma };
}

/**
 * A trigger's marks are used only while its pair's noise sigma stays within this factor (plus
 * half a grey level for very clean frames) of the calmest pair among the triggers offered: the
 * same camera's sensor noise. Above it the pair was shaken, changed exposure or moved all over
 * in wind, and marking its edges would make the plate a patchwork of triggers under different
 * light (every seam a change the event would see). Our choice, not fitted.
 */
export const FOREGROUND_PEER_FACTOR = 1.5;

/** Each trigger's marks, or undefined where its pair was far noisier than the calmest pair. */
export function calmMarks(found: readonly ({ marks: GreyFrame; sigma: number } | undefined)[], factor = FOREGROUND_PEER_FACTOR): (Uint8Array | undefined)[] {
  checkNumber('factor', factor, 1, 100);
  const sigmas = found.filter((f) => f !== undefined).map((f) => f.sigma);
  if (sigmas.length === 0) return found.map(() => undefined);
  const limit = factor * Math.min(...sigmas) + 0.5;
  return found.map((f) => (f && f.sigma <= limit ? f.marks.data : undefined));
}

/**
 * A trigger whose two frames differ over more than this share of the analysed frame (camera
 * shake, a light change, wind in all the vegetation) says nothing about where a visitor stood:
 * its marks are not used. Our choice, not fitted: a visitor the size of a deer close to the
 * lens covers about a fifth of the frame in each of two frames.
 */
export const FOREGROUND_MAX_SHARE = 0.35;

export interface CleanPlate {
  frame: RgbFrame;
  /** Pixels where the clean plate replaced the plain median (visitors in half the triggers or more). */
  replaced: number;
  /** Pixels where every trigger was foreground (the plain median stands there). */
  unresolved: number;
  /** Triggers whose marks were not used (they covered too much of the frame). */
  ignored: number;
}

/**
 * The plain per-pixel median of all triggers, except where half of them or more mark the pixel
 * as their foreground (the plain median is then at risk of being a visitor): there, the median
 * of the triggers that do not mark it (the plain median where all do). Only at risk: the
 * triggers differ in light, and a median whose members change from pixel to pixel draws seams
 * along every mark's edge, each seam a change the event would see. `foreground[k]` absent:
 * trigger k marks nothing. Even counts average the middle pair rounded half up, as
 * temporal-median.ts does, so with no marks this is exactly temporalMedian.
 */
export function cleanPlate(frames: readonly RgbFrame[], foreground: readonly (Uint8Array | undefined)[], o: { maxShare?: number } = {}): CleanPlate {
  if (!Array.isArray(frames) || frames.length === 0) throw notEnoughFrames('frames', 1, frames?.length ?? 0);
  frames.forEach((f, k) => {
    checkFrame(`frames[${k}]`, f, 3);
    checkSameShape('frames[0]', frames[0], `frames[${k}]`, f);
  });
  if (foreground.length !== frames.length) throw sizeMismatch('foreground.length', String(frames.length), String(foreground.length));
  const maxShare = o.maxShare ?? FOREGROUND_MAX_SHARE;
  checkNumber('maxShare', maxShare, 0, 1);
  const { width, height } = frames[0];
  const n = width * height;
  foreground.forEach((m, k) => {
    if (m && m.length !== n) throw sizeMismatch(`foreground[${k}].length`, String(n), String(m.length));
  });
  let ignored = 0;
  const marks = foreground.map((m) => {
    if (!m) return undefined;
    let on = 0;
    for (let i = 0; i < n; i++) if (m[i]) on++;
    if (on > maxShare * n) {
      ignored++;
      return undefined;
    }
    return on ? m : undefined;
  });
  const out = new Uint8Array(n * 3);
  const srcs = frames.map((f) => f.data);
  const count = frames.length;
  const pick = new Int32Array(count);
  const buf = new Uint8Array(count);
  let unresolved = 0;
  let replaced = 0;
  for (let i = 0; i < n; i++) {
    let m = 0;
    for (let k = 0; k < count; k++) if (!marks[k]?.[i]) pick[m++] = k;
    if (2 * (count - m) < count || m === 0) {
      if (m === 0) unresolved++;
      for (let k = 0; k < count; k++) pick[k] = k;
      m = count;
    } else if (m < count) replaced++;
    for (let c = 0; c < 3; c++) {
      // Insertion sort of at most a handful of values (neighbouring triggers).
      for (let j = 0; j < m; j++) {
        const v = srcs[pick[j]][i * 3 + c];
        let q = j - 1;
        while (q >= 0 && buf[q] > v) {
          buf[q + 1] = buf[q];
          q--;
        }
        buf[q + 1] = v;
      }
      const mid = m >> 1;
      out[i * 3 + c] = m & 1 ? buf[mid] : (buf[mid - 1] + buf[mid] + 1) >> 1;
    }
  }
  return { frame: { ...frames[0], data: out }, replaced, unresolved, ignored };
}
