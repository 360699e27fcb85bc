/**
 * The survey clips the clip model is fitted and validated on, each drawn from its seed: size,
 * frame rate, length, how many visits and how long, the subject (crossing or hovering), the
 * place's nuisance, and whether the frames go through lossy compression (real survey video is
 * always compressed; blocking is not Gaussian noise). Fit and validation seed ranges never meet.
 */
import { Category, type CategoryName } from './categories.js';
import type { ClipRequest } from './clip.js';
import { makeRng, type Rng } from './random.js';

export const CLIP_FIT_SEEDS = { first: 200_000, count: Number(process.env.CLIP_FIT_COUNT ?? 40) } as const;
export const CLIP_VALIDATION_SEEDS = { first: 950_000, count: 6 } as const;

export interface ClipPlan extends ClipRequest {
  /** JPEG quality each frame is round-tripped through, or null for raw frames. */
  jpegQuality: number | null;
}

const NUISANCES: readonly (CategoryName | undefined)[] = [undefined, Category.caustics, Category.particles, Category.kelp, Category.surge];

export interface VisitRanges {
  /** How many visits, drawn from this list. */
  counts: readonly number[];
  /** Ranges (s) of the first visit's start, each visit's length and the gap after it. */
  firstS: readonly [number, number];
  lengthS: readonly [number, number];
  gapS: readonly [number, number];
  /** No visit starts this close to the clip's end. */
  endMarginS: number;
}

/** Visits of a subject in a clip of `duration` s, drawn in this order: the count, the first
 *  start, then each length and gap (the fitted plans' seeds depend on the order). */
export function drawVisits(rng: Rng, duration: number, r: VisitRanges): ClipRequest['visits'] {
  const visits: ClipRequest['visits'] = [];
  const want = rng.pick(r.counts);
  let t = rng.range(...r.firstS);
  for (let i = 0; i < want && t < duration - r.endMarginS; i++) {
    const len = rng.range(...r.lengthS);
    visits.push({ start_s: +t.toFixed(2), end_s: +Math.min(duration - 1, t + len).toFixed(2) });
    t += len + rng.range(...r.gapS);
  }
  return visits;
}

export function clipPlan(seed: number): ClipPlan {
  const rng = makeRng(seed * 2654435761);
  const width = rng.pick([160, 192, 224, 256, 320]);
  const height = Math.round((width * rng.pick([9, 12])) / 16 / 2) * 2;
  const fps = rng.pick([2, 3, 4, 4, 6]);
  const duration = Math.round(rng.range(30, 60));
  const visits = drawVisits(rng, duration, { counts: [0, 1, 1, 2, 2, 3], firstS: [2, 10], lengthS: [2, 10], gapS: [4, 15], endMarginS: 3 });
  return {
    seed,
    width,
    height,
    fps,
    duration,
    visits,
    category: rng.chance(0.5) ? Category.fishCrossing : Category.fishHovering,
    nuisance: rng.pick(NUISANCES),
    jpegQuality: rng.chance(0.6) ? rng.int(45, 90) : null,
  };
}
