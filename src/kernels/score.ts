/**
 * Motion evidence: a logistic model over per-track features plus event context, fitted by
 * tools/fit-weights.ts on the generator's fitting seeds (weights and metrics in
 * models/motion-weights.json). The event's score is its best track's; an event with no track
 * scores 0. Verdict thresholds come from the same fit, set to keep animals (see the model file).
 */
import { checkNumber } from '../shared/validate.js';
import { invalidArgument } from '../shared/errors.js';
import type { EventAnalysis, EventContext } from './analyse-event.js';
import type { TrackFeatures } from './tracks.js';

export const Verdict = { likelyBlank: 'likely-blank', unsure: 'unsure', motion: 'motion' } as const;
export type VerdictName = (typeof Verdict)[keyof typeof Verdict];

export const FEATURE_NAMES = [
  'logMeanSnr',
  'logPeakSnr',
  'persistence',
  'straightness',
  'logTravel',
  'sizeVariation',
  'logAreaFraction',
  'fill',
  'logActiveFraction',
  'logBlobsPerFrame',
  'trackShare',
  'unexplained',
  'edge',
] as const;

export interface MotionModel {
  schema: 'movesift.motion-model/1' | 'movesift.clip-model/1';
  /** Raw feature names; the model works on their quadratic expansion (see expandFeatures). */
  features: readonly string[];
  mean: number[];
  std: number[];
  weights: number[];
  bias: number;
  thresholds: { blank: number; motion: number };
  /** Range of each raw feature over the fitting tracks: inputs are clipped to it, so a scene
   *  unlike any fitted one (a very large, very clear animal) cannot send the quadratic terms
   *  into extrapolation. */
  range: { lo: number[]; hi: number[] };
}

export function featureVector(t: TrackFeatures, ctx: EventContext, trackShare: number): number[] {
  return [
    Math.log1p(t.meanSnr),
    Math.log1p(t.peakSnr),
    t.persistence,
    t.straightness,
    Math.log1p(t.travel),
    Math.min(3, t.sizeVariation),
    Math.log10(t.areaFraction + 1e-5),
    t.fill,
    Math.log10(ctx.activeFraction + 1e-5),
    Math.log1p(ctx.blobsPerFrame),
    trackShare,
    t.unexplained,
    t.edge,
  ];
}

/**
 * Feature rows of a set of tracks seen together (an event, or a clip's recent frames); the share
 * of all tracked change that each track holds needs the others.
 */
export function trackRows(feats: readonly TrackFeatures[], tracks: ReadonlyArray<{ points: ReadonlyArray<{ blob: { area: number } }> }>, ctx: EventContext): number[][] {
  const areas = tracks.map((t) => t.points.reduce((q, p) => q + p.blob.area, 0));
  const total = areas.reduce((a, b) => a + b, 0);
  return feats.map((f, i) => featureVector(f, ctx, total > 0 ? areas[i] / total : 0));
}

/** Feature vectors of every track of an analysed event (rows in track order). */
export function eventFeatureRows(a: EventAnalysis): number[][] {
  return trackRows(a.trackFeatures, a.tracks, a.context);
}

/**
 * Quadratic expansion: the raw features, then every product f_i f_j (i <= j). A linear model
 * cannot say "persistent AND not travelling is sway, unless the blob is compact"; products let
 * a logistic model draw such curved boundaries while staying a convex, reproducible fit.
 */
export function expandFeatures(row: readonly number[]): number[] {
  const out = [...row];
  for (let i = 0; i < row.length; i++) for (let j = i; j < row.length; j++) out.push(row[i] * row[j]);
  return out;
}

export function trackScore(model: MotionModel, raw: number[]): number {
  const row = raw.map((v, i) => Math.min(model.range.hi[i], Math.max(model.range.lo[i], v)));
  const x = expandFeatures(row);
  if (model.weights.length !== x.length || model.mean.length !== x.length) {
    throw invalidArgument('model.weights', `${x.length} weights (quadratic expansion of ${row.length} features)`, model.weights.length);
  }
  let z = model.bias;
  for (let i = 0; i < x.length; i++) z += model.weights[i] * ((x[i] - model.mean[i]) / model.std[i]);
  return 1 / (1 + Math.exp(-z));
}

export interface EventScore {
  score: number;
  verdict: VerdictName;
  /** Index of the best track, -1 when there is none. */
  bestTrack: number;
  trackScores: number[];
}

/** What in an event's context limits calling it blank (EventContext; older ledgers and fit
 *  records lack the later fields). */
export type BlankGuard = Partial<Pick<EventContext, 'noBackground' | 'noReference' | 'movingLight'>>;

/**
 * Under moving light (EventContext.movingLight: a cloud shadow or moving shade) an event is
 * called likely-blank only below this score. It is the lowest score of the 76 animals under a
 * drifting cloud shadow flagged as moving light among the fitting seeds (MIXED_FIT_SEEDS, 40
 * per animal category, with neighbours; 2026-12-03, models/motion-weights.json of that day):
 * all 76 kept, a recall of at least 0.96 with 95% confidence. 35% of the fitting seeds' cloud
 * shadows flagged so score below it. The model is not fitted on such animals (fitted on, they
 * pulled its threshold to almost 0: DEVELOPERS.md); refit, and this value must be measured again.
 */
export const MOVING_LIGHT_BLANK = 0.028;

/**
 * The score an event counts with against the blank threshold: 1 (never blank) when no
 * background from other triggers took part (a subject that never moved cannot show then; a
 * single image shows nothing at all), and under moving light when the score is at least
 * MOVING_LIGHT_BLANK (such light sets off change all over the frame, among which an animal
 * scores like the light); otherwise the score itself.
 */
export function blankScore(score: number, guard: BlankGuard = {}): number {
  if (guard.noBackground ?? guard.noReference) return 1;
  if (guard.movingLight && score >= MOVING_LIGHT_BLANK) return 1;
  return score;
}

/**
 * The verdict of a score under the model's thresholds. Below the blank threshold it is
 * likely-blank only if the event's context allows (blankScore), unsure otherwise; a high score
 * is motion whatever the context.
 */
export function verdictFor(model: Pick<MotionModel, 'thresholds'>, score: number, guard: BlankGuard = {}): VerdictName {
  checkNumber('score', score, 0, 1);
  if (score < model.thresholds.blank) return blankScore(score, guard) < model.thresholds.blank ? Verdict.likelyBlank : Verdict.unsure;
  if (score >= model.thresholds.motion) return Verdict.motion;
  return Verdict.unsure;
}

export function scoreEvent(model: MotionModel, a: EventAnalysis): EventScore {
  return scoreEventRows(model, eventFeatureRows(a), a.context);
}

/** The same from an event's feature rows (what the fitting tools keep of an analysis). */
export function scoreEventRows(model: MotionModel, rows: readonly number[][], guard: BlankGuard = {}): EventScore {
  const trackScores = rows.map((r) => trackScore(model, [...r]));
  let best = -1;
  trackScores.forEach((s, i) => {
    if (best < 0 || s > trackScores[best]) best = i;
  });
  const score = best < 0 ? 0 : trackScores[best];
  return { score, verdict: verdictFor(model, score, guard), bestTrack: best, trackScores };
}
