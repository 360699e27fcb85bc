/**
 * Automatic detection of a camera's data strip: the band along the top or bottom edge on which
 * the camera prints date, time, frame counter and temperature. It changes every frame, so left
 * alone it reads as motion in every trigger.
 *
 * Common practice, no published method: a strip is a run of rows from the edge whose pixels
 * mostly share one flat, unsaturated value (the bar) with text on it, ending in a sharp step to
 * the picture. A row is bar-like when at least `flatShare` of its pixels lie within `tol` (4 grey
 * levels: a printed bar is digitally flat, a picture row carries texture and sensor noise) of the
 * edge row's bar value and carry little colour. Dark scenes can make picture rows bar-like too,
 * so a run taller than `maxShare` of the height is taken as picture, not strip.
 */
import { checkNumber } from '../shared/validate.js';
import { checkFrame, makeGrey, type GreyFrame, type RgbFrame } from './frame.js';

export interface DataStrip {
  top: number;
  bottom: number;
}

export interface StripOptions {
  flatShare?: number;
  tol?: number;
  maxShare?: number;
}

function barValue(f: RgbFrame, y: number): number {
  const hist = new Uint32Array(64);
  for (let x = 0; x < f.width; x++) {
    const i = (y * f.width + x) * 3;
    hist[(0.299 * f.data[i] + 0.587 * f.data[i + 1] + 0.114 * f.data[i + 2]) >> 2]++;
  }
  let best = 0;
  for (let b = 1; b < 64; b++) if (hist[b] > hist[best]) best = b;
  return best * 4 + 2;
}

function flatShareOf(f: RgbFrame, y: number, value: number, tol: number): number {
  let n = 0;
  for (let x = 0; x < f.width; x++) {
    const i = (y * f.width + x) * 3;
    const r = f.data[i], g = f.data[i + 1], b = f.data[i + 2];
    const luma = 0.299 * r + 0.587 * g + 0.114 * b;
    const chroma = Math.max(r, g, b) - Math.min(r, g, b);
    if (Math.abs(luma - value) <= tol && chroma <= 24) n++;
  }
  return n / f.width;
}

function runFromEdge(f: RgbFrame, fromTop: boolean, o: Required<StripOptions>): number {
  const edgeRow = fromTop ? 0 : f.height - 1;
  const value = barValue(f, edgeRow);
  const limit = Math.floor(f.height * o.maxShare);
  let rows = 0;
  let misses = 0;
  for (let k = 0; k < f.height; k++) {
    const y = fromTop ? k : f.height - 1 - k;
    if (flatShareOf(f, y, value, o.tol) >= o.flatShare) {
      rows = k + 1;
      misses = 0;
    } else if (++misses > 1) {
      break; // one row of dense text is tolerated; two in a row end the bar
    }
    if (k > limit) return 0;
  }
  return rows >= 2 && rows <= limit ? rows : 0;
}

/** Finds the strip on a frame: rows to ignore at the top and bottom (0 when none). */
export function detectDataStrip(frame: RgbFrame, options: StripOptions = {}): DataStrip {
  checkFrame('frame', frame, 3);
  const o = { flatShare: 0.6, tol: 4, maxShare: 0.12, ...options };
  checkNumber('flatShare', o.flatShare, 0.05, 1);
  checkNumber('tol', o.tol, 0, 128);
  checkNumber('maxShare', o.maxShare, 0.005, 0.5);
  const top = runFromEdge(frame, true, o);
  const bottom = runFromEdge(frame, false, o);
  // Pad by one row: JPEG ringing at the bar's edge changes with the text above it.
  return { top: top ? Math.min(frame.height, top + 1) : 0, bottom: bottom ? Math.min(frame.height, bottom + 1) : 0 };
}

/** Detects on every frame of an event and keeps the widest band seen (the strip is fixed). */
export function detectDataStripInFrames(frames: readonly RgbFrame[], options?: StripOptions): DataStrip {
  let top = 0;
  let bottom = 0;
  for (const f of frames) {
    const s = detectDataStrip(f, options);
    top = Math.max(top, s.top);
    bottom = Math.max(bottom, s.bottom);
  }
  return { top, bottom };
}

/** An analysis mask (255 analyse, 0 ignore) from a strip and an optional caller-given mask. */
export function ignoreMask(width: number, height: number, strip: DataStrip, given?: GreyFrame): GreyFrame {
  const m = makeGrey(width, height);
  m.data.fill(255);
  if (given) {
    checkFrame('given', given, 1);
    for (let i = 0; i < m.data.length; i++) if (given.data[i] === 0) m.data[i] = 0;
  }
  m.data.fill(0, 0, strip.top * width);
  m.data.fill(0, (height - strip.bottom) * width);
  return m;
}
