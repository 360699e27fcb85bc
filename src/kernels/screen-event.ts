/**
 * The engine's one entry for a trigger of still images (a burst or a single image): decoded
 * frames and neighbouring triggers' middle frames in, the verdict and everything needed to
 * explain it out. Pure: no files, no clock, no state kept between calls; the caller decodes,
 * writes previews and stores the result (pipeline/analyse-task.ts).
 *
 * It owns the decisions a scan's verdict rests on, so that nothing outside the engine can
 * apply them differently: which rows the data strip hides (the wider of this trigger's own
 * detection and its deployment's consensus), the analysis, the model's score and the verdict
 * rule with its guards (score.ts), and which frame and blobs explain it.
 */
import { analyseEvent, type EventAnalysis } from './analyse-event.js';
import type { Blob } from './components.js';
import { detectDataStripInFrames, ignoreMask, widerStrip, type DataStrip } from './data-strip.js';
import type { GreyFrame, RgbFrame } from './frame.js';
import { MOTION_MODEL } from './model.js';
import { sceneSignature, type SceneSignature } from './scene-signature.js';
import { eventFeatureRows, scoreEvent, type EventScore, type MotionModel } from './score.js';
import { notEnoughFrames } from '../shared/errors.js';

export interface ScreenEventInput {
  /** The trigger's frames, decoded at the analysis size, in capture order. */
  frames: readonly RgbFrame[];
  /** Middle frames of neighbouring triggers of the same camera and light mode (may be empty). */
  neighbours: readonly RgbFrame[];
  /** Per neighbour, another frame of its trigger (undefined for a single image), so that its
   *  visitor is left out of the background (clean-plate.ts). */
  neighbourPartners?: readonly (RgbFrame | undefined)[];
  /** The deployment's data strip by consensus of its triggers, when it had enough of them. */
  deploymentStrip?: DataStrip;
  /** Dense optical flow features too (slower). */
  flow?: boolean;
  /** The fitted model; the shipped one unless a test or a fit passes another. */
  model?: MotionModel;
}

export interface EventScreening {
  analysis: EventAnalysis;
  score: EventScore;
  /** The rows the event ignores, and which detection set them. */
  strip: DataStrip;
  stripFrom: 'event' | 'deployment' | null;
  mask?: GreyFrame;
  /** Feature rows per track (score.ts FEATURE_NAMES order). */
  rows: number[][];
  /** The frame that best shows why (the best track's largest blob, else the middle frame),
   *  the blobs of the best track on it and every other blob on it. */
  heatFrame: number;
  bestBlobs: Blob[];
  otherBlobs: Blob[];
  /** What the camera saw in the middle frame (deployment-health.ts compares triggers by it). */
  scene: SceneSignature;
}

export function screenEvent(input: ScreenEventInput): EventScreening {
  const { frames, neighbours } = input;
  if (!frames.length) throw notEnoughFrames('frames', 1, 0);
  const { width, height } = frames[0];
  // A strip is told from the picture by staying put while the picture changes: a single image
  // or a pair has too few frames of its own, so its neighbours' middle frames lend theirs.
  const own = detectDataStripInFrames(frames.length >= 3 ? frames : [...frames, ...neighbours]);
  const strip = widerStrip(own, input.deploymentStrip);
  const mask = strip.top || strip.bottom ? ignoreMask(width, height, strip) : undefined;
  const analysis = analyseEvent({ frames, neighbours, neighbourPartners: input.neighbourPartners, mask, flow: input.flow });
  const score = scoreEvent(input.model ?? MOTION_MODEL, analysis);
  const best = score.bestTrack >= 0 ? analysis.tracks[score.bestTrack] : undefined;
  const heatFrame = best ? best.points.reduce((m, p) => (p.blob.area > m.blob.area ? p : m)).frame : frames.length >> 1;
  const bestBlobs = best ? best.points.filter((p) => p.frame === heatFrame).map((p) => p.blob) : [];
  return {
    analysis,
    score,
    strip,
    stripFrom: strip.top + strip.bottom === 0 ? null : own.top === strip.top && own.bottom === strip.bottom ? 'event' : 'deployment',
    mask,
    rows: eventFeatureRows(analysis),
    heatFrame,
    bestBlobs,
    otherBlobs: analysis.frames[heatFrame].blobs.filter((b) => !bestBlobs.includes(b)),
    scene: sceneSignature(frames[frames.length >> 1], mask),
  };
}
