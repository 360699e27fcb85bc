/**
 * Streaming activity analysis of a clip, frame by frame (the caller decodes at the analysis
 * rate and never holds the clip): a median background over the last minute (median-history.ts:
 * no ghost where a fish was), change against it and against the previous frame, the same noise-scaled thresholds, blobs and
 * tracks as a burst, scored by the same model over a sliding window of recent frames.
 * The analyser's state lives in the object it returns; the caller owns it.
 */
import { maxChannelChange } from './change-image.js';
import { labelComponents, type Blob } from './components.js';
import { edgeContrast } from './edge-contrast.js';
import { unexplainedShare } from './explained-change.js';
import { checkFrame, type GreyFrame, type RgbFrame } from './frame.js';
import { openClose3x3 } from './morphology.js';
import { checkParams, SNR_SCALE, type EngineParams } from './params.js';
import { applyGainOffset, fitGainOffset } from './photometric.js';
import { createMedianHistory, offerFrame } from './median-history.js';
import { trackRows, trackScore, type MotionModel } from './score.js';
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
  /** The best score of the tracks that reach this frame and were seen in at least half the
   *  window's frames (0 when none is). */
  score: number;
  blobs: Blob[];
  /** Each track reaching this frame, however short: its raw feature row, its blob here, its score. */
  tracks: Array<{ row: number[]; blob: Blob; score: number }>;
}

export interface ClipAnalyser {
  push(frame: RgbFrame, t: number): FrameActivity;
}

export function createClipAnalyser(o: ClipOptions): ClipAnalyser {
  const params = checkParams(o.params ?? {});
  const K = checkInteger('windowFrames', o.windowFrames ?? 6, 2, 60);
  // A frame's activity counts only tracks seen in at least half the window's frames. A subject
  // in view persists from frame to frame; leaves flickering in wind, caustic glints and
  // compression blocks make blobs that rarely repeat at one place (in a real clip of a tree in
  // wind most of the best tracks had one point in six). A subject that enters is counted from
  // its third frame, which the windows' pre-roll covers.
  const minTrackFrames = Math.ceil(K / 2);
  const history = createMedianHistory(params.historySeconds, params.historySamples);
  let prev: RgbFrame | undefined;
  let lastT = 0;
  const recent: Blob[][] = [];
  const mask = o.mask?.data;
  return {
    push(frame, t) {
      checkFrame('frame', frame, 3);
      if (!Number.isFinite(t) || t < lastT) throw invalidArgument('t', `finite time >= ${lastT}`, t);
      if (!prev) {
        offerFrame(history, frame, t);
        prev = frame;
        lastT = t;
        recent.push([]);
        return { t, score: 0, blobs: [], tracks: [] };
      }
      const bgFrame = history.background!;
      const norm = applyGainOffset(frame, fitGainOffset(bgFrame, frame, mask));
      const a = toSnr(maxChannelChange(norm, bgFrame), params.minNoise, mask, o.restless);
      const b = toSnr(maxChannelChange(norm, prev), params.minNoise, mask, o.restless);
      const hi = params.seedSigmas * SNR_SCALE;
      const lo = params.growSigmas * SNR_SCALE;
      const m = openClose3x3(orMask(thresholdHysteresis(a.snr, lo, hi), thresholdHysteresis(b.snr, lo, hi)));
      const minArea = Math.max(4, Math.round(params.minBlobFraction * frame.width * frame.height));
      const snr = maxImage(a.snr, b.snr);
      const comps = labelComponents(m, snr);
      const blobs = comps.blobs.filter((x) => x.area >= minArea);
      for (const x of blobs) {
        x.unexplained = unexplainedShare(norm, bgFrame, comps.labels, x, a.sigma);
        x.edge = edgeContrast(snr, comps.labels, x);
      }
      offerFrame(history, norm, t);
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
        // The clip's running background is the scene without its visitors.
        noBackground: false,
        lightSpread: 0,
        movingLight: false,
      };
      const rows = trackRows(tracks.map((tr) => trackFeatures(tr, recent.length, frame.width, frame.height, SNR_SCALE)), tracks, ctx);
      let score = 0;
      const scored: FrameActivity['tracks'] = [];
      tracks.forEach((tr, i) => {
        const last = tr.points[tr.points.length - 1];
        if (last.frame !== recent.length - 1) return;
        const s = trackScore(o.model, rows[i]);
        scored.push({ row: rows[i], blob: last.blob, score: s });
        if (tr.points.length >= minTrackFrames) score = Math.max(score, s);
      });
      return { t, score, blobs, tracks: scored };
    },
  };
}
