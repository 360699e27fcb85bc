/**
 * A generated scene reduced to what fitting and judging the burst model need, as plain JSON:
 * the feature row and ground-truth label of every track, and whether the event had a
 * reference to compare against. Lets the scene work run in several processes.
 */
import { scoreEventRows, type MotionModel } from '../../src/kernels/score.js';
import type { CategoryName } from './categories.js';
import { analyseScene, type LabelledEvent } from './evaluate.js';
import { renderScene, type SceneRequest } from './render.js';

export interface SceneRecord {
  seed: number;
  /** 'scan': analysed as a scan analyses it (what the product computes); 'clean': a burst also
   *  given its clean neighbours as background (extra training data, never used for thresholds). */
  mode: 'scan' | 'clean';
  category: CategoryName;
  animal: boolean;
  frames: number;
  rows: number[][];
  labels: number[];
  noReference: boolean;
}

function toRecord(e: LabelledEvent, mode: SceneRecord['mode']): SceneRecord {
  return { seed: e.seed, mode, category: e.category, animal: e.animal, frames: e.frames, rows: e.rows, labels: e.labels, noReference: e.analysis.context.noReference };
}

/** The scene as a scan analyses it, and for a burst also with the clean background. */
export function sceneRecords(req: SceneRequest): SceneRecord[] {
  const scene = renderScene(req);
  const out = [toRecord(analyseScene(scene), 'scan')];
  if (scene.frames.length > 1 && scene.neighbours.length) out.push(toRecord(analyseScene(scene, true), 'clean'));
  return out;
}

export const recordScore = (m: MotionModel, r: SceneRecord) => scoreEventRows(m, r.rows, r.noReference);
