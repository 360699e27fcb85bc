/**
 * Per-deployment calibration without labels. The motion model's blank threshold was fitted on
 * one scene generator; on another camera the same kind of false trigger (rain on this lens,
 * this site's grass) can score higher while animals still score above it: the ranking holds
 * where the cut point does not. Most triggers of a camera-trap deployment are false, so the
 * bulk of its event scores describes its false triggers, and an event inside that bulk is no
 * more animal-like than the deployment's usual false trigger.
 *
 * Per deployment and light mode (colour day and infrared night differ in noise and in what
 * sets them off), over events that had a background from other triggers and any scored track:
 *   m = median of logit(score), s = (m - lower quartile) / 0.6745,
 *   deployment cut = sigmoid(m + Z s), held between the fitted blank threshold and CAP.
 * The lower half only sets the spread: the upper tail holds the animals. 0.6745 is the normal
 * quartile (the standard normal's 75th percentile), so s estimates a standard deviation from
 * the quartile (common practice for a robust spread).
 *
 * The premise can fail: a busy game trail, a bait station or a nest is mostly animals. Then the
 * median itself scores as an animal would, and the calibration steps back to the fitted
 * threshold (status `busy`); with fewer than MIN_USABLE usable events it says so (`too-few`)
 * and also keeps the fitted threshold. The cut never goes below the fitted threshold (the
 * deployment can only add likely-blank calls, each one named as the deployment's) nor above
 * CAP, so the worst a wrong premise can do is bounded.
 *
 * Change together: score.ts verdictFor (the rule this extends), pipeline/deployment-pass.ts
 * (which groups events and stores the result), the review view's wording of the rule.
 */
import { blankScore, verdictFor, Verdict, type BlankGuard, type VerdictName } from './score.js';

/** Spreads above the bulk's median that an event must reach to stand out of it: about the
 *  one-sided 98th percentile of a normal bulk (our choice, not fitted). */
export const CALIBRATION_Z = 2;
/**
 * The highest cut a deployment may set: a score of 0.5, where the fitted model holds an animal
 * and a false trigger equally likely. Above it the model's own evidence leans to an animal, and
 * no amount of this deployment's false triggers should override that without labels (label
 * calibration, pipeline/calibrate.ts, may go further with people's decisions behind it).
 */
export const CALIBRATION_CAP = 0.5;
/** Fewest usable events to estimate a median and a quartile at all (our choice: below it the
 *  quartile rests on two or three scores). */
export const MIN_USABLE = 12;

/** Set by the pipeline, not here: `labels`, a threshold measured on people's decisions is in
 *  force and an estimate without labels does not override it; `off`, the scan did not ask for
 *  the deployment's cut (the statistics are kept for the record, the fitted threshold decides). */
export type CalibrationStatus = 'applied' | 'too-few' | 'busy' | 'labels' | 'off';

export interface DeploymentCalibration {
  status: CalibrationStatus;
  /** Events judged (image events of this deployment and light mode). */
  events: number;
  /** Of them, with a background from other triggers and a scored track: what the statistics use. */
  usable: number;
  /** Median and spread of logit(score) over the usable events (absent with too few). */
  median?: number;
  spread?: number;
  /** The blank threshold in force: the fitted one unless `applied`. */
  cut: number;
}

export interface CalibrationEvent {
  score: number;
  guard?: BlankGuard;
}

const EPS = 1e-4;
/** ln(p / (1 - p)), p clipped to [1e-4, 1 - 1e-4] so a score of 0 or 1 stays finite. */
export const logit = (p: number): number => {
  const q = Math.min(1 - EPS, Math.max(EPS, p));
  return Math.log(q / (1 - q));
};
const sigmoid = (z: number): number => 1 / (1 + Math.exp(-z));

/** Type-7 quantile (linear between order statistics; Hyndman & Fan 1996, R's default) of sorted values. */
export function quantileSorted(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(sorted.length - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** The deployment's calibration from its events' scores, against the fitted blank threshold. */
export function calibrateDeployment(events: readonly CalibrationEvent[], fittedBlank: number): DeploymentCalibration {
  const usable = events.filter((e) => e.score > 0 && !(e.guard?.noBackground ?? e.guard?.noReference));
  const base = { events: events.length, usable: usable.length };
  if (usable.length < MIN_USABLE) return { status: 'too-few', ...base, cut: fittedBlank };
  const z = usable.map((e) => logit(e.score)).sort((a, b) => a - b);
  const median = quantileSorted(z, 0.5);
  const spread = (median - quantileSorted(z, 0.25)) / 0.6745;
  if (median >= logit(CALIBRATION_CAP)) return { status: 'busy', ...base, median, spread, cut: fittedBlank };
  const cut = Math.min(CALIBRATION_CAP, Math.max(fittedBlank, sigmoid(median + CALIBRATION_Z * spread)));
  return { status: 'applied', ...base, median, spread, cut };
}

export type VerdictRule = 'model' | 'deployment';

/**
 * The verdict under both rules: the fitted model's, and the deployment's where its cut is
 * higher. `rule` names which decided: `deployment` only where the deployment's cut turned an
 * event likely-blank that the fitted model alone would not have. The context guards
 * (score.ts blankScore) hold under both.
 */
export function deploymentVerdict(thresholds: { blank: number; motion: number }, cut: number, score: number, guard: BlankGuard = {}): { verdict: VerdictName; rule: VerdictRule } {
  const model = verdictFor({ thresholds }, score, guard);
  if (cut <= thresholds.blank || model === Verdict.likelyBlank) return { verdict: model, rule: 'model' };
  const raised = score < cut && blankScore(score, guard) < cut;
  return raised ? { verdict: Verdict.likelyBlank, rule: 'deployment' } : { verdict: model, rule: 'model' };
}
