/**
 * The engine's one entry for a clip: frames pushed as they are decoded, then `finish` gives the
 * verdict, the activity windows and the moments that show them. Pure and streaming: it holds
 * only per-frame scores and, per stretch of the clip, the one strongest frame; the caller
 * decodes, writes previews and stores the result (pipeline/analyse-task.ts).
 *
 * It owns every rule a clip's verdict rests on: the frame scores (clip-activity.ts), the seed
 * level the clip's own place sets (activity-windows.ts clipSeedLevel), the windows, and the
 * guards that keep a clip for a person to look at: one frame alone at the motion level, or a
 * clip not screened whole (decoding stopped early, or frames ending well before the duration
 * the file declares), is never likely-blank.
 */
import { activityWindows, clipSeedLevel, runningMedian, type ActivityWindow } from './activity-windows.js';
import { createClipAnalyser } from './clip-activity.js';
import type { Blob } from './components.js';
import type { RgbFrame } from './frame.js';
import { CLIP_MODEL, type ClipModel } from './model.js';
import { verdictFor, type VerdictName } from './score.js';

export interface ClipMoment {
  t: number;
  score: number;
  frame: RgbFrame;
  blobs: Blob[];
}

export interface ClipScreening {
  score: number;
  verdict: VerdictName;
  windows: ActivityWindow[];
  /** Per window (at most `maxWindows`), its strongest moment, when one was kept. */
  windowMoments: Array<ClipMoment | undefined>;
  /** The strongest moment of the whole clip above the blank threshold. */
  top?: ClipMoment;
  /** Why the clip was not screened whole, in words, when it was not. */
  incomplete?: { kind: 'stopped' | 'short'; endS: number };
  times: number[];
  scores: number[];
  rawPeak: number;
  seed: number;
}

export interface ClipScreener {
  push(frame: RgbFrame, t: number): void;
  /** `stopped`: decoding ended early with a problem; `durationS`: what the container declares. */
  finish(o: { stopped?: boolean; durationS?: number; fps: number; maxWindows?: number }): ClipScreening;
}

/** Strongest moments are kept one per stretch of this many seconds (what a preview can show). */
const MOMENT_BUCKET_S = 5;

export function createClipScreener(model: ClipModel = CLIP_MODEL): ClipScreener {
  const analyser = createClipAnalyser({ model });
  const times: number[] = [];
  const scores: number[] = [];
  const moments = new Map<number, ClipMoment>();
  return {
    push(frame, t) {
      const r = analyser.push(frame, t);
      times.push(t);
      scores.push(r.score);
      if (r.score >= model.thresholds.blank) {
        const b = Math.floor(t / MOMENT_BUCKET_S);
        const c = moments.get(b);
        if (!c || r.score > c.score) moments.set(b, { t, score: r.score, frame, blobs: r.blobs });
      }
    },
    finish(o) {
      const end = times[times.length - 1] ?? 0;
      let incomplete: ClipScreening['incomplete'];
      if (o.stopped) incomplete = { kind: 'stopped', endS: end };
      // Short of the declared end by more than a second and two analysed frames (the last frame
      // sits up to one frame interval before the end): the file holds less than it says.
      else if (o.durationS && end < o.durationS - Math.max(1, 2 / o.fps)) incomplete = { kind: 'short', endS: end };
      // The level the windows are built from (activityWindows smooths the same way). A window
      // opens only where it rises above what this clip's place does all the time; it then spans
      // every frame above the fitted threshold around that point.
      const level = runningMedian(scores, model.window.smoothFrames);
      const seed = clipSeedLevel(level, model.thresholds.blank);
      const windows = activityWindows(times, scores, { threshold: model.thresholds.blank, durationS: end, ...model.window, seed });
      // The clip's score is the highest level its windows are built from (the smoothed frame
      // scores), so a clip with a window is never likely-blank. A clip whose activity reached
      // the threshold but never its own seed level has no window and is unsure, not blank: a
      // person looks at it whole. One frame that alone reached the motion level still makes it
      // unsure: a missed fish costs more than a look.
      const score = level.reduce((m, v) => Math.max(m, v), 0);
      const rawPeak = scores.reduce((m, v) => Math.max(m, v), 0);
      let verdict = verdictFor(model, score);
      if (verdict === 'likely-blank' && rawPeak >= model.thresholds.motion) verdict = 'unsure';
      // A clip screened only in part was not seen whole: what was not decoded may hold the fish.
      if (verdict === 'likely-blank' && incomplete) verdict = 'unsure';
      const windowMoments = windows.slice(0, o.maxWindows ?? 12).map((w) => {
        let best: ClipMoment | undefined;
        for (const c of moments.values()) if (c.t >= w.start_s && c.t <= w.end_s && (!best || c.score > best.score)) best = c;
        return best;
      });
      const top = [...moments.values()].sort((x, y) => y.score - x.score)[0];
      return { score, verdict, windows, windowMoments, top, incomplete, times, scores, rawPeak, seed };
    },
  };
}
