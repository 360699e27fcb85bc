/**
 * Learning a deployment from the reviewer's decisions (issue 19, item 4): the core, pure of the
 * ledger. Reviewed events in (keep = a subject, set-aside = blank), each with its motion score,
 * its best track's features and, when the scan had one, the classifier's opinion; a model out
 * that says how likely an undecided event of that deployment is to hold a subject, with its
 * blank cut, its k-fold recall and blank share, and its ONNX export.
 *
 * The model: an L2-regularised logistic regression (src/shared/stats/logistic.ts) on the inputs
 * of inputRow, standardised. The blank cut keeps every kept event it learned from, below the
 * lowest such score by CUT_MARGIN. Judged out of fold before it is offered: in each of FOLDS
 * folds the model and its cut are fitted on the others and applied to the held fold, so the
 * recall and blank share shown are what the rule did on decisions it had not seen.
 *
 * It refuses, saying how many more of each decision it needs, below MIN_PER_DECISION of either.
 *
 * Change together: the ONNX graph of learnedGraph with inputRow (the same inputs, same order).
 */
/** Scores are clipped to [EDGE, 1 - EDGE] before a logit (as kernels/deployment-calibration.ts does). */
const EDGE = 1e-4;
import { writeOnnx } from '../classifier/onnx-graph.js';
import { invalidArgument, MovesiftError } from '../shared/errors.js';
import { fitLogistic } from '../shared/stats/logistic.js';

export const LearnErrorCode = { tooFew: 'E_LEARN_TOO_FEW' } as const;

/** Fewest keeps and fewest set-asides to learn from (our choice: with FOLDS folds, two of each
 *  per held fold, and a cut that does not rest on one or two kept events). */
export const MIN_PER_DECISION = 10;
export const FOLDS = 5;
/** The blank cut lies this factor below the lowest score of a kept event learned from (our choice). */
export const CUT_MARGIN = 0.8;
/** L2 penalty on the standardised weights (our choice: strong, for tens of decisions and a dozen inputs). */
export const PENALTY = 10;

export interface ReviewedEvent {
  id: string;
  /** A person kept it (a subject) or set it aside (blank). */
  keep: boolean;
  /** Motion score, the best track's feature row (score.ts FEATURE_NAMES; null without a track),
   *  the classifier's opinion (absent when the scan had none). */
  score: number;
  best: readonly number[] | null;
  opinion?: number;
}

export interface LearnedModel {
  /** Inputs, in order (inputRow). */
  inputs: string[];
  mean: number[];
  std: number[];
  weights: number[];
  bias: number;
  cut: number;
  /** Out of fold: kept events the rule kept, set-aside events it called blank. */
  folds: { recall: number; keptKept: number; kept: number; blankShare: number; blankCalled: number; setAside: number };
  /** The decisions learned from, by event id. */
  learnedFrom: string[];
}

const logit = (p: number) => {
  const q = Math.min(1 - EDGE, Math.max(EDGE, p));
  return Math.log(q / (1 - q));
};

/** The inputs of one event: logit of the motion score, the best track's features (zeros and a
 *  flag when it had none) and, if every event has one, logit of the classifier's opinion. */
export function inputRow(e: ReviewedEvent, featureCount: number, withOpinion: boolean): number[] {
  const best = e.best ?? new Array<number>(featureCount).fill(0);
  if (best.length !== featureCount) throw invalidArgument('best.length', String(featureCount), best.length);
  return [logit(e.score), e.best ? 0 : 1, ...best, ...(withOpinion ? [logit(e.opinion ?? 0)] : [])];
}

export function inputNames(featureNames: readonly string[], withOpinion: boolean): string[] {
  return ['logitMotionScore', 'noTrack', ...featureNames, ...(withOpinion ? ['logitClassifierOpinion'] : [])];
}

function fit(rows: number[][], labels: number[]) {
  const pos = labels.reduce((a, b) => a + b, 0);
  const w = labels.map((l) => (l ? labels.length / (2 * pos) : labels.length / (2 * (labels.length - pos))));
  return fitLogistic(rows, labels, w, PENALTY);
}

