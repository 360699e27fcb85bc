/**
 * What makes two analyses comparable: the engine version (package version and a hash of the
 * fitted model) and a hash of every setting that changes an analysis. A rerun skips an event
 * only when both, and its inputs' fingerprints, are unchanged.
 */
import { createHash } from 'node:crypto';
import { CLIP_MODEL, MOTION_MODEL } from '../kernels/model.js';
import { DEFAULT_PARAMS } from '../kernels/params.js';
import { MOVING_LIGHT_BLANK } from '../kernels/score.js';
import pkg from '../../package.json' with { type: 'json' };

const sha = (s: string): string => createHash('sha256').update(s).digest('hex');

export const MODEL_HASH = sha(JSON.stringify([MOTION_MODEL, CLIP_MODEL])).slice(0, 10);
/**
 * Raised whenever the engine's code changes what an analysis holds without the model or a
 * parameter changing (a kernel's rule, the neighbours chosen): ledgers scanned before it are
 * screened again instead of mixing two engines' verdicts.
 */
export const ENGINE_REVISION = 3;
export const ENGINE_VERSION = `${pkg.version}+${MODEL_HASH}.r${ENGINE_REVISION}`;

export interface AnalysisSettings {
  analysisWidth: number;
  videoFps: number;
  flow: boolean;
  /** The change classifier in use: its file's SHA-256 and a hash of its combine rule (absent
   *  without one, so that hashes of scans without a classifier are as before). */
  classifier?: string;
}

export function paramHash(s: AnalysisSettings): string {
  // The verdict rule's own constant too: it changes verdicts without changing the model.
  return sha(JSON.stringify({ engine: ENGINE_VERSION, params: DEFAULT_PARAMS, movingLightBlank: MOVING_LIGHT_BLANK, ...s })).slice(0, 16);
}

export function hashOf(parts: readonly string[]): string {
  return sha(parts.join('\n')).slice(0, 16);
}
