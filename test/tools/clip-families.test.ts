/**
 * The clip families the screener is validated on (tools/scenes/clip-families.ts) lie where the
 * issue says: the held-out one outside every range the fitted clips hold; and the clip judge
 * (tools/clip-truth.ts) counts found spans and kept time as stated, on a constructed report.
 */
import { describe, expect, it } from 'vitest';
import { clipFamilyPlan } from '../../tools/scenes/clip-families.js';
import { clipPlan } from '../../tools/scenes/clip-plans.js';
import { judgeClips } from '../../tools/clip-truth.js';
import type { Report } from '../../src/pipeline/report.js';

describe('clip families', () => {
  it('the fitted family is the fitted plan; the held-out one lies outside its ranges', () => {
    // The files are H.264, so the fitted plan's JPEG round trip is not carried over.
    const { jpegQuality: _, ...fitted } = clipPlan(950_003);
    expect(clipFamilyPlan('home-water', 950_003)).toEqual({ ...fitted, family: 'home-water', id: 'home-water-950003' });
    for (let s = 0; s < 40; s++) {
      const p = clipFamilyPlan('other-water', 960_000 + s);
      expect(p.width).toBeGreaterThanOrEqual(480); // fitted: 160-320
      expect(p.fps).toBeGreaterThanOrEqual(8); // fitted: 2-6
      expect(p.nuisance).toBeDefined();
      expect(p.distractor).toBeDefined();
      expect(p.distractor).not.toBe(p.nuisance);
      expect(p.style?.water?.turbidity).toBeGreaterThan(0);
      expect(p.visits.length).toBeGreaterThan(0);
      for (const v of p.visits) expect(v.end_s).toBeLessThanOrEqual(p.duration);
    }
  });

  it('the judge finds a span by any overlapping window and counts kept time as a union', () => {
    const ev = (file: string, windows: Array<[number, number]>) => ({ id: file, kind: 'clip', deployment: 'd', files: [file], start: '', end: '', verdict: 'motion', score: 1, windows: windows.map(([a, b]) => ({ start_s: a, end_s: b, score: 1 })), decision: null });
    const report = { schema: 'movesift.report/1', events: [ev('a.mp4', [[0, 10], [5, 15], [40, 50]]), ev('b.mp4', [])], errors: [] } as unknown as Report;
    const truth = [
      { family: 'f', file: 'a.mp4', durationS: 100, subject: [{ start_s: 12, end_s: 20 }, { start_s: 60, end_s: 70 }], source: 'test' },
      { family: 'f', file: 'b.mp4', durationS: 50, subject: [], source: 'test' },
    ];
    const [r] = judgeClips([{ family: 'f', report }], truth);
    expect(r).toMatchObject({ clips: 2, spans: 2, spansFound: 1, durationS: 150, subjectS: 18, keptS: 25 });
    expect(r.missed).toEqual(['a.mp4 60.0-70.0 s']);
  });
});
