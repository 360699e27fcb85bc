/**
 * Crops with known labels for the change classifier, made the way a scan makes them: a
 * generated scene goes through the engine's entry (screenEvent), its strongest tracks are
 * cropped (src/classifier/crops.ts), and each crop is labelled from the scene's ground truth: a
 * subject's when its blob lies on the subject by a quarter of its area (the rule of
 * tools/scenes/evaluate.ts for tracks), else blank (sway, shadow, rain, an insect, or a
 * leaf moving beside an animal).
 *
 * Sets (seed ranges never overlap):
 * - train: the motion model's fitting seeds (home ranges) and animals in weather, with jittered
 *   copies of every crop (the box shifted and scaled, as another blob outline would place it);
 * - combine: home ranges on seeds of their own, for fitting how the classifier joins the
 *   motion score (the network never trains on them);
 * - home: the validation seeds (in family);
 * - other families: triggers drawn by tools/scenes/families.ts outside the fitted ranges (larger
 *   sensors, other strips, more noise, dense cover, trails), rendered at the camera's size and
 *   reduced to the scan's analysis width, with neighbours of the same camera.
 *
 * Crops are stored as int8 (value x QUANT; the preprocessing clips at +-4, so the step is
 * 1/32 of a contrast unit), one binary file per part.
 */
import fs from 'node:fs';
import path from 'node:path';
import { changeCrops, CLIP, CROP_CHANNELS, cropTargets, type CropTarget } from '../../src/classifier/crops.js';
import { analysisSize, downscaleArea } from '../../src/kernels/downscale.js';
import { makeGrey, type RgbFrame } from '../../src/kernels/frame.js';
import { screenEvent } from '../../src/kernels/screen-event.js';
import { ALL_CATEGORIES } from '../scenes/categories.js';
import { mixedRequests, sceneRequests } from '../scenes/evaluate.js';
import { drawDeployment, type FamilyName } from '../scenes/families.js';
import { makeRng } from '../scenes/random.js';
import { renderScene, type Scene, type SceneRequest } from '../scenes/render.js';
import { FIT_SEEDS, MIXED_FIT_SEEDS, MIXED_VALIDATION_SEEDS, VALIDATION_SEEDS } from '../scenes/seeds.js';

export const QUANT = 127 / CLIP;
export const INPUT_SIZE = 32;
/** Tracks cropped per event (the manifest's cropsPerEvent). */
export const CROPS_PER_EVENT = 3;
/** The scan's analysis width (pipeline/scan.ts DEFAULTS.analysisWidth). */
const ANALYSIS_WIDTH = 384;

export type SetName = 'train' | 'combine' | 'home' | 'other-cameras' | 'trail' | 'busy-trail';
export const SETS: readonly SetName[] = ['train', 'combine', 'home', 'other-cameras', 'trail', 'busy-trail'];

export interface CropEvent {
  set: SetName;
  seed: number;
  category: string;
  animal: boolean;
  /** Motion score, and what in the event's context limits calling it blank (score.ts BlankGuard). */
  score: number;
  guard: { noBackground: boolean; movingLight: boolean };
  /** Indices (within the set) of the event's un-jittered crops, best track first. */
  crops: number[];
}

export interface SetPart {
  events: CropEvent[];
  labels: number[];
  /** Per crop, its event's index within the part. */
  eventOf: number[];
  jitter: boolean[];
  bin: string;
}

export interface CropSet {
  events: CropEvent[];
  labels: Uint8Array;
  eventOf: Int32Array;
  jitter: Uint8Array;
  /** count x 9 x 32 x 32, dequantised. */
  crops: Float32Array;
}

/** Scene requests of a set (before being split into parts). */
export function setRequests(set: SetName, scale = 1): SceneRequest[] {
  const n = (v: number) => Math.max(1, Math.round(v * scale));
  switch (set) {
    case 'train':
      return [...sceneRequests(FIT_SEEDS.first, n(40), ALL_CATEGORIES), ...mixedRequests(MIXED_FIT_SEEDS.first, n(4))];
    case 'combine':
      return [...sceneRequests(300_000, n(16), ALL_CATEGORIES), ...mixedRequests(350_000, n(2))];
    case 'home':
      return [...sceneRequests(VALIDATION_SEEDS.first, n(VALIDATION_SEEDS.perCategory), ALL_CATEGORIES), ...mixedRequests(MIXED_VALIDATION_SEEDS.first, n(3))];
    default: {
      const out: SceneRequest[] = [];
      for (let d = 0; d < n(4); d++) {
        const dep = drawDeployment(set as FamilyName, 4_100 + d, 18);
        for (const tr of dep.triggers) {
          out.push({ seed: tr.seed, category: tr.category, frames: tr.frames, intervalS: tr.intervalS, width: dep.width, height: dep.height, world: dep.world, light: tr.light, strip: dep.strip ?? undefined, style: dep.style, distractor: tr.distractor });
        }
      }
      return out;
    }
  }
}

