/**
 * The fitted motion model shipped with the engine (models/motion-weights.json, written by
 * tools/fit-weights.ts). Loaded as JSON data so kernels stay free of I/O.
 */
import model from '../../models/motion-weights.json' with { type: 'json' };
import type { MotionModel } from './score.js';

export const MOTION_MODEL = model as unknown as MotionModel;
