/**
 * The per-event chain for a burst or a single trigger:
 * align (phase correlation) -> normalise (gain/offset) -> background (temporal median, or the
 * caller's background for a single image) -> change against the backgrounds and neighbouring frames ->
 * noise-scaled SNR -> hysteresis -> 3x3 open/close -> components -> tracks -> features.
 * Pure: frames in, numbers out. The caller decodes and chooses the analysis size.
 */
import { invalidArgument, notEnoughFrames } from '../shared/errors.js';
import { maxChannelChange } from './change-image.js';
import { labelComponents, type Blob } from './components.js';
import { unexplainedShare } from './explained-change.js';
import { checkFrame, checkSameShape, makeGrey, type GreyFrame, type RgbFrame } from './frame.js';
import { medianAbsLumaDiff, toLuma } from './luma.js';
import { openClose3x3 } from './morphology.js';
import { checkParams, SNR_SCALE, type EngineParams } from './params.js';
import { deploymentBackground, type NeighbourFit } from './deployment-background.js';
import { edgeContrast } from './edge-contrast.js';
import { estimateShift, shiftReference, worthCompensating, type Shift } from './phase-correlate.js';
import { applyGainOffset, fitGainOffset } from './photometric.js';
import { relightMeasured } from './shading.js';
import { maxImage, minImage, orMask, toSnr } from './snr-image.js';
import { temporalMedian } from './temporal-median.js';
import { thresholdHysteresis } from './threshold.js';
import { linkTracks, trackFeatures, type Track, type TrackFeatures } from './tracks.js';
import { andValidity, translateBilinear, translateValidity } from './translate.js';
import { farnebackFlowPrepared, flowPyramid } from './flow/farneback.js';
import { blobFlow, trackFlow, type BlobFlow, type TrackFlow } from './flow/flow-features.js';

export interface EventInput {
  frames: readonly RgbFrame[];
  /** Middle frames of neighbouring triggers of the same camera and light mode, from which a
   *  deployment background is built (see deployment-background.ts). Needed for a single
   *  trigger; for a burst it adds a reference that shows a subject standing still through the
   *  whole burst, which the burst's own median absorbs. */
  neighbours?: readonly RgbFrame[];
  /** Per neighbour, another frame of the same trigger (undefined for a single image): where
   *  they differ that trigger had a visitor, left out of the background (clean-plate.ts). */
  neighbourPartners?: readonly (RgbFrame | undefined)[];
  /** A ready background (used as is after alignment and gain), instead of `neighbours`. */
  background?: RgbFrame;
  /** 255 = analyse, 0 = ignore (data strip, drawn regions). */
  mask?: GreyFrame;
  /** Restless-pixel weights of the deployment, 0..1 per pixel. */
  restless?: Float32Array;
  params?: Partial<EngineParams>;
  /** Compute dense flow between consecutive frames and per-track flow features (slower). */
  flow?: boolean;
}

export interface FrameAnalysis {
  shift: Shift;
  compensated: boolean;
  gain: number[];
  offset: number[];
  sigma: number;
  blobs: Blob[];
  activeFraction: number;
}

export interface EventContext {
  frameCount: number;
  /** Mean share of analysed pixels that are active per frame. */
  activeFraction: number;
  /** Mean number of blobs per frame. */
  blobsPerFrame: number;
  /** Largest camera shift compensated (px) and largest exposure gain step (|gain - 1|). */
  maxShift: number;
  maxGainStep: number;
  /** True for a single image with no background to compare against: motion cannot be judged. */
  noReference: boolean;
  /** True when no background from other triggers took part (none given, or every neighbour too
   *  unlike this trigger). The burst's own frames then show only what moved between them: an
   *  animal that stood still through the whole burst is in their median and cannot show. Such
   *  an event is never called likely-blank (score.ts). Measured on 2026-12-03 with the
   *  validation seeds analysed without neighbours: animals that linger, stand partly in frame or
   *  hover scored below the blank threshold in 2 to 6 of 10 two-frame bursts and 1 or 2 of 10
   *  four-frame bursts; with neighbours, none. */
  noBackground: boolean;
  /** The most uneven local light applied to a frame or the deployment background (shading.ts
   *  shadeSpread: ln of the ratio between the brighter and the darker tenth of the field). */
  lightSpread: number;
  /** True when that light moved unevenly over the scene (lightSpread at least
   *  params.movingLightSpread): a cloud shadow or moving shade. Such light sets off change all
   *  over the frame, and an animal in it scores like the light. Such an event is called
   *  likely-blank only below a low score (score.ts MOVING_LIGHT_BLANK). */
  movingLight: boolean;
}

