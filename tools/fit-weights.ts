/**
 * Fits the motion-evidence model on the generator's fitting seeds and records the fit data and
 * its metrics. Run: npm run fit (writes models/motion-weights.json and models/motion-fit-data.csv).
 *
 * Thresholds, both derived from the fit set, never tuned by hand:
 * - likely-blank below half the lowest score of any animal event in the fit set: every fitted
 *   animal clears it by a factor of two, the margin for scenes unlike the generator's;
 * - motion from the lowest score above which at least 95% of fit-set events hold an animal.
 */
import fs from 'node:fs';
import path from 'node:path';
import { FEATURE_NAMES, scoreEvent, type MotionModel } from '../src/kernels/score.js';
import { ALL_CATEGORIES } from './scenes/categories.js';
import { runScenes, sceneRequests } from './scenes/evaluate.js';
import { FIT_SEEDS } from './scenes/seeds.js';
import { fitLogistic } from './logistic.js';

const started = Date.now();
const events = runScenes(sceneRequests(FIT_SEEDS.first, FIT_SEEDS.perCategory, ALL_CATEGORIES));
const rows: number[][] = [];
const labels: number[] = [];
for (const e of events) {
  e.rows.forEach((r, i) => {
    rows.push(r);
    labels.push(e.labels[i]);
  });
}
const pos = labels.filter((l) => l === 1).length;
const neg = labels.length - pos;
// Balance the classes: each side carries equal total weight.
const weights = labels.map((l) => (l === 1 ? labels.length / (2 * pos) : labels.length / (2 * neg)));
const fit = fitLogistic(rows, labels, weights, 1);
const draft: MotionModel = { schema: 'movesift.motion-model/1', features: FEATURE_NAMES, ...fit, thresholds: { blank: 0, motion: 1 } };
const scored = events.map((e) => ({ e, s: scoreEvent(draft, e.analysis).score }));
const animalScores = scored.filter((x) => x.e.animal).map((x) => x.s).sort((a, b) => a - b);
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
    lambda: 1,
    metrics: Object.fromEntries(
      ALL_CATEGORIES.map((c) => {
        const xs = scored.filter((x) => x.e.category === c);
        const blanks = xs.filter((x) => x.s < blank).length;
        return [c, { events: xs.length, likelyBlank: blanks, meanScore: +(xs.reduce((a, x) => a + x.s, 0) / xs.length).toFixed(4) }];
      }),
    ),
    seconds: Math.round((Date.now() - started) / 1000),
  },
};
const root = path.resolve(path.dirname(new URL(import.meta.url).pathname), '..');
fs.mkdirSync(path.join(root, 'models'), { recursive: true });
fs.writeFileSync(path.join(root, 'models/motion-weights.json'), JSON.stringify(model, null, 2) + '\n');
const csv = ['seed,category,frames,label,' + FEATURE_NAMES.join(',')];
for (const e of events) e.rows.forEach((r, i) => csv.push([e.seed, e.category, e.frames, e.labels[i], ...r.map((v) => v.toFixed(5))].join(',')));
fs.writeFileSync(path.join(root, 'models/motion-fit-data.csv'), csv.join('\n') + '\n');
console.table(model.fit.metrics);
console.log({ blank, motion, weights: Object.fromEntries(FEATURE_NAMES.map((n, i) => [n, +fit.weights[i].toFixed(3)])) });
