/**
 * A deployment's model learned from the reviewer's decisions: the core, pure of the
 * ledger. Reviewed events in (keep = a subject, set-aside = blank), each with its motion score,
 * its best track's features and, when the scan had one, the classifier's opinion; a model out
 * that says how likely an undecided event of that deployment is to hold a subject, with its
 * blank cut, its k-fold recall and blank share, and its ONNX export.
 *
 * The model: an L2-regularised logistic regression (src/shared/stats/logistic.ts) on the inputs
 * of inputRow, standardised. The blank cut lies CUT_MARGIN spreads below the lowest
 * out-of-fold score of a kept event. Judged out of fold before it is offered: in each of FOLDS folds the model and its cut are made from the others and applied
 * to the held fold, so the recall and blank share shown are what the rule did on decisions it
 * had not seen.
 *
 * It refuses, saying how many more of each decision it needs, below MIN_PER_DECISION of either.
 *
 * Change together: the ONNX graph of learnedGraph with inputRow (the same inputs, same order).
 */
import { logit } from '../kernels/deployment-calibration.js';
import { writeOnnx } from './onnx-graph.js';
import { invalidArgument, MovesiftError } from '../shared/errors.js';
import { fitLogistic } from '../shared/stats/logistic.js';


export const LearnErrorCode = { tooFew: 'E_LEARN_TOO_FEW' } as const;

/** Fewest keeps and fewest set-asides to learn from (our choice: with FOLDS folds, two of each
 *  per held fold, and a cut that does not rest on one or two kept events). */
export const MIN_PER_DECISION = 10;
export const FOLDS = 5;
/** The blank cut lies this many standard deviations of the kept events' scores (as logits) below
 *  the lowest of them (our choice: the lowest of a dozen or two kept events is not the lowest of
 *  the next hundred). */
export const CUT_MARGIN = 1;
/** L2 penalty on the standardised weights (our choice, among 0.3 to 10 on invented decisions: docs/classifier.md). */
export const PENALTY = 1;

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

/** Below the lowest kept score by CUT_MARGIN standard deviations of the kept scores, in logits. */
function cutOf(scores: number[], labels: number[]): number {
  const z = scores.filter((_, i) => labels[i]).map(logit);
  const mean = z.reduce((a, b) => a + b, 0) / z.length;
  const sd = Math.sqrt(z.reduce((a, b) => a + (b - mean) ** 2, 0) / Math.max(1, z.length - 1));
  return 1 / (1 + Math.exp(-(Math.min(...z) - CUT_MARGIN * sd)));
}

/** Folds dealt in turn within each decision, so every fold holds both. */
function dealFolds(labels: readonly number[]): number[] {
  let k = 0, s = 0;
  return labels.map((l) => (l ? k++ : s++) % FOLDS);
}

/** Scores of each row by a model fitted without its fold (out of fold). */
function outOfFold(rows: number[][], labels: number[]): number[] {
  const fold = dealFolds(labels);
  const out = new Array<number>(rows.length);
  for (let f = 0; f < FOLDS; f++) {
    const tr = rows.map((_, i) => i).filter((i) => fold[i] !== f);
    const m = fit(tr.map((i) => rows[i]), tr.map((i) => labels[i]));
    rows.forEach((r, i) => {
      if (fold[i] === f) out[i] = scoreOf(m, r);
    });
  }
  return out;
}

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
  // The cut comes from scores of decisions the model had not seen (a model scores the events it
  // learned from higher than the next ones). Judged one level further out: each fold's model and
  // cut are made from the other folds alone (the cut from their own out-of-fold scores).
  const fold = dealFolds(labels);
  let keptKept = 0, blankCalled = 0;
  for (let f = 0; f < FOLDS; f++) {
    const tr = rows.map((_, i) => i).filter((i) => fold[i] !== f);
    const trRows = tr.map((i) => rows[i]), trLabels = tr.map((i) => labels[i]);
    const m = fit(trRows, trLabels);
    const cut = cutOf(outOfFold(trRows, trLabels), trLabels);
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
    cut: cutOf(outOfFold(rows, labels), labels),
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

/** The inputs of a stored event for a learned model (its `inputs` say whether the classifier's opinion is one). */
export function storedRow(m: LearnedModel, featureCount: number, score: number, best: readonly number[] | null, opinion: number | undefined): number[] {
  return inputRow({ id: '', keep: false, score, best, opinion }, featureCount, m.inputs.includes('logitClassifierOpinion'));
}

/**
 * The verdict where a learned model decides: likely-blank below its cut (never without a
 * background from other triggers: the motion rule's guard holds), and at or above it no
 * likely-blank at all (what the other rules called blank becomes unsure: this place's own
 * decisions say it may hold a subject). `changed` when it differs from the other rules' verdict.
 */
export function learnedVerdict(m: LearnedModel, row: readonly number[], other: 'likely-blank' | 'unsure' | 'motion', noBackground: boolean): { verdict: 'likely-blank' | 'unsure' | 'motion'; changed: boolean } {
  const below = learnedScore(m, row) < m.cut;
  const verdict = below && !noBackground ? 'likely-blank' : other === 'likely-blank' ? 'unsure' : other;
  return { verdict, changed: verdict !== other };
}
