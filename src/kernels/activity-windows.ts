/**
 * Activity windows of a clip from per-frame activity scores: frames scoring at or above
 * `threshold` are active; active runs closer than `mergeGapS` merge; each window is padded by a
 * pre-roll and a post-roll (clamped to the clip) so the subject's entry and exit are inside it.
 * Each window's score is the highest frame score inside it.
 * Defaults (common practice for survey review, not from a standard): 1 s pre-roll, 2 s
 * post-roll, runs merged when under 3 s apart.
 */
import { invalidArgument } from '../shared/errors.js';
import { checkNumber } from '../shared/validate.js';

export interface ActivityWindow {
  start_s: number;
  end_s: number;
  score: number;
}

export interface WindowOptions {
  threshold: number;
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
  const end = o.durationS ?? (times.length ? times[times.length - 1] : 0);
  const runs: ActivityWindow[] = [];
  for (let i = 0; i < times.length; i++) {
    if (!(scores[i] >= o.threshold)) continue;
    const last = runs[runs.length - 1];
    if (last && times[i] - last.end_s <= gap) {
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
