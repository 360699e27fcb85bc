/**
 * Engine parameters. Defaults are chosen to keep animals: seeds at 4 sigma (a 1-in-30,000
 * chance per pixel under Gaussian noise, so a 320x240 frame gets about 2-3 noise seeds, which
 * the opening and the minimum area remove), growth at 2 sigma so faint parts of a subject
 * attach to it. The minimum blob is 0.02% of the frame: a 12x12 px animal at 640 px wide.
 */
import { checkNumber } from '../shared/validate.js';

export interface EngineParams {
  /** Hysteresis seed and growth thresholds, in noise sigmas. */
  seedSigmas: number;
  growSigmas: number;
  /** Noise floor (grey levels): below this, uint8 quantisation and JPEG blocking dominate. */
  minNoise: number;
  /** Smallest blob kept, as a fraction of the frame area. */
  minBlobFraction: number;
  /** Shifts with less phase-correlation confidence than this are not compensated. */
  alignMinConfidence: number;
  /** Video: memory of the running background, seconds. */
  backgroundSeconds: number;
  /** Video: the median background's window (s) and how many frames it samples over it. */
  historySeconds: number;
  historySamples: number;
  /** Local light at least this uneven (shading.ts shadeSpread, a natural log ratio) is moving
   *  light: the event is never called likely-blank. */
  movingLightSpread: number;
}

export const DEFAULT_PARAMS: EngineParams = {
  seedSigmas: 4,
  growSigmas: 2,
  minNoise: 1,
  minBlobFraction: 0.0002,
  alignMinConfidence: 0.15,
  backgroundSeconds: 8,
  // One sample every 2 s over the last minute: a fish visit of under 30 s never becomes the
  // background; slow light changes and drifting sediment do. Our choice, fitted against nothing
  // (15 samples kept 18% of the water in the clip fit, 31 samples 14%).
  historySeconds: 60,
  historySamples: 31,
  // ln 1.35: the brighter tenth of the scene lit 1.35 times the darker. Chosen on fitting seeds
  // (24 per category, 32 animals under a cloud shadow; 2026-12-03) as the lowest spread that no
  // other kind of scene reaches more than once in 24: there it flags 19 of 24 cloud shadows and
  // 22 of 32 animals under one, one lamp change in 24, and no plain animal, exposure change,
  // wind, rain, insect, shake or water scene (their largest spread 0.081; lamp changes up to 0.38).
  movingLightSpread: 0.3,
};

/** SNR images store round(SNR_SCALE * change / sigma) in uint8: 0.1 sigma steps to 25.5 sigma. */
export const SNR_SCALE = 10;

export function checkParams(p: Partial<EngineParams>): EngineParams {
  const q = { ...DEFAULT_PARAMS, ...p };
  checkNumber('seedSigmas', q.seedSigmas, 0.5, 25);
  checkNumber('growSigmas', q.growSigmas, 0.5, q.seedSigmas);
  checkNumber('minNoise', q.minNoise, 0, 64);
  checkNumber('minBlobFraction', q.minBlobFraction, 0, 0.5);
  checkNumber('alignMinConfidence', q.alignMinConfidence, 0, 1);
  checkNumber('backgroundSeconds', q.backgroundSeconds, 0.1, 3600);
  checkNumber('historySeconds', q.historySeconds, 0.1, 86_400);
  checkNumber('historySamples', q.historySamples, 1, 255);
  checkNumber('movingLightSpread', q.movingLightSpread, 0, 10);
  return q;
}
