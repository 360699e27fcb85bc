/**
 * A fingerprint of the engine's results, for speed work that must not change them: analyses
 * 57 generated scenes (three seeds of every category, a quarter of them single images, sizes
 * as the generator draws them) as a scan does, and computes the flow of four frame pairs at
 * odd and even sizes with the default and a 7-tap setting; prints one SHA-1 over the event
 * analyses and one over the flows. The same hashes before and after a change mean the same
 * results, bit for bit. Takes about 40 s.
 * Run: npx tsx tools/analysis-hash.ts   (V=1 also prints each scene's own hash)
 */
import { createHash } from 'node:crypto';
import { farnebackFlow, DEFAULT_FLOW } from '../src/kernels/flow/farneback.js';
import { toLuma } from '../src/kernels/luma.js';
import { ALL_CATEGORIES, Category } from './scenes/categories.js';
import { analyseScene, sceneRequests } from './scenes/evaluate.js';
import { renderScene } from './scenes/render.js';

const events = createHash('sha1');
for (const r of sceneRequests(555000, 3, ALL_CATEGORIES)) {
  const { analysis } = analyseScene(renderScene(r));
  // Typed arrays by their bytes (JSON would write them as objects of indices).
  const json = JSON.stringify(analysis, (_, v) => (ArrayBuffer.isView(v) ? Buffer.from(v.buffer, v.byteOffset, v.byteLength).toString('base64') : v));
  events.update(json);
  if (process.env.V) console.log(r.seed, r.category, createHash('sha1').update(json).digest('hex').slice(0, 12));
}
const flows = createHash('sha1');
const sizes: Array<[number, number]> = [[320, 180], [97, 61], [256, 144], [200, 150]];
const kinds = [Category.animalCrossing, Category.wind, Category.fishCrossing, Category.shake];
sizes.forEach(([width, height], i) => {
  const s = renderScene({ seed: 300 + i, category: kinds[i], width, height, frames: 2 });
  const [a, b] = s.frames.map(toLuma);
  for (const p of [DEFAULT_FLOW, { pyrScale: 0.6, levels: 2, winSize: 9, iterations: 2, polyN: 7, polySigma: 1.5 }]) {
    const f = farnebackFlow(a, b, p).data;
    flows.update(Buffer.from(f.buffer, f.byteOffset, f.byteLength));
  }
});
console.log(`event analyses ${events.digest('hex')}`);
console.log(`flows          ${flows.digest('hex')}`);
