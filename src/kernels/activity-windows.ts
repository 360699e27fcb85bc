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
  const runs: ActivityWindow[] = [];
  for (let i = 0; i < times.length; i++) {
    if (!(level[i] >= o.threshold)) continue;
    const last = runs[runs.length - 1];
    // Consecutive active frames are one run whatever the gap setting; runs with inactive frames
    // between them merge when closer than the gap.
    const continues = i > 0 && level[i - 1] >= o.threshold;
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
