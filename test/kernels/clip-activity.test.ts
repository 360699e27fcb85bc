/**
 * Activity windows: the merge and padding rules on known scores, and the clip model on generated
 * validation clips (tools/scenes/clip-plans.ts, seeds the fit never saw) against their ground truth.
 */
import { describe, expect, it } from 'vitest';
import { activityWindows, runningMedian } from '../../src/kernels/activity-windows.js';
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
  it('on validation clips (seeds never fitted) the windows hold the fish and drop most of the water', async () => {
    const rows: Array<Record<string, unknown>> = [];
    let present = 0, covered = 0, absent = 0, kept = 0;
    for (let i = 0; i < CLIP_VALIDATION_SEEDS.count; i++) {
      const plan = clipPlan(CLIP_VALIDATION_SEEDS.first + i);
      const r = await runClipPlan(plan, CLIP_MODEL);
      const times = r.frames.map((f) => f.t);
      const windows = activityWindows(times, r.frames.map((f) => f.score), { threshold: CLIP_MODEL.thresholds.blank, durationS: plan.duration, ...CLIP_MODEL.window });
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