export interface EventAnalysis {
  width: number;
  height: number;
  frames: FrameAnalysis[];
  tracks: Track[];
  trackFeatures: TrackFeatures[];
  /** Per track, when flow was requested. */
  trackFlows?: TrackFlow[];
  context: EventContext;
  /** Max SNR over frames (SNR_SCALE per sigma), for previews and the restless map. */
  heat: GreyFrame;
  /** Union of the cleaned masks over frames (1 = active). */
  activity: Uint8Array;
  /** How each neighbour fitted the deployment background, when neighbours were given. */
  neighbourFits?: NeighbourFit[];
  /** Whether a background from other triggers took part (given, or built from neighbours). */
  deploymentBackground: boolean;
  /** The images the change was measured on, for what looks at the change around a blob
   *  (classifier/crops.ts): the frames aligned, relit and gain-fitted to the reference frame,
   *  the burst's own median (three frames or more) and the background from other triggers. */
  planes: EventPlanes;
}

export interface EventPlanes {
  work: RgbFrame[];
  median?: RgbFrame;
  deployment?: RgbFrame;
}

export function analyseEvent(input: EventInput): EventAnalysis {
  const params = checkParams(input.params ?? {});
  const frames = input.frames;
  if (!Array.isArray(frames) || frames.length === 0) throw notEnoughFrames('frames', 1, frames?.length ?? 0);
  frames.forEach((f, i) => {
    checkFrame(`frames[${i}]`, f, 3);
    checkSameShape('frames[0]', frames[0], `frames[${i}]`, f);
  });
  const { width, height } = frames[0];
  const n = frames.length;
  if (input.background) checkSameShape('frames[0]', frames[0], 'background', input.background);
  if (input.background && input.neighbours?.length) throw invalidArgument('background', 'absent when neighbours are given', 'a frame');
  if (input.mask) checkSameShape('frames[0]', { ...frames[0], channels: 1 }, 'mask', input.mask);
  if (input.restless && input.restless.length !== width * height) {
    throw invalidArgument('restless.length', String(width * height), input.restless.length);
  }
  const ignore = input.mask?.data;
  const ref = n === 1 ? 0 : n >> 1;
  const refLuma = toLuma(frames[ref]);
  const results: FrameAnalysis[] = [];
  const work: RgbFrame[] = [];
  let valid: Uint8Array | undefined = ignore ? Uint8Array.from(ignore) : undefined;
  // The reference's window is transformed once for every frame aligned to it.
  const refSpectrum = shiftReference(refLuma);
  const align = (f: RgbFrame, luma: GreyFrame): { frame: RgbFrame; shift: Shift; compensated: boolean } => {
    const shift = estimateShift(refSpectrum, f);
    if (!worthCompensating(shift, params.alignMinConfidence)) return { frame: f, shift, compensated: false };
    const t = translateBilinear(f, shift.dx, shift.dy);
    // A large subject can pull the correlation peak to its own motion. Keep the shift only if
    // it makes the frames agree better where most pixels are: the median absolute difference.
    if (medianAbsLumaDiff(luma, toLuma(t.frame), t.valid.data) >= 0.9 * medianAbsLumaDiff(luma, toLuma(f))) {
      return { frame: f, shift, compensated: false };
    }
    // The frame's ignored regions (its data strip) move with it; so does the uncovered edge.
    valid = andValidity(valid, translateValidity(width, height, shift.dx, shift.dy, ignore));
    return { frame: t.frame, shift, compensated: true };
  };
  // Local light: each frame (and the deployment background) relit against the reference; the
  // most uneven field applied is kept (shadeSpread), to tell moving shade from a global change.
  let lightSpread = 0;
  const relit = (f: RgbFrame): RgbFrame => {
    const r = relightMeasured(refLuma, f, valid);
    lightSpread = Math.max(lightSpread, r.spread);
    return r.frame;
  };
  for (let k = 0; k < n; k++) {
    const a = k === ref ? { frame: frames[k], shift: { dx: 0, dy: 0, confidence: 1 }, compensated: false } : align(frames[k], refLuma);
    const lit = k === ref ? a.frame : relit(a.frame);
    const go = k === ref ? { gain: [1, 1, 1], offset: [0, 0, 0] } : fitGainOffset(frames[ref], lit, valid);
    work.push(k === ref ? a.frame : applyGainOffset(lit, go));
    results.push({ shift: a.shift, compensated: a.compensated, gain: go.gain, offset: go.offset, sigma: 0, blobs: [], activeFraction: 0 });
  }
  // Luma of the aligned, normalised frames, made once for whichever step needs it first.
  let lumas: GreyFrame[] | undefined;
  const workLumas = (): GreyFrame[] => (lumas ??= work.map(toLuma));
  let background: RgbFrame | undefined;
  if (n >= 3) background = temporalMedian(work);
  let deployment: RgbFrame | undefined;
  let neighbourFits: NeighbourFit[] | undefined;
  if (input.background) {
    const a = align(input.background, refLuma);
    const lit = relit(a.frame);
    deployment = applyGainOffset(lit, fitGainOffset(work[ref], lit, valid));
  } else if (input.neighbours?.length) {
    // The yardstick: how much consecutive frames of this trigger disagree once aligned and
    // normalised (a single image has none; its best neighbour serves).
    let own: number | undefined;
    if (n >= 2) {
      const l = workLumas();
      const d: number[] = [];
      for (let k = 1; k < n; k++) d.push(medianAbsLumaDiff(l[k], l[k - 1], valid));
      own = d.sort((x, y) => x - y)[d.length >> 1];
    }
    const db = deploymentBackground(work[ref], input.neighbours, {
      mask: valid ? { width, height, channels: 1, data: valid } : undefined,
      ownDisagreement: own,
      minKept: n === 1 ? 1 : 3,
      alignMinConfidence: params.alignMinConfidence,
      referenceSpectrum: refSpectrum,
      partners: input.neighbourPartners,
    });
    neighbourFits = db.fits;
    if (db.frame) {
      deployment = relit(db.frame);
      if (db.valid) valid = andValidity(valid, db.valid);
    }
  }
  if (n === 1 && deployment) background = deployment;
  const minArea = Math.max(4, Math.round(params.minBlobFraction * width * height));
  const heat = makeGrey(width, height);
  const activity = new Uint8Array(width * height);
  let analysed = width * height;
  if (valid) {
    analysed = 0;
    for (const v of valid) if (v) analysed++;
  }
  const hi = params.seedSigmas * SNR_SCALE;
  const lo = params.growSigmas * SNR_SCALE;
  const blobsPerFrame: Blob[][] = [];
  const labelsPerFrame: Int32Array[] = [];
  // Change between two frames of the event in sigmas; symmetric, so each pair is made once.
  const pairs = new Map<number, { snr: GreyFrame; sigma: number }>();
  const pairSnr = (a: number, b: number): { snr: GreyFrame; sigma: number } => {
    const key = Math.min(a, b) * n + Math.max(a, b);
    let p = pairs.get(key);
    if (!p) pairs.set(key, (p = toSnr(maxChannelChange(work[a], work[b]), params.minNoise, valid, input.restless)));
    return p;
  };
  for (let k = 0; k < n; k++) {
    const parts: Array<{ snr: GreyFrame; sigma: number }> = [];
    if (background) parts.push(toSnr(maxChannelChange(work[k], background), params.minNoise, valid, input.restless));
    const deploymentPart = deployment && deployment !== background ? parts.length : -1;
    if (deploymentPart >= 0) parts.push(toSnr(maxChannelChange(work[k], deployment!), params.minNoise, valid, input.restless));
    // Frame-to-frame change, as a double difference: frame k against its two nearest other
    // frames, a pixel counting only as far as it differs from both. The change against one
    // other frame also lights up where the subject was in that frame (the uncovered
    // background), a second copy of the subject that breaks its track whenever it moves more
    // than its own size between frames; the double difference keeps only what frame k holds
    // (three-frame differencing, common practice in video surveillance). With two frames there
    // is no second frame: the deployment background stands in, or the plain difference serves.
    if (n >= 3) {
      const [p, q] = k === 0 ? [1, 2] : k === n - 1 ? [n - 2, n - 3] : [k - 1, k + 1];
      const a = pairSnr(k, p), b = pairSnr(k, q);
      parts.push({ snr: minImage(a.snr, b.snr), sigma: Math.max(a.sigma, b.sigma) });
    } else if (n === 2 && deploymentPart < 0) {
      parts.push(pairSnr(0, 1));
    }
    if (parts.length === 0) {
      blobsPerFrame.push([]);
      labelsPerFrame.push(new Int32Array(width * height));
      continue;
    }
    let snr = parts[0].snr;
    let mask = thresholdHysteresis(parts[0].snr, lo, hi);
    for (let j = 1; j < parts.length; j++) {
      snr = maxImage(snr, parts[j].snr);
      mask = orMask(mask, thresholdHysteresis(parts[j].snr, lo, hi));
    }
    mask = openClose3x3(mask);
    const comps = labelComponents(mask, snr);
    const blobs = comps.blobs.filter((b) => b.area >= minArea);
    // What the scene could explain, judged against the reference the change was first taken from.
    const ref = background ?? deployment ?? work[k > 0 ? k - 1 : 1];
    for (const b of blobs) {
      b.unexplained = unexplainedShare(work[k], ref, comps.labels, b, parts[0].sigma);
      // A subject standing still through a burst is explained by the burst's own median (it is
      // in it); only the deployment background shows it. The blob is as unexplained as the
      // reference that explains it least.
      if (deploymentPart >= 0) b.unexplained = Math.max(b.unexplained, unexplainedShare(work[k], deployment!, comps.labels, b, parts[deploymentPart].sigma));
      b.edge = edgeContrast(snr, comps.labels, b);
    }
    let active = 0;
    for (const b of blobs) active += b.area;
    for (let i = 0; i < snr.data.length; i++) {
      if (snr.data[i] > heat.data[i]) heat.data[i] = snr.data[i];
      if (mask.data[i]) activity[i] = 1;
    }
    results[k].sigma = parts[0].sigma;
    results[k].blobs = blobs;
    results[k].activeFraction = active / Math.max(1, analysed);
    blobsPerFrame.push(blobs);
    labelsPerFrame.push(comps.labels);
  }
  const tracks = linkTracks(blobsPerFrame, width, height);
  const feats = tracks.map((t) => trackFeatures(t, n, width, height, SNR_SCALE));
  let trackFlows: TrackFlow[] | undefined;
  if (input.flow && n >= 2) {
    // Each frame's pyramid is prepared once and serves both pairs it belongs to.
    const pyramids = workLumas().map((l) => flowPyramid(l));
    // Motion of frame k's pixels since frame k - 1, on frame k's grid (where its blobs are):
    // the flow from k back to k - 1, negated. Frame 0 takes its flow towards frame 1.
    const flows = pyramids.map((l, k) => {
      if (k === 0) return farnebackFlowPrepared(l, pyramids[1]);
      const back = farnebackFlowPrepared(l, pyramids[k - 1]);
      for (let i = 0; i < back.data.length; i++) back.data[i] = -back.data[i];
      return back;
    });
    trackFlows = tracks.map((t) => {
      const per: BlobFlow[] = t.points.map((p) => blobFlow(flows[p.frame], labelsPerFrame[p.frame], p.blob.label, p.blob));
      return trackFlow(t, per);
    });
  }
  const context: EventContext = {
    frameCount: n,
    activeFraction: results.reduce((a, r) => a + r.activeFraction, 0) / n,
    blobsPerFrame: results.reduce((a, r) => a + r.blobs.length, 0) / n,
    maxShift: Math.max(...results.map((r) => (r.compensated ? Math.hypot(r.shift.dx, r.shift.dy) : 0))),
    maxGainStep: Math.max(...results.map((r) => Math.max(...r.gain.map((g) => Math.abs(g - 1))))),
    noReference: n === 1 && !deployment,
    noBackground: !deployment,
    lightSpread,
    movingLight: lightSpread >= params.movingLightSpread,
  };
  return { width, height, frames: results, tracks, trackFeatures: feats, trackFlows, context, heat, activity, neighbourFits, deploymentBackground: deployment !== undefined, planes: { work, median: n >= 3 ? background : undefined, deployment } };
}
