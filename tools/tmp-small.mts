import { renderScene } from './scenes/render.js';
import { analyseScene } from './scenes/evaluate.js';
const cat = (process.argv[2] ?? 'animal-small') as any;
for (let i = 0; i < 12; i++) {
  const seed = 900000 + Number(process.argv[3] ?? 3) * 1000 + i;
  const scene = renderScene({ seed, category: cat, frames: i % 4 === 3 ? 1 : undefined });
  if (scene.frames.length < 3) continue;
  const ev = analyseScene(scene);
  const a = ev.analysis;
  const W = scene.width, H = scene.height, diag = Math.hypot(W, H);
  // subject centroid per frame
  const cents = scene.subjectMasks.map((m) => { let sx = 0, sy = 0, n = 0; for (let p = 0; p < m.length; p++) if (m[p]) { sx += p % W; sy += (p / W) | 0; n++; } return n ? { x: sx / n, y: sy / n, n } : null; });
  const steps = cents.slice(1).map((c, k) => c && cents[k] ? (Math.hypot(c.x - cents[k]!.x, c.y - cents[k]!.y) / diag).toFixed(2) : '-');
  const subj = a.tracks.map((t, k) => ({ t, lab: ev.labels[k] })).filter((x) => x.lab);
  console.log(seed, `${W}x${H}`, 'frames', scene.frames.length, 'area', cents.map((c) => c?.n ?? 0).join(','), 'steps', steps.join(','), 'tracks', a.tracks.length, 'subject tracks', subj.map((x) => x.t.points.map((p) => p.frame).join('.')).join(' | '));
}
