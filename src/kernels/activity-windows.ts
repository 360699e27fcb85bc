/**
 * Activity windows of a clip from per-frame activity scores: frames scoring at or above
 * `threshold` are active; active runs closer than `mergeGapS` merge; each window is padded by a
 * pre-roll and a post-roll (clamped to the clip) so the subject's entry and exit are inside it.
 * Each window's score is the highest frame score inside it.
 * Defaults (common practice for survey review, not from a standard): 1 s pre-roll, 2 s
 * post-roll, runs merged when under 3 s apart.
 */
import { invalidArgument } from '../shared/errors.js';
import { checkInteger, checkNumber } from '../shared/validate.js';

export interface ActivityWindow {
  start_s: number;
  end_s: number;
  score: number;
}

export interface WindowOptions {
  threshold: number;
  /** Odd number of frames in a centred running median applied to the scores before the
   *  threshold: 1 leaves them as they are; 3 or 5 drop one- or two-frame flickers (caustics,
   *  a passing particle) that a subject in view does not produce. */
  smoothFrames?: number;
  preRollS?: number;
  postRollS?: number;
  mergeGapS?: number;
  durationS?: number;
  /** A run of active frames becomes a window only if some frame of it reaches this level (at
   *  least `threshold`; see clipSeedLevel). Absent, every run does. */
  seed?: number;
}

export function activityWindows(times: readonly number[], scores: readonly number[], o: WindowOptions): ActivityWindow[] {
  if (times.length !== scores.length) throw invalidArgument('scores.length', `${times.length} (one per time)`, scores.length);
  checkNumber('threshold', o.threshold, 0, 1);
  const pre = checkNumber('preRollS', o.preRollS ?? 1, 0, 3600);
  const post = checkNumber('postRollS', o.postRollS ?? 2, 0, 3600);
  const gap = checkNumber('mergeGapS', o.mergeGapS ?? 3, 0, 3600);
  const k = checkInteger('smoothFrames', o.smoothFrames ?? 1, 1, 61);
  if (k % 2 === 0) throw invalidArgument('smoothFrames', 'an odd number of frames', k);
  const end = o.durationS ?? (times.length ? times[times.length - 1] : 0);
  const level = k === 1 ? scores : runningMedian(scores, k);
  const seeded = seededRuns(level, o.threshold, checkNumber('seed', o.seed ?? o.threshold, o.threshold, 1));
  const runs: ActivityWindow[] = [];
  for (let i = 0; i < times.length; i++) {
    if (!seeded[i]) continue;
    const last = runs[runs.length - 1];
    // Consecutive active frames are one run whatever the gap setting; runs with inactive frames
    // between them merge when closer than the gap.
    const continues = i > 0 && seeded[i - 1] === 1;
    if (last && (continues || times[i] - last.end_s <= gap)) {
      last.end_s = times[i];
      last.score = Math.max(last.score, scores[i]);
    } else runs.push({ start_s: times[i], end_s: times[i], score: scores[i] });
  }
  const padded = runs.map((r) => ({ start_s: Math.max(0, r.start_s - pre), end_s: Math.min(end, r.end_s + post), score: r.score }));
  // Padding can make neighbours overlap: merge again.
  const out: ActivityWindow[] = [];
  for (const w of padded) {
    const last = out[out.length - 1];
    if (last && w.start_s <= last.end_s) {
      last.end_s = Math.max(last.end_s, w.end_s);
      last.score = Math.max(last.score, w.score);
    } else out.push({ ...w });
  }
  return out;
}

/** 1 for frames of runs at or above `threshold` that reach `seed` somewhere (hysteresis in time). */
function seededRuns(level: readonly number[], threshold: number, seed: number): Uint8Array {
  const out = new Uint8Array(level.length);
  for (let i = 0; i < level.length; ) {
    if (!(level[i] >= threshold)) {
      i++;
      continue;
    }
    let j = i;
    let reached = false;
    for (; j < level.length && level[j] >= threshold; j++) if (level[j] >= seed) reached = true;
    if (reached) out.fill(1, i, j);
    i = j;
  }
  return out;
}

/**
 * The level a clip's own activity must reach to open a window, from the clip itself: what one
 * place's water does all the time (caustics, particles, swaying weed, a tree in wind) is the
 * clip's typical level, and a subject stands out from it. `level` is the series the windows are
 * judged on (the scores after the running median of `smoothFrames`). Over the frames with a
 * counted track, in logits: the median plus `spread` times the distance from the tenth percentile to the median
 * (a robust width of the lower side, which visitors do not reach). Never below `threshold`, never
 * above the 95th percentile of those frames (so the clip's strongest twentieth always can seed:
 * in a clip with a subject most of the time, its runs hold those frames); and `threshold` itself
 * when fewer than `minActiveShare` of the frames have a track at all (then activity is rare,
 * not the place's habit) or there are fewer than `minFrames` of them to judge by.
 * Spread 2 and the shares are our choices (on generated clips of the fitted family; the held-out
 * family and a real clip were judged after, docs/ has the numbers).
 */
export function clipSeedLevel(level: readonly number[], threshold: number, spread = 2, minActiveShare = 0.4, minFrames = 40): number {
  checkNumber('threshold', threshold, 0, 1);
  const logit = (v: number): number => {
    const p = Math.min(1 - 1e-6, Math.max(1e-6, v));
    return Math.log(p / (1 - p));
  };
  const active = level.filter((v) => v > 0).map(logit).sort((a, b) => a - b);
  if (active.length < minFrames || active.length < minActiveShare * level.length) return threshold;
  const q = (f: number): number => active[Math.min(active.length - 1, Math.floor(f * active.length))];
  const fence = Math.min(q(0.5) + spread * (q(0.5) - q(0.1)), q(0.95));
  return Math.max(threshold, 1 / (1 + Math.exp(-fence)));
}

/** Centred running median of odd width k; the ends use the frames that exist. */
export function runningMedian(v: readonly number[], k: number): number[] {
  const h = k >> 1;
  const out = new Array<number>(v.length);
  const win: number[] = [];
  for (let i = 0; i < v.length; i++) {
    win.length = 0;
    for (let j = Math.max(0, i - h); j <= Math.min(v.length - 1, i + h); j++) win.push(v[j]);
    win.sort((a, b) => a - b);
    const m = win.length >> 1;
    out[i] = win.length % 2 ? win[m] : (win[m - 1] + win[m]) / 2;
  }
  return out;
}