function scoreOf(m: { mean: number[]; std: number[]; weights: number[]; bias: number }, row: readonly number[]): number {
  let z = m.bias;
  for (let j = 0; j < row.length; j++) z += (m.weights[j] * (row[j] - m.mean[j])) / m.std[j];
  return 1 / (1 + Math.exp(-z));
}

const cutOf = (scores: number[], labels: number[]) => CUT_MARGIN * Math.min(...scores.filter((_, i) => labels[i]));

export function learnFromDecisions(events: readonly ReviewedEvent[], featureNames: readonly string[]): LearnedModel {
  const kept = events.filter((e) => e.keep).length;
  const setAside = events.length - kept;
  if (kept < MIN_PER_DECISION || setAside < MIN_PER_DECISION) {
    const need = [kept < MIN_PER_DECISION ? `${MIN_PER_DECISION - kept} more kept` : '', setAside < MIN_PER_DECISION ? `${MIN_PER_DECISION - setAside} more set aside` : ''].filter(Boolean).join(' and ');
    throw new MovesiftError(LearnErrorCode.tooFew, `too few decisions to learn from: ${kept} kept and ${setAside} set aside; at least ${MIN_PER_DECISION} of each are needed (${need}), so that the recall it shows is measured on decisions it has not seen`);
  }
  const withOpinion = events.every((e) => e.opinion !== undefined);
  const rows = events.map((e) => inputRow(e, featureNames.length, withOpinion));
  const labels = events.map((e) => (e.keep ? 1 : 0));
  // Folds dealt in turn within each decision, so every fold holds both.
  const fold = new Array<number>(events.length);
  let k = 0, s = 0;
  events.forEach((e, i) => (fold[i] = e.keep ? k++ % FOLDS : s++ % FOLDS));
  let keptKept = 0, blankCalled = 0;
  for (let f = 0; f < FOLDS; f++) {
    const tr = rows.map((_, i) => i).filter((i) => fold[i] !== f);
    const m = fit(tr.map((i) => rows[i]), tr.map((i) => labels[i]));
    const cut = cutOf(tr.map((i) => scoreOf(m, rows[i])), tr.map((i) => labels[i]));
    rows.forEach((r, i) => {
      if (fold[i] !== f) return;
      const p = scoreOf(m, r);
      if (labels[i] && p >= cut) keptKept++;
      if (!labels[i] && p < cut) blankCalled++;
    });
  }
  const m = fit(rows, labels);
  return {
    inputs: inputNames(featureNames, withOpinion),
    mean: m.mean, std: m.std, weights: m.weights, bias: m.bias,
    cut: cutOf(rows.map((r) => scoreOf(m, r)), labels),
    folds: { recall: keptKept / kept, keptKept, kept, blankShare: blankCalled / setAside, blankCalled, setAside },
    learnedFrom: events.map((e) => e.id),
  };
}

/** The learned model's score of one event's inputs (what its ONNX export computes). */
export function learnedScore(m: LearnedModel, row: readonly number[]): number {
  return scoreOf(m, row);
}

/** The model as ONNX (opset 13: Gemm and Sigmoid), the standardisation folded into the
 *  weights: input `inputs` [N, inputs.length], output `subject` [N, 1]. */
export function learnedGraph(m: LearnedModel, name: string): Uint8Array {
  const w = m.weights.map((v, j) => v / m.std[j]);
  const b = m.bias - m.weights.reduce((a, v, j) => a + (v * m.mean[j]) / m.std[j], 0);
  return writeOnnx({
    name, inputName: 'inputs', inputShape: ['N', m.inputs.length], outputName: 'subject', outputShape: ['N', 1],
    layers: [{ op: 'dense', weights: Float32Array.from(w), bias: Float32Array.from([b]), out: 1, in: m.inputs.length }, { op: 'sigmoid' }],
    metadata: { inputs: m.inputs.join(','), cut: String(m.cut), learnedFrom: String(m.learnedFrom.length) },
  });
}
