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
import { notEnoughFrames } from '../shared/errors.js';
import { checkNumber } from '../shared/validate.js';
import { checkFrame, checkSameShape, makeGrey, type GreyFrame, type RgbFrame } from './frame.js';
import { temporalMedian } from './temporal-median.js';

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

/** Share of row y's grey pixels within `tol` of the bar value, or of the ink value when one is
 *  given (a consensus frame keeps the printing that never changes: labels, fixed digits). A row
 *  without ink has no ringing: it is held to the digitally flat `flatTol`. */
function flatShareOf(f: RgbFrame, y: number, value: number, tol: number, ink = -1, flatTol = tol): number {
  if (ink < 0) tol = Math.min(tol, flatTol);
  let n = 0;
  for (let x = 0; x < f.width; x++) {
    const i = (y * f.width + x) * 3;
    const r = f.data[i], g = f.data[i + 1], b = f.data[i + 2];
    const luma = 0.299 * r + 0.587 * g + 0.114 * b;
    const chroma = Math.max(r, g, b) - Math.min(r, g, b);
    if ((Math.abs(luma - value) <= tol || (ink >= 0 && Math.abs(luma - ink) <= tol)) && chroma <= 24) n++;
  }
  return n / f.width;
}

/** The commonest luma (4-level bins) of row y at least 64 levels from the bar: the ink. */
function inkValue(f: RgbFrame, y: number, bar: number): number {
  const hist = new Uint32Array(64);
  for (let x = 0; x < f.width; x++) {
    const i = (y * f.width + x) * 3;
    const v = 0.299 * f.data[i] + 0.587 * f.data[i + 1] + 0.114 * f.data[i + 2];
    if (Math.abs(v - bar) >= 64) hist[v >> 2]++;
  }
  let best = -1;
  for (let b = 0; b < 64; b++) if (hist[b] > 0 && (best < 0 || hist[b] > hist[best])) best = b;
  return best < 0 ? -1 : best * 4 + 2;
}

function runFromEdge(f: RgbFrame, fromTop: boolean, o: Required<StripOptions>, withInk = false, flatTol = o.tol): number {
  const edgeRow = fromTop ? 0 : f.height - 1;
  const value = barValue(f, edgeRow);
  const limit = Math.floor(f.height * o.maxShare);
  let rows = 0;
  let misses = 0;
  for (let k = 0; k < f.height; k++) {
    const y = fromTop ? k : f.height - 1 - k;
    if (flatShareOf(f, y, value, o.tol, withInk ? inkValue(f, y, value) : -1, flatTol) >= o.flatShare) {
      rows = k + 1;
      misses = 0;
    } else if (++misses > 1) {
      break; // one row of dense text is tolerated; two in a row end the bar
    }
    if (k > limit) return 0;
  }
  return rows >= 2 && rows <= limit ? rows : 0;
}

function checkOptions(options: StripOptions): Required<StripOptions> {
  const o = { flatShare: 0.6, tol: 4, maxShare: 0.12, ...options };
  checkNumber('flatShare', o.flatShare, 0.05, 1);
  checkNumber('tol', o.tol, 0, 128);
  checkNumber('maxShare', o.maxShare, 0.005, 0.5);
  return o;
}

