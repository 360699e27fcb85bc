/**
 * The fitted models shipped with the engine, loaded as JSON data so kernels stay free of I/O:
 * the burst model (models/motion-weights.json, tools/fit-weights.ts) and the clip model
 * (models/clip-weights.json, tools/fit-clip-model.ts), which scores the streaming video chain
 * and carries the activity-window settings chosen with it.
 */
import burst from '../../models/motion-weights.json' with { type: 'json' };
import clip from '../../models/clip-weights.json' with { type: 'json' };
import type { MotionModel } from './score.js';

export interface ClipModel extends MotionModel {
  window: { smoothFrames: number; preRollS: number; postRollS: number; mergeGapS: number };
}

export const MOTION_MODEL = burst as unknown as MotionModel;
export const CLIP_MODEL = clip as unknown as ClipModel;
