/**
 * Runs the motion engine on generated scenes and labels its tracks from the scene's ground
 * truth: a track is the subject's when its blobs overlap the subject mask by a quarter of their
 * area in at least one frame. Shared by the weight fit and the behaviour tests.
 */
import type { EventAnalysis } from '../../src/kernels/analyse-event.js';
import { screenEvent } from '../../src/kernels/screen-event.js';
import { scoreEvent, type MotionModel, type EventScore } from '../../src/kernels/score.js';
import { ANIMAL_CATEGORIES, Category, LAND_FALSE, WATER_FALSE, type CategoryName } from './categories.js';
import { renderScene, type Scene, type SceneRequest } from './render.js';

export interface LabelledEvent {
  seed: number;
  category: CategoryName;
  /** The false trigger an animal scene also carries (see mixedRequests). */
  distractor?: CategoryName;
  animal: boolean;
  frames: number;
  rows: number[][];
  labels: number[];
  analysis: EventAnalysis;
}

/**
 * Analyses a scene through the engine's entry a scan calls (kernels/screen-event.ts): the
 * event's frames with the middle frames of neighbouring triggers of the same camera, from which
 * the engine builds a deployment background (the neighbours are not clean: see
 * renderNeighbours), and the data strip found as the scan finds it. The model is fitted and
 * judged on exactly what the product will compute.
 */
export function analyseScene(scene: Scene): LabelledEvent {
  const { analysis, rows } = screenEvent({ frames: scene.frames, neighbours: scene.neighbours });
  const labels = analysis.tracks.map((t) =>
    t.points.some((p) => {
      const m = scene.subjectMasks[p.frame];
      let hit = 0;
      const b = p.blob;
      for (let y = b.y; y < b.y + b.height; y++) for (let x = b.x; x < b.x + b.width; x++) hit += m[y * scene.width + x];
      return hit >= 0.25 * b.area;
    })
      ? 1
      : 0,
  );
  return { seed: scene.seed, category: scene.category, ...(scene.distractor ? { distractor: scene.distractor } : {}), animal: scene.animal, frames: scene.frames.length, rows, labels, analysis };
}

/** Scene list for a seed range: every category, bursts and (one in four) single triggers. */
export function sceneRequests(firstSeed: number, perCategory: number, categories: readonly CategoryName[]): Array<{ seed: number; category: CategoryName; frames?: number }> {
  const out: Array<{ seed: number; category: CategoryName; frames?: number }> = [];
  categories.forEach((category, ci) => {
    for (let i = 0; i < perCategory; i++) {
      const seed = firstSeed + ci * 1000 + i;
      out.push({ seed, category, frames: i % 4 === 3 ? 1 : undefined });
    }
  });
  return out;
}

/**
 * Animals in the middle of a false trigger: every animal category with every false trigger of
 * its light at full strength (a fox in the rain or wind, under a drifting cloud, behind an
 * insect on the lens, on a shaking camera; a fish in surge, swaying kelp, particles or
 * caustics; the lamp change only at night, a cloud shadow only by day). The plain categories
 * give an animal only the mild background of every scene; these are what a deployment also
 * brings, and where a screener that learned "busy scene, no animal" would lose animals.
 * `perPair` seeds per animal and trigger (seed = first + 100 * pair + i); one image in four is
 * a single trigger, as in sceneRequests.
 */
export function mixedRequests(firstSeed: number, perPair: number): Array<{ seed: number; category: CategoryName; distractor: CategoryName; frames?: number }> {
  const out: Array<{ seed: number; category: CategoryName; distractor: CategoryName; frames?: number }> = [];
  let pair = 0;
  for (const category of ANIMAL_CATEGORIES) {
    const water = category === Category.fishCrossing || category === Category.fishHovering;
    // The lamp changes only at night, a cloud shadow only by day.
    const night = category === Category.animalNight;
    const triggers = water ? WATER_FALSE : LAND_FALSE.filter((d) => d !== Category.empty && (d !== Category.irLamp || night) && (d !== Category.cloudShadow || !night));
    for (const distractor of triggers) {
      for (let i = 0; i < perPair; i++) out.push({ seed: firstSeed + pair * 100 + i, category, distractor, frames: i % 4 === 3 ? 1 : undefined });
      pair++;
    }
  }
  return out;
}

export function evaluate(model: MotionModel, ev: LabelledEvent): EventScore {
  return scoreEvent(model, ev.analysis);
}

export function runScenes(reqs: readonly SceneRequest[]): LabelledEvent[] {
  return reqs.map((r) => analyseScene(renderScene(r)));
}
