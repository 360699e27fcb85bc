/**
 * Streaming activity analysis of a clip, frame by frame (the caller decodes at the analysis
 * rate and never holds the clip): a running background with its memory in seconds, change
 * against it and against the previous frame, the same noise-scaled thresholds, blobs and
 * tracks as a burst, scored by the same model over a sliding window of recent frames.
 * The analyser's state lives in the object it returns; the caller owns it.
 */
import { maxChannelChange } from './change-image.js';
import { labelComponents, type Blob } from './components.js';
import { checkFrame, type GreyFrame, type RgbFrame } from './frame.js';
import { close3x3, open3x3 } from './morphology.js';
import { checkParams, SNR_SCALE, type EngineParams } from './params.js';
import { applyGainOffset, fitGainOffset } from './photometric.js';
import { backgroundToFrame, learningRate, startBackground, updateBackground } from './running-background.js';
import { featureVector, trackScore, type MotionModel } from './score.js';
import { maxImage, orMask, toSnr } from './snr-image.js';
import { thresholdHysteresis } from './threshold.js';
import { linkTracks, trackFeatures } from './tracks.js';
import { invalidArgument } from '../shared/errors.js';
import { checkInteger } from '../shared/validate.js';

export interface ClipOptions {
  model: MotionModel;
  mask?: GreyFrame;
  restless?: Float32Array;
  params?: Partial<EngineParams>;
  /** Frames in the sliding window the tracks are built over. */
  windowFrames?: number;
}

export interface FrameActivity {
  t: number;
  score: number;
  blobs: Blob[];
}

export interface ClipAnalyser {
  push(frame: RgbFrame, t: number): FrameActivity;
}

export function createClipAnalyser(o: ClipOptions): ClipAnalyser {
  const params = checkParams(o.params ?? {});
  const K = checkInteger('windowFrames', o.windowFrames ?? 6, 2, 60);
  let bg: ReturnType<typeof startBackground> | undefined;
  let prev: RgbFrame | undefined;
  let lastT = 0;
  const recent: Blob[][] = [];
  const mask = o.mask?.data;
  return {
    push(frame, t) {
      checkFrame('frame', frame, 3);
      if (!Number.isFinite(t) || t < lastT) throw invalidArgument('t', `finite time >= ${lastT}`, t);
      if (!bg || !prev) {
        bg = startBackground(frame);
        prev = frame;
        lastT = t;
        recent.push([]);
        return { t, score: 0, blobs: [] };
      }
      const bgFrame = backgroundToFrame(bg, frame);
      const norm = applyGainOffset(frame, fitGainOffset(bgFrame, frame, mask));
      const a = toSnr(maxChannelChange(norm, bgFrame), params.minNoise, mask, o.restless);
      const b = toSnr(maxChannelChange(norm, prev), params.minNoise, mask, o.restless);
      const hi = params.seedSigmas * SNR_SCALE;
      const lo = params.growSigmas * SNR_SCALE;
      const m = close3x3(open3x3(orMask(thresholdHysteresis(a.snr, lo, hi), thresholdHysteresis(b.snr, lo, hi))));
      const minArea = Math.max(4, Math.round(params.minBlobFraction * frame.width * frame.height));
      const blobs = labelComponents(m, maxImage(a.snr, b.snr)).blobs.filter((x) => x.area >= minArea);
      updateBackground(bg, norm, learningRate(t - lastT, params.backgroundSeconds));
      prev = norm;
      lastT = t;
      recent.push(blobs);
      if (recent.length > K) recent.shift();
      const tracks = linkTracks(recent, frame.width, frame.height);
      let active = 0;
      let count = 0;
      for (const r of recent) {
        for (const x of r) active += x.area;
        count += r.length;
      }
      const ctx = {
        frameCount: recent.length,
        activeFraction: active / recent.length / (frame.width * frame.height),
        blobsPerFrame: count / recent.length,
        maxShift: 0,
        maxGainStep: 0,
        noReference: false,
      };
      const total = tracks.reduce((s, tr) => s + tr.points.reduce((q, p) => q + p.blob.area, 0), 0);
      let score = 0;
      for (const tr of tracks) {
        if (tr.points[tr.points.length - 1].frame !== recent.length - 1) continue;
        const area = tr.points.reduce((q, p) => q + p.blob.area, 0);
        const f = trackFeatures(tr, recent.length, frame.width, frame.height, SNR_SCALE);
        score = Math.max(score, trackScore(o.model, featureVector(f, ctx, total ? area / total : 0)));
      }
      return { t, score, blobs };
    },
  };
}
