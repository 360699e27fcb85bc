/**
 * The change classifier's cost per event against the motion engine's, on the same events, in
 * one run, interleaved (this machine is shared and noisy: only the ratio means anything). The
 * engine's side is screenEvent on a generated trigger with its neighbours; the classifier's is
 * what a scan adds to it: the crops of the event's strongest tracks and one onnxruntime call on
 * them (one thread, as in a scan's worker). Also the time per crop of the model alone.
 * Run: npm run bench:classifier (part of npm run bench). Aim: ratio at most 0.5.
 */
import path from 'node:path';
import { changeCrops, cropTargets } from '../src/classifier/crops.js';
import { loadClassifier } from '../src/classifier/session.js';
import { screenEvent } from '../src/kernels/screen-event.js';
import { ALL_CATEGORIES } from './scenes/categories.js';
import { renderScene } from './scenes/render.js';

const median = (v: number[]) => [...v].sort((a, b) => a - b)[v.length >> 1];
const c = await loadClassifier(path.resolve(import.meta.dirname, '../models/change-classifier.json'));
const scenes = ALL_CATEGORIES.map((category, i) => renderScene({ seed: 700_000 + i, category, width: 384, height: 288 }));
const engine: number[] = [], classifier: number[] = [], perCrop: number[] = [];
for (let round = 0; round < 3; round++) {
  for (const s of scenes) {
    let t = performance.now();
    const r = screenEvent({ frames: s.frames, neighbours: s.neighbours });
    engine.push(performance.now() - t);
    t = performance.now();
    const targets = cropTargets(r.analysis, r.score.trackScores, c.manifest.cropsPerEvent);
    const crops = changeCrops(r.analysis, targets, c.manifest.input.size);
    await c.subjectProbabilities(crops, targets.length);
    classifier.push(performance.now() - t);
    if (targets.length) {
      t = performance.now();
      await c.subjectProbabilities(crops, targets.length);
      perCrop.push((performance.now() - t) / targets.length);
    }
  }
}
await c.release();
const e = median(engine), k = median(classifier);
console.table({
  'motion engine, ms per event (median)': e.toFixed(1),
  'classifier (crops + model), ms per event (median)': k.toFixed(2),
  'model alone, ms per crop (median)': median(perCrop).toFixed(3),
  'ratio classifier / engine': (k / e).toFixed(3),
  events: engine.length,
});
