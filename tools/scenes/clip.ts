/**
 * An invented survey clip: the nuisances of one place throughout (caustics, particles, kelp,
 * surge) and a subject visiting during the requested spans, with per-frame ground truth (the
 * subject's mask, and whether it is in view).
 */
import type { RgbFrame } from '../../src/kernels/frame.js';
import { Category, isUnderwater, type CategoryName } from './categories.js';
import { makeRng } from './random.js';
import { makeRenderer, renderFrame, type SceneStyle } from './render.js';

export interface Clip {
  seed: number;
  fps: number;
  width: number;
  height: number;
  times: number[];
  frames: RgbFrame[];
  /** Per frame, 1 where the subject covers the pixel by at least half. */
  masks: Uint8Array[];
  /** Ground truth per frame: the subject covers at least `minPixels` pixels. */
  present: boolean[];
  /** Ground truth spans (s) where the subject is in view, from `present`. */
  windows: Array<{ start_s: number; end_s: number }>;
}

export interface ClipRequest {
  seed: number;
  width: number;
  height: number;
  fps: number;
  duration: number;
  visits: Array<{ start_s: number; end_s: number }>;
  /** The visiting subject's category (fish crossing by default). */
  category?: CategoryName;
  /** The place's nuisance (a false-trigger category); absent, the subject category's mild defaults. */
  nuisance?: CategoryName;
  /** A second nuisance at full strength at the same time (surge and particles, caustics and kelp). */
  distractor?: CategoryName;
  /** Water and camera beyond the usual ranges (tint, turbidity, noise). */
  style?: SceneStyle;
}

export function renderClip(req: ClipRequest): Clip {
  const rng = makeRng(req.seed * 104729 + 3);
  const category = req.category ?? Category.fishCrossing;
  const light = isUnderwater(category) ? 'water' : 'day';
  const frameRng = makeRng(req.seed * 13 + 1);
  const base = makeRenderer(rng, req.nuisance ?? category, light, req.width, req.height, req.duration, rng, req.distractor, req.style);
  // One subject per visit, each crossing during its own span; world and nuisances are shared.
  const visits = req.visits.map((v) => ({ v, r: makeRenderer(makeRng(rng.int(1, 1e9)), category, light, req.width, req.height, v.end_s - v.start_s) }));
  const minPixels = Math.max(4, Math.round(req.width * req.height * 0.001));
  const times: number[] = [];
  const frames: RgbFrame[] = [];
  const masks: Uint8Array[] = [];
  const present: boolean[] = [];
  for (let i = 0; i / req.fps < req.duration; i++) {
    const t = i / req.fps;
    const visit = visits.find((x) => t >= x.v.start_s && t <= x.v.end_s);
    const r = visit ? { ...base, subject: visit.r.subject } : base;
    const { frame, mask } = renderFrame(r, t, !!visit, frameRng, visit ? t - visit.v.start_s : t);
    let n = 0;
    for (const m of mask) n += m;
    times.push(t);
    frames.push(frame);
    masks.push(mask);
    present.push(n >= minPixels);
  }
  const windows: Clip['windows'] = [];
  for (let i = 0; i < present.length; i++) {
    if (!present[i]) continue;
    const last = windows[windows.length - 1];
    if (last && i > 0 && present[i - 1]) last.end_s = times[i];
    else windows.push({ start_s: times[i], end_s: times[i] });
  }
  return { seed: req.seed, fps: req.fps, width: req.width, height: req.height, times, frames, masks, present, windows };
}