/** Finds the strip on a frame: rows to ignore at the top and bottom (0 when none). */
export function detectDataStrip(frame: RgbFrame, options: StripOptions = {}): DataStrip {
  checkFrame('frame', frame, 3);
  const o = checkOptions(options);
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

/**
 * The strip of a whole deployment, by consensus of frames from many of its triggers. Text that
 * fills a row (date, time, temperature and counter spread over the width, glyphs as tall as the
 * bar) leaves too few flat pixels in any one frame, so the per-frame test ends the strip at its
 * first rows of text and the glyphs below make blobs in every frame. Across triggers the
 * changing digits are ink in some frames and bar in most: the per-pixel temporal median keeps
 * the bar and only the printing that never changes (labels, fixed digits), which this test
 * then counts as strip too (the commonest luma at least 64 levels from the bar; a picture row
 * is neither flat nor two-valued). The picture varies between triggers, so its median stays
 * textured. Needs `MIN_CONSENSUS_FRAMES` frames of one size: fewer, and a picture detail that
 * happens to agree in most of them could pass.
 */
export const MIN_CONSENSUS_FRAMES = 5;

export function detectDataStripConsensus(frames: readonly RgbFrame[], options: StripOptions = {}): DataStrip {
  if (!Array.isArray(frames) || frames.length < MIN_CONSENSUS_FRAMES) throw notEnoughFrames('frames', MIN_CONSENSUS_FRAMES, frames?.length ?? 0);
  frames.forEach((f, i) => {
    checkFrame(`frames[${i}]`, f, 3);
    checkSameShape('frames[0]', frames[0], `frames[${i}]`, f);
  });
  // JPEG ringing around glyphs that fill the bar spreads the bar and the ink by up to about ten
  // levels at quality 55-75 (measured on the generator's strips written by sharp): the
  // consensus frame is judged with that margin, not the digitally flat 4 of a single frame.
  // Rows without ink keep the single frame's 4: a dark, smooth picture (a night sky) is flat
  // within 12 levels too, and must not pass for a bar.
  const o = checkOptions({ tol: 12, ...options });
  const flatTol = Math.min(o.tol, checkOptions({}).tol);
  const median = temporalMedian(frames);
  const steady = steadyRows(frames, median);
  const side = (fromTop: boolean): number => {
    const rows = Math.max(runFromEdge(median, fromTop, o, true, flatTol), steadyRun(steady, fromTop, Math.floor(median.height * o.maxShare)));
    return rows ? Math.min(median.height, rows + 1) : 0;
  };
  return { top: side(true), bottom: side(false) };
}

/**
 * The second consensus cue: a strip is the same grey print in every trigger, while the picture
 * either carries colour or changes between triggers (light, season, day and night). Glyphs
 * shrunk from a large frame to the analysis size leave no row two-valued, so thin strips with
 * text across the whole width fail the flat-or-ink test above; this cue does not look at the
 * values at all. A row is steady when at least STEADY_SHARE of its pixels are grey in the
 * median (chroma at most 24, as above) and stay within 12 levels of it in at least
 * STEADY_SHARE of the frames (the margin of the JPEG ringing, as above). The changing clock
 * and counter cover a minority of a row. A static grey picture (a night-only camera, one
 * burst's frames) is steady too: a run longer than the strip limit is then left to the
 * flat-or-ink test, as is any run a picture row could extend.
 */
const STEADY_SHARE = 0.8;
const STEADY_TOL = 12;

function steadyRows(frames: readonly RgbFrame[], median: RgbFrame): Uint8Array {
  const { width, height } = median;
  const out = new Uint8Array(height);
  const luma = (d: Uint8Array, i: number): number => 0.299 * d[3 * i] + 0.587 * d[3 * i + 1] + 0.114 * d[3 * i + 2];
  const need = Math.ceil(STEADY_SHARE * frames.length);
  for (let y = 0; y < height; y++) {
    let steady = 0;
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const r = median.data[3 * i], g = median.data[3 * i + 1], b = median.data[3 * i + 2];
      if (Math.max(r, g, b) - Math.min(r, g, b) > 24) continue;
      const m = luma(median.data, i);
      let near = 0;
      for (const f of frames) if (Math.abs(luma(f.data, i) - m) <= STEADY_TOL) near++;
      if (near >= need) steady++;
    }
    out[y] = steady >= STEADY_SHARE * width ? 1 : 0;
  }
  return out;
}

/** Rows of steady print from one edge; 0 when fewer than 2 or the run passes `limit`. */
function steadyRun(steady: Uint8Array, fromTop: boolean, limit: number): number {
  let k = 0;
  while (k < steady.length && steady[fromTop ? k : steady.length - 1 - k]) k++;
  return k >= 2 && k <= limit ? k : 0;
}

/** The wider of two strips on each edge (an event's own and its deployment's). */
export function widerStrip(a: DataStrip, b: DataStrip | undefined): DataStrip {
  return b ? { top: Math.max(a.top, b.top), bottom: Math.max(a.bottom, b.bottom) } : a;
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
