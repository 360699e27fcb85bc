/**
 * A generated scene reduced to what fitting and judging the burst model need, as plain JSON:
 * the feature row and ground-truth label of every track, whether a background from other
 * triggers took part and whether light moved unevenly over the scene (either way, no verdict is
 * likely-blank, or only below a low score: score.ts blankScore). Lets the scene work run in several processes.
 */
import { scoreEventRows, type MotionModel } from '../../src/kernels/score.js';
import { analyseScene, type LabelledEvent } from './evaluate.js';
import { renderScene, type SceneRequest } from './render.js';

/** `movingLight` is absent from records made before it existed (read as false). */
export type SceneRecord = Omit<LabelledEvent, 'analysis'> & { noBackground: boolean; movingLight?: boolean };

function toRecord(e: LabelledEvent): SceneRecord {
  return { seed: e.seed, category: e.category, ...(e.distractor ? { distractor: e.distractor } : {}), animal: e.animal, frames: e.frames, rows: e.rows, labels: e.labels, noBackground: e.analysis.context.noBackground, movingLight: e.analysis.context.movingLight };
}

/** The scene as a scan analyses it. */
export function sceneRecord(req: SceneRequest): SceneRecord {
  return toRecord(analyseScene(renderScene(req)));
}

export const recordScore = (m: MotionModel, r: SceneRecord) => scoreEventRows(m, r.rows, r);
