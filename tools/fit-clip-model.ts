/**
 * Fits the clip model: the track-feature logistic model refitted on generated survey clips (the
 * streaming chain sees a running background and a sliding window of frames, not a burst), and
 * the activity-window settings chosen from out-of-fold scores. Run: npm run fit:clips (writes
 * models/clip-weights.json and models/clip-fit-data.csv). Renders in one process per core.
 *
 * Window settings, derived from the fit clips, never tuned by hand: for each running-median
 * width (1, 3, 5, 7 frames) and each threshold on a grid, windows are built exactly as a scan
 * builds them (1 s pre-roll, 2 s post-roll, runs merged under 3 s apart); the setting kept is
 * the one that drops the most subject-free frames while its windows still hold at least 99% of
 * the frames with a subject in view, scored out of fold (two folds by seed parity).
 */
import fs from 'node:fs';
import path from 'node:path';
import { activityWindows } from '../src/kernels/activity-windows.js';
import { MOTION_MODEL } from '../src/kernels/model.js';
import { expandFeatures, FEATURE_NAMES, trackScore, type MotionModel } from '../src/kernels/score.js';
import { fitLogistic, PENALTIES } from '../src/shared/stats/logistic.js';
import { inParts } from './parts.js';
import { CLIP_FIT_SEEDS, clipPlan } from './scenes/clip-plans.js';
import { runClipPlan, type ClipRecord } from './scenes/clip-run.js';

const ROOT = path.resolve(import.meta.dirname, '..');
const COVER = 0.99;
const ROLL = { preRollS: 1, postRollS: 2, mergeGapS: 3 };
const seeds = Array.from({ length: CLIP_FIT_SEEDS.count }, (_, i) => CLIP_FIT_SEEDS.first + i);

const started = Date.now();
const clips = await inParts<ClipRecord>(import.meta.filename, async (i, n) => {
  const out: ClipRecord[] = [];
  for (const s of seeds.filter((_, k) => k % n === i)) out.push(await runClipPlan(clipPlan(s), MOTION_MODEL));
  return out;
});
clips.sort((a, b) => a.seed - b.seed);

const lo = FEATURE_NAMES.map(() => Infinity);
const hi = FEATURE_NAMES.map(() => -Infinity);
for (const c of clips) for (const f of c.frames) for (const r of f.rows) r.forEach((v, j) => ((lo[j] = Math.min(lo[j], v)), (hi[j] = Math.max(hi[j], v))));
const range = { lo, hi };
const clip = (r: number[]) => r.map((v, j) => Math.min(hi[j], Math.max(lo[j], v)));

function fit(subset: ClipRecord[], lambda: number): MotionModel {
  const rows: number[][] = [];
  const labels: number[] = [];
  for (const c of subset) for (const f of c.frames) f.rows.forEach((r, i) => (rows.push(expandFeatures(clip(r))), labels.push(f.labels[i])));
  const pos = labels.filter((l) => l === 1).length;
  const w = labels.map((l) => (l === 1 ? labels.length / (2 * pos) : labels.length / (2 * (labels.length - pos))));
  return { schema: 'movesift.motion-model/1', features: FEATURE_NAMES, ...fitLogistic(rows, labels, w, lambda), thresholds: { blank: 0, motion: 1 }, range };
}
const frameScores = (m: MotionModel, c: ClipRecord) => c.frames.map((f) => f.rows.reduce((s, r) => Math.max(s, trackScore(m, r)), 0));

function judge(k: number, threshold: number, scores: (c: ClipRecord) => number[]) {
  let present = 0, covered = 0, absent = 0, kept = 0;
  for (const c of clips) {
    const times = c.frames.map((f) => f.t);
    const ws = activityWindows(times, scores(c), { threshold, smoothFrames: k, durationS: c.durationS, ...ROLL });
    c.frames.forEach((f) => {
      const inside = ws.some((w) => f.t >= w.start_s && f.t <= w.end_s);
      if (f.present) (present++, inside && covered++);
      else (absent++, inside && kept++);
    });
  }
  return { coverage: covered / Math.max(1, present), waterKept: kept / Math.max(1, absent) };
}

