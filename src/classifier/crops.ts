/**
 * What the classifier sees of an event: for each of its strongest tracks, a square crop around
 * the track's largest blob, in nine planes (change against the plate, change against the nearest
 * other frame, the frame itself), resampled to the model's input size. Pure: an analysed event
 * in, a float tensor out (NCHW, the layout of ONNX's Conv).
 *
 * Scaling ("crop-contrast/1"): every plane of a crop is divided by the crop's own contrast
 * (the standard deviation of its RGB values, plus CONTRAST_FLOOR), and the RGB planes have the
 * crop's per-channel mean taken off; values are clipped to +-CLIP. A crop then reads the same
 * in daylight, under infrared and through water, on a bright sensor or a dim one: what is left
 * is shape, texture and how the change sits in them. The floor keeps a flat patch (sky, sand)
 * from turning its noise into strong change.
 *
 * Change together: PREPROCESS (a new name for any change of meaning: manifests name the one
 * they were trained with, manifest.ts), the training script (tools/classifier/), and the
 * shipped model (trained again).
 */
import type { EventAnalysis } from '../kernels/analyse-event.js';
import type { Blob } from '../kernels/components.js';
import type { RgbFrame } from '../kernels/frame.js';
import { invalidArgument } from '../shared/errors.js';

export const PREPROCESS = 'crop-contrast/1';
/** The planes, in order; a model's manifest lists the same names in the same order. */
export const CROP_CHANNELS = ['plate-r', 'plate-g', 'plate-b', 'step-r', 'step-g', 'step-b', 'r', 'g', 'b'] as const;
/** Grey levels added to a crop's contrast before dividing (our choice: about twice the sensor
 *  noise of a dim infrared frame, so noise alone stays below one unit). */
export const CONTRAST_FLOOR = 8;
export const CLIP = 4;
/** The crop reaches this share of the blob's larger side beyond it on each side, and is at least
 *  MIN_SIDE analysis pixels: the context around a blob (the branch it hangs from, the shadow's
 *  soft edge) is half of what tells it apart. */
export const MARGIN = 0.5;
export const MIN_SIDE = 16;

export interface CropTarget {
  /** Index of the track in the analysis, and the frame and blob the crop is centred on. */
  track: number;
  frame: number;
  blob: Blob;
}

/**
 * The tracks to look at: the `count` best by motion score, each at its largest blob. A track's
 * largest blob is where the subject shows most of itself.
 */
export function cropTargets(a: EventAnalysis, trackScores: readonly number[], count: number): CropTarget[] {
  if (trackScores.length !== a.tracks.length) throw invalidArgument('trackScores.length', String(a.tracks.length), trackScores.length);
  const order = trackScores.map((s, i) => ({ s, i })).sort((p, q) => q.s - p.s || p.i - q.i).slice(0, Math.max(0, count));
  return order.map(({ i }) => {
    const p = a.tracks[i].points.reduce((m, q) => (q.blob.area > m.blob.area ? q : m));
    return { track: i, frame: p.frame, blob: p.blob };
  });
}

/** The square a crop covers, in analysis pixels (may reach past the frame's edges). */
export function cropBox(b: Pick<Blob, 'x' | 'y' | 'width' | 'height'>): { x0: number; y0: number; side: number } {
  const side = Math.max(MIN_SIDE, Math.max(b.width, b.height) * (1 + 2 * MARGIN));
  return { x0: b.x + b.width / 2 - side / 2, y0: b.y + b.height / 2 - side / 2, side };
}

/** The plate a frame's change is judged against: the background from other triggers when there
 *  is one (it shows a subject that stood still through the burst), else the burst's median. */
function plateOf(a: EventAnalysis): RgbFrame | undefined {
  return a.planes.deployment ?? a.planes.median;
}

/** The nearest other frame of the burst (the next one, the previous one for the last). */
function stepOf(a: EventAnalysis, k: number): RgbFrame | undefined {
  const n = a.planes.work.length;
  if (n < 2) return undefined;
  return a.planes.work[k + 1 < n ? k + 1 : k - 1];
}

/** Bilinear sample of channel c at (x, y), edges replicated. */
function sample(f: RgbFrame, x: number, y: number, c: number): number {
  const w = f.width, h = f.height;
  const xc = Math.min(w - 1, Math.max(0, x)), yc = Math.min(h - 1, Math.max(0, y));
  const x0 = Math.floor(xc), y0 = Math.floor(yc);
  const x1 = Math.min(w - 1, x0 + 1), y1 = Math.min(h - 1, y0 + 1);
  const fx = xc - x0, fy = yc - y0;
  const d = f.data;
  const a = d[(y0 * w + x0) * 3 + c], b = d[(y0 * w + x1) * 3 + c];
  const e = d[(y1 * w + x0) * 3 + c], g = d[(y1 * w + x1) * 3 + c];
  return (a * (1 - fx) + b * fx) * (1 - fy) + (e * (1 - fx) + g * fx) * fy;
}

/**
 * Crops for the given targets as one batch: Float32Array of targets.length x 9 x size x size.
 * Without a plate (a single image with no usable neighbour) the plate planes are zero; a single
 * image has no other frame, so its step planes are zero too. The model is trained on both.
 */
export function changeCrops(a: EventAnalysis, targets: readonly CropTarget[], size: number): Float32Array {
  if (!Number.isInteger(size) || size < 4 || size > 256) throw invalidArgument('size', 'an integer 4..256', size);
  const planes = CROP_CHANNELS.length;
  const out = new Float32Array(targets.length * planes * size * size);
  const plate = plateOf(a);
  const px = size * size;
  const raw = new Float32Array(planes * px);
  targets.forEach((t, ti) => {
    if (t.frame < 0 || t.frame >= a.planes.work.length) throw invalidArgument('targets.frame', `0..${a.planes.work.length - 1}`, t.frame);
    const frame = a.planes.work[t.frame];
    const step = stepOf(a, t.frame);
    const { x0, y0, side } = cropBox(t.blob);
    const scale = side / size;
    raw.fill(0);
    let sum = 0, sum2 = 0;
    const mean = [0, 0, 0];
    for (let j = 0; j < size; j++) {
      // Pixel centres of the output grid mapped into the source square.
      const y = y0 + (j + 0.5) * scale - 0.5;
      for (let i = 0; i < size; i++) {
        const x = x0 + (i + 0.5) * scale - 0.5;
        const o = j * size + i;
        for (let c = 0; c < 3; c++) {
          const v = sample(frame, x, y, c);
          raw[(6 + c) * px + o] = v;
          mean[c] += v;
          sum += v;
          sum2 += v * v;
          if (plate) raw[c * px + o] = v - sample(plate, x, y, c);
          if (step) raw[(3 + c) * px + o] = v - sample(step, x, y, c);
        }
      }
    }
    const count = 3 * px;
    const sd = Math.sqrt(Math.max(0, sum2 / count - (sum / count) ** 2));
    const k = 1 / (sd + CONTRAST_FLOOR);
    for (let c = 0; c < 3; c++) mean[c] /= px;
    const base = ti * planes * px;
    for (let p = 0; p < planes; p++) {
      const off = p >= 6 ? mean[p - 6] : 0;
      for (let o = 0; o < px; o++) {
        const v = (raw[p * px + o] - off) * k;
        out[base + p * px + o] = v > CLIP ? CLIP : v < -CLIP ? -CLIP : v;
      }
    }
  });
  return out;
}
