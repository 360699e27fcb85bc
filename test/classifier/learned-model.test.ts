/**
 * Learning from decisions (src/classifier/learned-model.ts) on invented decisions where the truth is
 * planted: at a place whose false triggers score high on motion (rain on this lens), what
 * separates them from animals is the classifier's opinion and one track feature. The learned
 * rule, judged out of fold, keeps the kept events and calls a share of set-asides blank where
 * motion's own cut would call none; its ONNX export, run by onnxruntime-node, gives its own scores; too few
 * decisions are refused with how many more of each are needed.
 */
import * as ort from 'onnxruntime-node';
import { describe, expect, it } from 'vitest';
import { inputRow, learnedGraph, learnedScore, learnFromDecisions, LearnErrorCode, MIN_PER_DECISION, type ReviewedEvent } from '../../src/classifier/learned-model.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { FEATURE_NAMES } from '../../src/kernels/score.js';
import { makeRng } from '../../tools/scenes/random.js';

function decisions(n: number, seed: number): ReviewedEvent[] {
  const rng = makeRng(seed);
  return Array.from({ length: n }, (_, i) => {
    const keep = i % 3 === 0;
    const best = FEATURE_NAMES.map(() => rng.normal());
    best[2] = keep ? 0.8 + 0.2 * rng.next() : 0.2 + 0.5 * rng.next(); // persistence
    const score = keep ? 0.5 + 0.49 * rng.next() : 0.45 + 0.4 * rng.next();
    const opinion = keep ? 0.3 + 0.7 * rng.next() : 0.02 * rng.next() + (rng.chance(0.1) ? 0.4 : 0);
    return { id: `e${i}`, keep, score, best: i % 11 === 5 ? null : best, opinion };
  });
}

describe('learning a deployment from decisions', () => {
  it('keeps the kept out of fold, calls set-asides blank, and exports the same function', async () => {
    const evs = decisions(60, 1);
    const m = learnFromDecisions(evs, FEATURE_NAMES);
    expect(m.inputs).toEqual(['logitMotionScore', 'noTrack', ...FEATURE_NAMES, 'logitClassifierOpinion']);
    expect(m.folds.kept + m.folds.setAside).toBe(60);
    expect(m.folds.recall).toBeGreaterThanOrEqual(0.95);
    // With no signal planted the same rule calls about 3% blank; here the opinion and persistence carry it.
    expect(m.folds.blankShare).toBeGreaterThan(0.1);
    // Motion's own cut calls none of these set-asides blank (they all score above it).
    expect(evs.filter((e) => !e.keep && e.score < MOTION_MODEL.thresholds.blank)).toHaveLength(0);
    // On fresh decisions of the same place: every kept one above the cut.
    const fresh = decisions(90, 2);
    const rows = fresh.map((e) => inputRow(e, FEATURE_NAMES.length, true));
    const scores = rows.map((r) => learnedScore(m, r));
    const keptLost = fresh.filter((e, i) => e.keep && scores[i] < m.cut).length;
    expect(keptLost).toBeLessThanOrEqual(1);
    expect(fresh.filter((e, i) => !e.keep && scores[i] < m.cut).length).toBeGreaterThan(0.1 * fresh.filter((e) => !e.keep).length);
    // The ONNX export computes the same scores (float32 against double: within 1e-5).
    const s = await ort.InferenceSession.create(learnedGraph(m, 'test-deployment'));
    const out = await s.run({ inputs: new ort.Tensor('float32', Float32Array.from(rows.flat()), [rows.length, m.inputs.length]) });
    const y = out.subject.data as Float32Array;
    let worst = 0;
    scores.forEach((v, i) => (worst = Math.max(worst, Math.abs(v - y[i]))));
    expect(worst).toBeLessThan(1e-5);
    await s.release();
  });

  it('without the classifier it learns from motion alone', () => {
    const evs = decisions(40, 3).map(({ opinion: _, ...e }) => e);
    expect(learnFromDecisions(evs, FEATURE_NAMES).inputs).not.toContain('logitClassifierOpinion');
  });

  it('refuses five decisions, saying how many more of each it needs', () => {
    const five = decisions(5, 4);
    const kept = five.filter((e) => e.keep).length;
    try {
      learnFromDecisions(five, FEATURE_NAMES);
      expect.unreachable();
    } catch (e) {
      expect((e as { code: string }).code).toBe(LearnErrorCode.tooFew);
      expect((e as Error).message).toContain(`${kept} kept and ${5 - kept} set aside`);
      expect((e as Error).message).toContain(`${MIN_PER_DECISION - kept} more kept and ${MIN_PER_DECISION - (5 - kept)} more set aside`);
    }
  });
});
