/**
 * The survey clips the clip model is fitted and validated on, each drawn from its seed: size,
 * frame rate, length, how many visits and how long, the subject (crossing or hovering), the
 * place's nuisance, and whether the frames go through lossy compression (real survey video is
 * always compressed; blocking is not Gaussian noise). Fit and validation seed ranges never meet.
 */
import { Category, type CategoryName } from './categories.js';
import type { ClipRequest } from './clip.js';
import { makeRng } from './random.js';

export const CLIP_FIT_SEEDS = { first: 200_000, count: Number(process.env.CLIP_FIT_COUNT ?? 40) } as const;
export const CLIP_VALIDATION_SEEDS = { first: 950_000, count: 6 } as const;

export interface ClipPlan extends ClipRequest {
  /** JPEG quality each frame is round-tripped through, or null for raw frames. */
  jpegQuality: number | null;
}

const NUISANCES: readonly (CategoryName | undefined)[] = [undefined, Category.caustics, Category.particles, Category.kelp, Category.surge];

export function clipPlan(seed: number): ClipPlan {
  const rng = makeRng(seed * 2654435761);
  const width = rng.pick([160, 192, 224, 256, 320]);
  const height = Math.round((width * rng.pick([9, 12])) / 16 / 2) * 2;
  const fps = rng.pick([2, 3, 4, 4, 6]);
  const duration = Math.round(rng.range(30, 60));
  const visits: ClipRequest['visits'] = [];
  const want = rng.pick([0, 1, 1, 2, 2, 3]);
  let t = rng.range(2, 10);
  for (let i = 0; i < want && t < duration - 3; i++) {
    const len = rng.range(2, 10);
    visits.push({ start_s: +t.toFixed(2), end_s: +Math.min(duration - 1, t + len).toFixed(2) });
    t += len + rng.range(4, 15);
  }
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
