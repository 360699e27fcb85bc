/**
 * A generated scene reduced to what fitting and judging the burst model need, as plain JSON:
 * the feature row and ground-truth label of every track, and whether a background from other
 * triggers took part (without one, no verdict is likely-blank). Lets the scene work run in several processes.
 */
import { scoreEventRows, type MotionModel } from '../../src/kernels/score.js';
import { analyseScene, type LabelledEvent } from './evaluate.js';
import { renderScene, type SceneRequest } from './render.js';

export type SceneRecord = Omit<LabelledEvent, 'analysis'> & { noBackground: boolean };

function toRecord(e: LabelledEvent): SceneRecord {
  return { seed: e.seed, category: e.category, ...(e.distractor ? { distractor: e.distractor } : {}), animal: e.animal, frames: e.frames, rows: e.rows, labels: e.labels, noBackground: e.analysis.context.noBackground };
}

/** The scene as a scan analyses it. */
export function sceneRecord(req: SceneRequest): SceneRecord {
  return toRecord(analyseScene(renderScene(req)));
}

export const recordScore = (m: MotionModel, r: SceneRecord) => scoreEventRows(m, r.rows, r.noBackground);
