/**
 * Activity windows: the merge and padding rules on known scores, and the clip model on generated
 * validation clips (tools/scenes/clip-plans.ts, seeds the fit never saw) against their ground truth.
 */
import { describe, expect, it } from 'vitest';
import { activityWindows, clipSeedLevel, runningMedian } from '../../src/kernels/activity-windows.js';
import { createClipAnalyser } from '../../src/kernels/clip-activity.js';
import { CLIP_MODEL, MOTION_MODEL } from '../../src/kernels/model.js';
import { makeRgb } from '../../src/kernels/frame.js';
import { CLIP_VALIDATION_SEEDS, clipPlan } from '../../tools/scenes/clip-plans.js';
import { runClipPlan } from '../../tools/scenes/clip-run.js';

describe('activity windows', () => {
  it('merges close runs, pads by pre- and post-roll, clamps to the clip', () => {
    const times = Array.from({ length: 21 }, (_, i) => i);
    const scores = times.map((t) => (t === 1 || t === 3 || (t >= 10 && t <= 11) ? 0.9 : 0.1));
    expect(activityWindows(times, scores, { threshold: 0.5, preRollS: 1, postRollS: 2, mergeGapS: 3 })).toEqual([
      { start_s: 0, end_s: 5, score: 0.9 },
      { start_s: 9, end_s: 13, score: 0.9 },
    ]);
    expect(activityWindows(times, times.map(() => 0), { threshold: 0.5 })).toEqual([]);
  });
  it('rejects mismatched lengths and a bad threshold', () => {
    expect(() => activityWindows([0, 1], [0.5], { threshold: 0.5 })).toThrowError(/scores.length/);
    expect(() => activityWindows([0], [0.5], { threshold: Number.NaN })).toThrowError(/threshold: wanted number 0-1, got NaN/);
  });
  it('smooths with a centred running median when asked, dropping a one-frame flicker', () => {
    const times = Array.from({ length: 12 }, (_, i) => i);
    const scores = [0, 0, 0.9, 0, 0, 0, 0.9, 0.9, 0.9, 0.9, 0, 0];
    expect(activityWindows(times, scores, { threshold: 0.5, smoothFrames: 3, preRollS: 0, postRollS: 0, mergeGapS: 0 })).toEqual([{ start_s: 6, end_s: 9, score: 0.9 }]);
    expect(runningMedian([5, 1, 9, 3, 7], 3)).toEqual([3, 5, 3, 7, 5]); // ends use the frames that exist: median(5,1) = 3
    expect(() => activityWindows(times, scores, { threshold: 0.5, smoothFrames: 2 })).toThrowError(/smoothFrames: wanted an odd number/);
  });
  it('opens a window only on a run that reaches the seed level, and keeps all of that run', () => {
    const times = Array.from({ length: 12 }, (_, i) => i);
    const scores = [0.9, 0.9, 0, 0, 0.9, 0.99, 0.9, 0.9, 0, 0, 0, 0];
    const o = { threshold: 0.5, preRollS: 0, postRollS: 0, mergeGapS: 0 };
    expect(activityWindows(times, scores, { ...o, seed: 0.95 })).toEqual([{ start_s: 4, end_s: 7, score: 0.99 }]);
    expect(activityWindows(times, scores, o)).toEqual([{ start_s: 0, end_s: 1, score: 0.9 }, { start_s: 4, end_s: 7, score: 0.99 }]);
    expect(() => activityWindows(times, scores, { ...o, seed: 0.4 })).toThrowError(/seed: wanted number 0.5-1/);
  });

  // A clip's own level (clipSeedLevel) on constructed score series: what the place does all the
  // time does not open windows, a visitor does, a clip full of visitors keeps all of them, and a
  // calm clip is left at the fitted threshold.
  const sig = (z: number) => 1 / (1 + Math.exp(-z));
  const wave = (n: number, centre: number, width: number) => Array.from({ length: n }, (_, i) => sig(centre + width * Math.sin(i * 1.7)));
  it('a place active all the time sets the level above its own activity, below a visitor', () => {
    const scores = [...wave(120, 1.5, 0.8), ...wave(20, 7, 0.3), ...wave(120, 1.5, 0.8)];
    const seed = clipSeedLevel(runningMedian(scores, 3), 0.786);
    expect(seed).toBeGreaterThan(sig(2.3));
    expect(seed).toBeLessThan(sig(6.7));
    const times = scores.map((_, i) => i / 4);
    const w = activityWindows(times, scores, { threshold: 0.786, smoothFrames: 3, seed });
    expect(w).toHaveLength(1);
    expect(w[0].start_s).toBeLessThanOrEqual(30);
    expect(w[0].end_s).toBeGreaterThanOrEqual(34.75);
  });
  it('a clip with a visitor most of the time keeps every visiting frame', () => {
    const scores = [...wave(30, 1.5, 0.8), ...wave(200, 5, 1.5), ...wave(30, 1.5, 0.8)];
    const times = scores.map((_, i) => i / 4);
    const w = activityWindows(times, scores, { threshold: 0.786, smoothFrames: 3, seed: clipSeedLevel(runningMedian(scores, 3), 0.786) });
    for (let i = 31; i < 229; i++) expect(w.some((x) => times[i] >= x.start_s && times[i] <= x.end_s), `frame ${i}`).toBe(true);
  });
  it('a calm clip, or too few frames to judge, keeps the fitted threshold', () => {
    const calm = [...new Array(200).fill(0), ...wave(30, 3, 0.5)];
    expect(clipSeedLevel(calm, 0.786)).toBe(0.786);
    expect(clipSeedLevel(wave(30, 2, 1), 0.786)).toBe(0.786);
  });

  it('on validation clips (seeds never fitted) the windows hold the fish and drop most of the water', async () => {
    const rows: Array<Record<string, unknown>> = [];
    let present = 0, covered = 0, absent = 0, kept = 0;
    for (let i = 0; i < CLIP_VALIDATION_SEEDS.count; i++) {
      const plan = clipPlan(CLIP_VALIDATION_SEEDS.first + i);
      const r = await runClipPlan(plan, CLIP_MODEL);
      const times = r.frames.map((f) => f.t);
      const scores = r.frames.map((f) => f.score);
      const seed = clipSeedLevel(runningMedian(scores, CLIP_MODEL.window.smoothFrames), CLIP_MODEL.thresholds.blank); // as the scan does (analyse-task.ts)
      const windows = activityWindows(times, scores, { threshold: CLIP_MODEL.thresholds.blank, durationS: plan.duration, ...CLIP_MODEL.window, seed });
      const inside = (t: number) => windows.some((w) => t >= w.start_s && t <= w.end_s);
      const p = r.frames.filter((f) => f.present), a = r.frames.filter((f) => !f.present);
      present += p.length;
      covered += p.filter((f) => inside(f.t)).length;
      absent += a.length;
      kept += a.filter((f) => inside(f.t)).length;
      rows.push({ seed: plan.seed, size: `${plan.width}x${plan.height}`, fps: plan.fps, nuisance: plan.nuisance ?? 'mild', jpeg: plan.jpegQuality ?? 'raw', visits: plan.visits.length, windows: windows.length, 'fish frames covered': p.length ? +(p.filter((f) => inside(f.t)).length / p.length).toFixed(2) : '-', 'water kept': +(a.filter((f) => inside(f.t)).length / a.length).toFixed(2) });
    }
    console.table(rows);
    console.log(`fish frames covered ${covered}/${present}; water frames kept ${kept}/${absent}`);
    expect(covered / present).toBeGreaterThanOrEqual(0.95);
    // The fit's out-of-fold figure is about 0.14 (models/clip-weights.json); the burst model at
    // its own blank threshold kept about 0.71 of the water.
    expect(kept / absent).toBeLessThan(0.35);
  }, 240_000);
  it('rejects time going backwards', () => {
    const a = createClipAnalyser({ model: MOTION_MODEL });
    a.push(makeRgb(8, 8), 1);
    expect(() => a.push(makeRgb(8, 8), 0.5)).toThrowError(/t: wanted finite time >= 1/);
  });
});