// Log-spaced from 0.001 to 0.99: the useful thresholds of a logistic score crowd near both ends.
const grid = Array.from({ length: 61 }, (_, i) => +(10 ** (-3 + (3 * i) / 60) * 0.99).toPrecision(3));
/** Out-of-fold frame scores at one penalty and the best window setting they allow. */
function candidate(lambda: number) {
  const oof = new Map<number, number[]>();
  for (const fold of [0, 1]) {
    const m = fit(clips.filter((c) => c.seed % 2 !== fold), lambda);
    for (const c of clips) if (c.seed % 2 === fold) oof.set(c.seed, frameScores(m, c));
  }
  let best = { k: 1, threshold: 0.01, coverage: 0, waterKept: 1 };
  for (const k of [1, 3, 5, 7]) {
    for (const threshold of grid) {
      const r = judge(k, threshold, (c) => oof.get(c.seed)!);
      if (r.coverage >= COVER && r.waterKept < best.waterKept) best = { k, threshold, ...r };
    }
  }
  console.log(`lambda ${lambda}: out of fold ${best.waterKept.toFixed(4)} of subject-free frames kept at coverage ${best.coverage.toFixed(4)}`);
  return { lambda, oof, best };
}
// The penalty is chosen like the burst model's (tools/fit-weights.ts): the candidate whose
// out-of-fold windows keep the least water wins, ties to the stronger penalty.
const candidates = PENALTIES.map(candidate);
const chosen = candidates.reduce((b, c) => (c.best.waterKept <= b.best.waterKept ? c : b));
const LAMBDA = chosen.lambda;
const { oof, best } = chosen;
const full = fit(clips, LAMBDA);
// Motion: the lowest frame score above which at least 95% of fit frames show the subject.
const pairs = clips.flatMap((c) => frameScores(full, c).map((s, i) => ({ s, p: c.frames[i].present }))).sort((a, b) => b.s - a.s);
let motion = 1;
let with_ = 0;
pairs.forEach((x, i) => {
  if (x.p) with_++;
  if (with_ / (i + 1) >= 0.95) motion = Math.min(motion, x.s);
});
const inSample = judge(best.k, best.threshold, (c) => frameScores(full, c));
const model = {
  ...full,
  schema: 'movesift.clip-model/1',
  thresholds: { blank: best.threshold, motion: Math.max(motion, best.threshold) },
  window: { smoothFrames: best.k, ...ROLL },
  fit: {
    script: 'tools/fit-clip-model.ts',
    data: 'models/clip-fit-data.csv',
    seeds: CLIP_FIT_SEEDS,
    clips: clips.length,
    frames: clips.reduce((a, c) => a + c.frames.length, 0),
    framesWithSubject: clips.reduce((a, c) => a + c.frames.filter((f) => f.present).length, 0),
    tracks: clips.reduce((a, c) => a + c.frames.reduce((q, f) => q + f.rows.length, 0), 0),
    lambda: LAMBDA,
    lambdaChoice: candidates.map((c) => ({ lambda: c.lambda, waterKeptOutOfFold: +c.best.waterKept.toFixed(4), coverageOutOfFold: +c.best.coverage.toFixed(4) })),
    coverageTarget: COVER,
    outOfFold: { coverage: +best.coverage.toFixed(4), waterKept: +best.waterKept.toFixed(4) },
    inSample: { coverage: +inSample.coverage.toFixed(4), waterKept: +inSample.waterKept.toFixed(4) },
    burstModelAtItsBlankThreshold: judge(1, MOTION_MODEL.thresholds.blank, (c) => c.frames.map((f) => f.score)),
    seconds: Math.round((Date.now() - started) / 1000),
  },
};
fs.writeFileSync(path.join(ROOT, 'models/clip-weights.json'), JSON.stringify(model, null, 2) + '\n');
// One row per frame (the track rows number in the hundreds of thousands; the seeds reproduce them).
const csv = ['seed,t,present,tracks,subject_tracks,out_of_fold_score,score'];
for (const c of clips) {
  const mine = frameScores(full, c);
  c.frames.forEach((f, i) => csv.push([c.seed, f.t.toFixed(3), f.present ? 1 : 0, f.rows.length, f.labels.filter((l) => l === 1).length, oof.get(c.seed)![i].toFixed(5), mine[i].toFixed(5)].join(',')));
}
fs.writeFileSync(path.join(ROOT, 'models/clip-fit-data.csv'), csv.join('\n') + '\n');
console.log(JSON.stringify({ thresholds: model.thresholds, window: model.window, ...model.fit }, null, 1));
