/**
 * How the classifier's second opinion joins the motion evidence. The rule, written down and
 * fitted with the model (tools/classifier/judge.ts fitCombine, on generated events the network
 * never trained on; stored in the model's manifest):
 *
 *   an event motion does not call likely-blank is called likely-blank by the classifier when
 *   its most subject-like crop scores below `classifierBlank`, its motion score is below
 *   `motionCeiling`, and the motion rule's guards allow a blank call at all (a background from
 *   other triggers took part, no moving light: score.ts blankScore).
 *
 * It only adds likely-blank calls where motion is not sure, and never takes one away: the
 * event's score stays the motion score (so the deployment's own calibration, the label
 * calibration and the review's ordering read what they always read). `classifierBlank` is the
 * lowest opinion the classifier gave any animal of the fitting set, divided by a margin;
 * `motionCeiling` keeps events motion is fairly sure of out of the classifier's reach.
 *
 * A joined logistic score was tried first (a fitted sum of both logits with one cut keeping
 * every animal): with its cut set to keep the fitting set's animals it called fewer false
 * triggers likely-blank than motion alone, because the lowest animals of each opinion differ
 * (docs/classifier.md).
 *
 * Change together: pipeline/deployment-pass.ts (re-judges with this rule from what the
 * ledger keeps), the review view's wording of `classifier` as the deciding rule.
 */
import { Verdict, type BlankGuard, type VerdictName } from '../kernels/score.js';
import { ClassifierErrorCode, classifierError } from './classifier-errors.js';

export interface CombineRule {
  classifierBlank: number;
  motionCeiling: number;
}

export type DrivenBy = 'motion' | 'classifier';

export function checkCombineRule(raw: unknown): CombineRule {
  const r = raw as Record<string, unknown>;
  const ok = (v: unknown, hi: number) => typeof v === 'number' && Number.isFinite(v) && v >= 0 && v <= hi;
  if (!r || typeof r !== 'object' || !ok(r.classifierBlank, 0.5) || !ok(r.motionCeiling, 1)) {
    throw classifierError(ClassifierErrorCode.manifest, 'model manifest: combine should hold classifierBlank in [0, 0.5] and motionCeiling in [0, 1]');
  }
  return { classifierBlank: r.classifierBlank as number, motionCeiling: r.motionCeiling as number };
}

/** True when the classifier turns an event likely-blank that motion alone does not. */
export function classifierCallsBlank(rule: CombineRule, motionVerdict: VerdictName, motionScore: number, opinion: number, guard: BlankGuard = {}): boolean {
  if (motionVerdict === Verdict.likelyBlank) return false;
  if (guard.noBackground ?? guard.noReference) return false;
  if (guard.movingLight) return false;
  return opinion < rule.classifierBlank && motionScore < rule.motionCeiling;
}

export function joinedVerdict(rule: CombineRule, motionVerdict: VerdictName, motionScore: number, opinion: number, guard: BlankGuard = {}): { verdict: VerdictName; drivenBy: DrivenBy } {
  return classifierCallsBlank(rule, motionVerdict, motionScore, opinion, guard) ? { verdict: Verdict.likelyBlank, drivenBy: 'classifier' } : { verdict: motionVerdict, drivenBy: 'motion' };
}
