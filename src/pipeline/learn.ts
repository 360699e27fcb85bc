/**
 * `movesift learn`: per deployment, learn from the events people decided (classifier/learned-model.ts), say what
 * the model would do (its out-of-fold recall and blank share, and how many undecided events it
 * would call likely-blank), and with `use` keep it in the ledger (its ONNX file, hash and the
 * decisions it learned from) and let the scan's second pass re-judge the undecided events by it.
 */
import { createHash } from 'node:crypto';
import { createLearnedStore } from '../ledger/learned-store.js';
import type { Ledger } from '../ledger/open-ledger.js';
import { deploymentPass } from './deployment-pass.js';
import { FEATURE_NAMES } from '../kernels/score.js';
import { MovesiftError } from '../shared/errors.js';
import { learnedGraph, learnFromDecisions, type LearnedModel, type ReviewedEvent } from '../classifier/learned-model.js';

export type DeploymentLearning =
  | { deployment: string; ok: true; model: LearnedModel; sha256: string; used: boolean; verdictsChanged: number }
  | { deployment: string; ok: false; code: string; reason: string };

export function learnDeployments(db: Ledger, o: { deployments?: string[]; use: boolean; who: string; raise: boolean }): DeploymentLearning[] {
  const store = createLearnedStore(db);
  const out: DeploymentLearning[] = [];
  for (const dep of o.deployments ?? store.deployments()) {
    const events: ReviewedEvent[] = store.reviewed(dep).map((r) => ({
      id: r.id, keep: r.decision === 'keep', score: r.score,
      best: r.best ? (JSON.parse(r.best) as number[]) : null,
      ...(r.opinion !== null ? { opinion: r.opinion } : {}),
    }));
    let model: LearnedModel;
    try {
      model = learnFromDecisions(events, FEATURE_NAMES);
    } catch (e) {
      if (!(e instanceof MovesiftError)) throw e;
      out.push({ deployment: dep, ok: false, code: e.code, reason: e.message });
      continue;
    }
    const onnx = learnedGraph(model, `learned-${dep}`);
    const sha256 = createHash('sha256').update(onnx).digest('hex');
    let verdictsChanged = 0;
    if (o.use) {
      store.keep(dep, onnx, sha256, JSON.stringify(model), o.who);
      verdictsChanged = deploymentPass(db, [dep], { raise: o.raise }).changed;
    }
    out.push({ deployment: dep, ok: true, model, sha256, used: o.use, verdictsChanged });
  }
  return out;
}

/** What the command line reports of learning (it reaches the classifier layer only through the pipeline). */
export { LearnErrorCode, MIN_PER_DECISION } from '../classifier/learned-model.js';
