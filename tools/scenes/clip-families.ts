/**
 * Families of survey clips, as families.ts is for camera-trap deployments: the fitted family
 * (clip-plans.ts, whose seeds the clip model never saw) and one held out of every range the fit
 * held constant, so that a number measured on clips says how the screener does on water it was
 * not fitted on. Every value is a choice of this invented scenario, not a measurement.
 *
 * Held out (`other-water`): frames 480-800 px at 16:9 or 4:3 (the scan shrinks them to its
 * analysis width, the fitted clips are 160-320 px and analysed as they are); 8-12 frames a
 * second at the source; 45-90 s; two nuisances at full strength at once (the fitted clips have
 * one or none); water from blue through green to brown, 10-50% turbid; 1.3-2x the noise.
 */
import { Category, type CategoryName } from './categories.js';
import type { ClipRequest } from './clip.js';
import { clipPlan, drawVisits } from './clip-plans.js';
import { makeRng } from './random.js';

export const CLIP_FAMILIES = ['home-water', 'other-water'] as const;
export type ClipFamilyName = (typeof CLIP_FAMILIES)[number];

export const CLIP_FAMILY_FACTS: Record<ClipFamilyName, { heldOut: boolean; about: string }> = {
  'home-water': { heldOut: false, about: 'the fitted ranges (clip-plans.ts): 160-320 px, 2-6 fps, 30-60 s, one nuisance or none' },
  'other-water': { heldOut: true, about: '480-800 px, 8-12 fps, 45-90 s, two nuisances at once, tinted and turbid water, 1.3-2x noise' },
};

export interface ClipFamilyPlan extends ClipRequest {
  family: ClipFamilyName;
  id: string;
}

/** Pairs of nuisances a reef or kelp station shows together. */
const PAIRS: ReadonlyArray<readonly [CategoryName, CategoryName]> = [
  [Category.caustics, Category.particles],
  [Category.surge, Category.kelp],
  [Category.caustics, Category.surge],
  [Category.particles, Category.kelp],
  [Category.caustics, Category.kelp],
  [Category.particles, Category.surge],
];

const TINTS: ReadonlyArray<readonly number[]> = [
  [0.1, 0.35, 0.55], // open blue water
  [0.15, 0.45, 0.35], // green coastal water
  [0.35, 0.35, 0.2], // brown estuary
];

export function clipFamilyPlan(family: ClipFamilyName, seed: number): ClipFamilyPlan {
  const id = `${family}-${seed}`;
  if (family === 'home-water') {
    const p = clipPlan(seed);
    return { family, id, seed: p.seed, width: p.width, height: p.height, fps: p.fps, duration: p.duration, visits: p.visits, category: p.category, nuisance: p.nuisance };
  }
  const rng = makeRng(seed * 2246822519 + 7);
  const width = Math.round(rng.range(480, 800) / 16) * 16;
  const height = Math.round((width * rng.pick([9, 12])) / 16 / 2) * 2;
  const fps = rng.int(8, 12);
  const duration = Math.round(rng.range(45, 90));
  const visits = drawVisits(rng, duration, { counts: [1, 1, 2, 2, 3], firstS: [3, 15], lengthS: [3, 15], gapS: [6, 25], endMarginS: 4 });
  const [nuisance, distractor] = rng.pick(PAIRS);
  return {
    family,
    id,
    seed,
    width,
    height,
    fps,
    duration,
    visits,
    category: rng.chance(0.5) ? Category.fishCrossing : Category.fishHovering,
    nuisance,
    distractor,
    style: { water: { tint: rng.pick(TINTS), turbidity: rng.range(0.1, 0.5) }, noiseScale: rng.range(1.3, 2) },
  };
}
