/**
 * Calibration of the likely-blank threshold from people's labels in this ledger. An event is
 * labelled an animal when a person kept it or an audit found an animal in it (keeping is the safe
 * reading: a person chose not to set it aside); labelled empty when set aside by a person or
 * answered "no animal" in an audit. The proposed threshold is the highest one whose recall on the
 * animal-labelled events is at least the target with 95% confidence: the one-sided
 * Clopper-Pearson lower bound of (animals at or above the threshold) / (animals) must reach the
 * target. With n labelled animals and none missed, that bound is 0.05^(1/n), so a 99% target
 * needs at least 299 labelled animals; fewer, and calibration refuses with the number needed.
 *
 * Only image events (bursts and single images) take part: clips are scored by the clip model,
 * on its own scale and with its own thresholds. Each event counts with the score its context
 * allows against a blank threshold (score.ts blankScore: an event analysed without a background
 * from other triggers is never likely-blank, one under moving light only below a low score).
 */
import { openLedger } from '../ledger/open-ledger.js';
import { deploymentPass } from './deployment-pass.js';
import { createCalibrationStore } from '../ledger/calibration-store.js';
import { MOTION_MODEL } from '../kernels/model.js';
import { blankScore, verdictFor, Verdict, type BlankGuard } from '../kernels/score.js';
import { recallThreshold, sampleSizeForZeroMisses } from '../shared/stats/binomial.js';
import { MovesiftError } from '../shared/errors.js';
import type { CalibrationResult } from '../shared/review-api.js';

export const CalibrationErrorCode = { tooFewAnimals: 'E_CALIBRATE_TOO_FEW_ANIMALS' } as const;
const ALPHA = 0.05;

export type Calibration = CalibrationResult;

export function calibrate(ledger: string, o: { recall: number; apply?: boolean; who?: string | null }): Calibration {
  const db = openLedger(ledger);
  try {
    const store = createCalibrationStore(db);
    const events = store
      .events()
      .filter((e) => e.kind !== 'clip')
      .map((e) => ({ ...e, guard: (e.context ? JSON.parse(e.context) : {}) as BlankGuard }));
    const animal = (e: (typeof events)[number]) => e.audit_animal === 1 || (e.audit_animal === null && e.decision === 'keep');
    const empty = (e: (typeof events)[number]) => e.audit_animal === 0 || (e.audit_animal === null && e.decision === 'set-aside');
    const scores = events.filter(animal).map((e) => blankScore(e.score, e.guard)).sort((a, b) => a - b);
    const n = scores.length;
    const needed = sampleSizeForZeroMisses(1 - o.recall, ALPHA);
    if (n < needed) throw new MovesiftError(CalibrationErrorCode.tooFewAnimals, `${n} event(s) are labelled as holding an animal (kept, or found in an audit); showing a recall of ${o.recall} with 95% confidence needs at least ${needed}, even if none were missed. Review more events first`);
    const best = recallThreshold(scores, o.recall, ALPHA);
    const proposed = { thresholds: { ...MOTION_MODEL.thresholds, blank: best.threshold } };
    const verdictOf = (e: (typeof events)[number]) => verdictFor(proposed, e.score, e.guard);
    const undecided = events.filter((e) => e.decision === null);
    const changes = undecided.filter((e) => verdictOf(e) !== e.verdict);
    let applied = false;
    if (o.apply) {
      store.reverdict(changes.map((e) => ({ id: e.id, verdict: verdictOf(e) })));
      applied = true;
    }
    store.log({ who: o.who ?? null, target: o.recall, threshold: best.threshold, animals: n, lower: best.lower, applied, changed: applied ? changes.length : 0 });
    // Applied, the labelled threshold is in force for every deployment: the second pass records
    // that its own unlabelled calibration steps aside (deployment-pass.ts).
    if (applied) deploymentPass(db, store.deployments(), { raise: false });
    return {
      target: o.recall,
      animals: n,
      empties: events.filter(empty).length,
      threshold: best.threshold,
      recall: best.kept / n,
      recallLower: best.lower,
      wouldBeBlank: events.filter((e) => verdictOf(e) === Verdict.likelyBlank).length,
      blankNow: events.filter((e) => e.verdict === 'likely-blank').length,
      undecidedChanges: changes.length,
      applied,
    };
  } finally {
    db.close();
  }
}