/** A scene reduced to the scan's analysis width, its subject masks with it. */
function atAnalysisSize(s: Scene): Scene {
  const { width, height } = analysisSize(s.width, s.height, ANALYSIS_WIDTH);
  if (width === s.width) return s;
  const f = (fr: RgbFrame) => downscaleArea(fr, width, height);
  const masks = s.subjectMasks.map((m) => {
    const g = makeGrey(s.width, s.height, Uint8Array.from(m, (v) => v * 255));
    return Uint8Array.from(downscaleArea(g, width, height).data, (v) => (v >= 128 ? 1 : 0));
  });
  return { ...s, width, height, frames: s.frames.map(f), neighbours: s.neighbours.map(f), subjectMasks: masks };
}

function onSubject(s: Scene, t: CropTarget): boolean {
  const m = s.subjectMasks[t.frame];
  const b = t.blob;
  let hit = 0;
  for (let y = b.y; y < b.y + b.height; y++) for (let x = b.x; x < b.x + b.width; x++) hit += m[y * s.width + x];
  return hit >= 0.25 * b.area;
}

/** The box moved by up to a fifth of its size and scaled by 0.8-1.25, as another outline of the same change would place it. */
function jittered(t: CropTarget, rng: ReturnType<typeof makeRng>): CropTarget {
  const b = t.blob;
  const k = Math.exp(rng.range(Math.log(0.8), Math.log(1.25)));
  const side = Math.max(b.width, b.height);
  const w = Math.max(2, Math.round(b.width * k)), h = Math.max(2, Math.round(b.height * k));
  const cx = b.x + b.width / 2 + rng.range(-0.2, 0.2) * side, cy = b.y + b.height / 2 + rng.range(-0.2, 0.2) * side;
  return { ...t, blob: { ...b, x: Math.round(cx - w / 2), y: Math.round(cy - h / 2), width: w, height: h } };
}

/** Makes one part of a set: renders, screens, crops; writes the crops to `bin`. */
export function makePart(set: SetName, reqs: readonly SceneRequest[], bin: string, jitterCopies: number): SetPart {
  const events: CropEvent[] = [];
  const labels: number[] = [];
  const eventOf: number[] = [];
  const jitter: boolean[] = [];
  const chunks: Int8Array[] = [];
  for (const req of reqs) {
    const scene = atAnalysisSize(renderScene(req));
    const r = screenEvent({ frames: scene.frames, neighbours: scene.neighbours });
    const targets = cropTargets(r.analysis, r.score.trackScores, CROPS_PER_EVENT);
    const rng = makeRng(req.seed * 13 + 1);
    const all: Array<{ t: CropTarget; jitter: boolean; label: number }> = [];
    for (const t of targets) {
      const label = onSubject(scene, t) ? 1 : 0;
      all.push({ t, jitter: false, label });
      for (let j = 0; j < jitterCopies; j++) all.push({ t: jittered(t, rng), jitter: true, label });
    }
    const crops = changeCrops(r.analysis, all.map((a) => a.t), INPUT_SIZE);
    const q = new Int8Array(crops.length);
    for (let i = 0; i < crops.length; i++) q[i] = Math.max(-127, Math.min(127, Math.round(crops[i] * QUANT)));
    chunks.push(q);
    const ev = events.length;
    const first = labels.length;
    all.forEach((a) => {
      labels.push(a.label);
      eventOf.push(ev);
      jitter.push(a.jitter);
    });
    const own = all.map((a, i) => (a.jitter ? -1 : first + i)).filter((i) => i >= 0);
    events.push({ set, seed: req.seed, category: req.category + (req.distractor ? `+${req.distractor}` : ''), animal: scene.animal, score: r.score.score, guard: { noBackground: r.analysis.context.noBackground, movingLight: r.analysis.context.movingLight }, crops: own });
  }
  fs.writeFileSync(bin, Buffer.concat(chunks.map((c) => Buffer.from(c.buffer, c.byteOffset, c.byteLength))));
  return { events, labels, eventOf, jitter, bin };
}

/** Joins a set's parts (crop indices renumbered in order) and dequantises the crops. */
export function joinParts(parts: readonly SetPart[]): CropSet {
  const per = CROP_CHANNELS.length * INPUT_SIZE * INPUT_SIZE;
  const events: CropEvent[] = [];
  const labels: number[] = [];
  const eventOf: number[] = [];
  const jitter: number[] = [];
  const bins: Buffer[] = [];
  for (const p of parts) {
    const cropBase = labels.length, eventBase = events.length;
    for (const e of p.events) events.push({ ...e, crops: e.crops.map((c) => c + cropBase) });
    labels.push(...p.labels);
    eventOf.push(...p.eventOf.map((e) => e + eventBase));
    jitter.push(...p.jitter.map((j) => (j ? 1 : 0)));
    bins.push(fs.readFileSync(p.bin));
  }
  const raw = Buffer.concat(bins);
  if (raw.length !== labels.length * per) throw new Error(`crop files hold ${raw.length} bytes, ${labels.length} crops need ${labels.length * per}`);
  const crops = new Float32Array(raw.length);
  for (let i = 0; i < raw.length; i++) crops[i] = raw.readInt8(i) / QUANT;
  return { events, labels: Uint8Array.from(labels), eventOf: Int32Array.from(eventOf), jitter: Uint8Array.from(jitter), crops };
}

export const partFile = (dir: string, set: SetName, part: number) => path.join(dir, `${set}-${part}.bin`);
