/**
 * Fits the rule that joins the classifier to the motion score (src/classifier/combine.ts) and
 * judges a set of events by motion alone and by the joined rule, side by side.
 */
import { joinedVerdict, type CombineRule } from '../../src/classifier/combine.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { verdictFor, Verdict } from '../../src/kernels/score.js';
import { aucOf } from '../family-judge.js';
import type { CropSet } from './crop-data.js';
import { eventProbabilities } from './train.js';

/** The classifier's blank cut is the lowest opinion it gave any animal of the fitting set divided
 *  by this (our choice: the lowest of a few hundred animals is not the lowest of the next
 *  thousand; what validation found below it is in docs/classifier.md). */
export const CUT_MARGIN = 4;
/** Motion scores from here up are out of the classifier's reach (our choice: the upper part of
 *  the motion model's unsure-to-motion range, where motion alone is fairly sure). */
export const MOTION_CEILING = 0.7;

export function fitCombine(set: CropSet, c: number[]): CombineRule {
  const lowest = Math.min(...set.events.map((e, i) => (e.animal ? c[i] : 1)));
  return { classifierBlank: lowest / CUT_MARGIN, motionCeiling: MOTION_CEILING };
}

export interface SetJudgement {
  table: Record<string, string | number>;
  lostWithClassifier: string[];
}

export function judgeSet(set: CropSet, probs: Float32Array, rule: CombineRule): SetJudgement {
  const c = eventProbabilities(set, probs);
  const model = MOTION_MODEL;
  let animals = 0, keptMotion = 0, keptBoth = 0, falseN = 0, blankMotion = 0, blankBoth = 0;
  const lost: string[] = [];
  const mPos: number[] = [], mNeg: number[] = [], cPos: number[] = [], cNeg: number[] = [];
  set.events.forEach((e, i) => {
    const vm = verdictFor(model, e.score, e.guard);
    const vb = joinedVerdict(rule, vm, e.score, c[i], e.guard);
    if (e.animal) {
      animals++;
      if (vm !== Verdict.likelyBlank) keptMotion++;
      if (vb.verdict !== Verdict.likelyBlank) keptBoth++;
      else lost.push(`${e.category} ${e.seed}`);
      mPos.push(e.score); cPos.push(c[i]);
    } else {
      falseN++;
      if (vm === Verdict.likelyBlank) blankMotion++;
      if (vb.verdict === Verdict.likelyBlank) blankBoth++;
      mNeg.push(e.score); cNeg.push(c[i]);
    }
  });
  // Crop-level AUC on the un-jittered crops.
  const cropPos: number[] = [], cropNeg: number[] = [];
  set.labels.forEach((l, i) => {
    if (set.jitter[i]) return;
    (l ? cropPos : cropNeg).push(probs[i]);
  });
  const pct = (a: number, b: number) => `${a}/${b} (${b ? ((100 * a) / b).toFixed(1) : '-'}%)`;
  return {
    table: {
      events: set.events.length,
      'animals kept, motion': pct(keptMotion, animals),
      'animals kept, with classifier': pct(keptBoth, animals),
      'false likely-blank, motion': pct(blankMotion, falseN),
      'false likely-blank, with classifier': pct(blankBoth, falseN),
      'AUC motion': +aucOf(mPos, mNeg).toFixed(3),
      'AUC classifier': +aucOf(cPos, cNeg).toFixed(3),
      'crop AUC': +aucOf(cropPos, cropNeg).toFixed(3),
    },
    lostWithClassifier: lost,
  };
}
