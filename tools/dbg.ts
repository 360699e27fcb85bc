import fs from 'node:fs';
import { scoreEvent } from '../src/kernels/score.js';
import { ALL_CATEGORIES } from './scenes/categories.js';
import { runScenes, sceneRequests } from './scenes/evaluate.js';
const model = JSON.parse(fs.readFileSync('models/motion-weights.json', 'utf8'));
const evs = runScenes(sceneRequests(100_000, 8, ALL_CATEGORIES.filter((c) => c.startsWith('animal') || c.startsWith('fish'))));
const rows = evs.map((e) => ({ seed: e.seed, cat: e.category, n: e.frames, animal: e.animal, tracks: e.analysis.tracks.length, pos: e.labels.filter((l) => l).length, score: +scoreEvent(model, e.analysis).score.toFixed(3), sig: e.analysis.frames[0].sigma.toFixed(1) }));
rows.sort((a, b) => a.score - b.score);
console.table(rows.slice(0, 15));
