/**
 * Fits the motion-evidence model on the generator's fitting seeds and records the fit data and
 * its metrics. Run: npm run fit (writes models/motion-weights.json and models/motion-fit-data.csv).
 *
 * Thresholds, both derived from the fit set, never tuned by hand:
 * - likely-blank below half the lowest out-of-fold score of any animal event: the fit seeds are
 *   split in two folds, each scored by the model fitted on the other, which estimates how low
 *   an unseen animal can score; the factor of two is the margin for scenes unlike the
 *   generator's (a missed animal costs far more than a kept blank);
 * - motion from the lowest score above which at least 95% of fit-set events hold an animal.
 */
import fs from 'node:fs';
import path from 'node:path';
import { expandFeatures, FEATURE_NAMES, type MotionModel } from '../src/kernels/score.js';
import { ALL_CATEGORIES } from './scenes/categories.js';
import { sceneRequests } from './scenes/evaluate.js';
import { recordScore, sceneRecord, type SceneRecord } from './scenes/scene-record.js';
import { FIT_SEEDS } from './scenes/seeds.js';
import { fitLogistic } from './logistic.js';
import { inParts } from './parts.js';

const started = Date.now();
const requests = sceneRequests(FIT_SEEDS.first, FIT_SEEDS.perCategory, ALL_CATEGORIES);
const events = (await inParts<SceneRecord>(import.meta.filename, async (i, n) => requests.filter((_, k) => k % n === i).map(sceneRecord))).sort((a, b) => a.seed - b.seed);
const lo = FEATURE_NAMES.map(() => Infinity);
const hi = FEATURE_NAMES.map(() => -Infinity);
for (const e of events) for (const r of e.rows) r.forEach((v, j) => ((lo[j] = Math.min(lo[j], v)), (hi[j] = Math.max(hi[j], v))));
const range = { lo, hi };
// L2 penalty on standardised weights. Small penalties fit the seeds best in-sample but let the
// quadratic terms extrapolate (a large, clear animal once scored near 0 out of fold at 0.3).
const LAMBDA = 3;
function train(subset: SceneRecord[]): MotionModel {
  const rows: number[][] = [];
  const labels: number[] = [];
  for (const e of subset) e.rows.forEach((r, i) => (rows.push(expandFeatures(r.map((v, j) => Math.min(hi[j], Math.max(lo[j], v))))), labels.push(e.labels[i])));
  const pos = labels.filter((l) => l === 1).length;
  // Balance the classes: each side carries equal total weight.
  const w = labels.map((l) => (l === 1 ? labels.length / (2 * pos) : labels.length / (2 * (labels.length - pos))));
  return { schema: 'movesift.motion-model/1', features: FEATURE_NAMES, ...fitLogistic(rows, labels, w, LAMBDA), thresholds: { blank: 0, motion: 1 }, range };
}
const fit = train(events);
const rows = { length: events.reduce((a, e) => a + e.rows.length, 0) };
const pos = events.reduce((a, e) => a + e.labels.filter((l) => l === 1).length, 0);
// Out-of-fold scores: fold = seed parity.
const oof = new Map<number, number>();
for (const fold of [0, 1]) {
  const m = train(events.filter((e) => e.seed % 2 !== fold));
  for (const e of events) if (e.seed % 2 === fold) oof.set(e.seed, recordScore(m, e).score);
}
const draft: MotionModel = { ...fit };
const scored = events.map((e) => ({ e, s: recordScore(draft, e).score }));
const animalScores = events.filter((e) => e.animal).map((e) => oof.get(e.seed)!).sort((a, b) => a - b);
const blank = animalScores[0] / 2;
const byScore = [...scored].sort((a, b) => b.s - a.s);
let motion = 1;
let animalsAbove = 0;
byScore.forEach((x, i) => {
  if (x.e.animal) animalsAbove++;
  if (animalsAbove / (i + 1) >= 0.95) motion = Math.min(motion, x.s);
});
motion = Math.max(motion, blank);
const model = {
  ...draft,
  thresholds: { blank, motion },
  fit: {
    script: 'tools/fit-weights.ts',
    data: 'models/motion-fit-data.csv',
    seeds: FIT_SEEDS,
    events: events.length,
    tracks: rows.length,
    subjectTracks: pos,
    lambda: LAMBDA,
    metrics: Object.fromEntries(
      ALL_CATEGORIES.map((c) => {
        const xs = scored.filter((x) => x.e.category === c);
        const blanks = xs.filter((x) => x.s < blank).length;
        const oofBlank = xs.filter((x) => oof.get(x.e.seed)! < blank).length;
        return [c, { events: xs.length, likelyBlank: blanks, likelyBlankOutOfFold: oofBlank, meanScore: +(xs.reduce((a, x) => a + x.s, 0) / xs.length).toFixed(4) }];
      }),
    ),
    lowestOutOfFoldAnimals: events
      .filter((e) => e.animal)
      .map((e) => ({ seed: e.seed, category: e.category, frames: e.frames, score: +oof.get(e.seed)!.toExponential(3) }))
      .sort((a, b) => a.score - b.score)
      .slice(0, 8),
    seconds: Math.round((Date.now() - started) / 1000),
  },
};
const root = path.resolve(import.meta.dirname, '..');
fs.mkdirSync(path.join(root, 'models'), { recursive: true });
fs.writeFileSync(path.join(root, 'models/motion-weights.json'), JSON.stringify(model, null, 2) + '\n');
const csv = ['seed,category,frames,label,' + FEATURE_NAMES.join(',')];
for (const e of events) e.rows.forEach((r, i) => csv.push([e.seed, e.category, e.frames, e.labels[i], ...r.map((v) => v.toFixed(5))].join(',')));
fs.writeFileSync(path.join(root, 'models/motion-fit-data.csv'), csv.join('\n') + '\n');
console.table(model.fit.metrics);
console.log({ blank, motion, seconds: model.fit.seconds, linearWeights: Object.fromEntries(FEATURE_NAMES.map((n, i) => [n, +fit.weights[i].toFixed(3)])) });
