/**
 * Without a background from other triggers, a burst's frames show only what moved between them:
 * an animal that stood still is in their median and cannot show. Such an event is never called
 * likely-blank (EventContext.noBackground).
 *
 * Real data: the two consecutive-frame pairs of ../shared/fixtures/flow-pairs (OpenCV's sample
 * data; RubberWhale from the Middlebury optical-flow benchmark; see SOURCES.md). Both hold real
 * motion (two people and a ball; toys moving a few pixels). Without neighbours the model of the
 * morning of 2026-12-03 scored them 0.07 and 0.12, below its threshold (a person moving 3 px
 * between frames is, locally, a shift of the scene, which is what the scene-explained share
 * looks for); the refitted one scores them just above its own (0.34 and 0.35 against 0.32).
 * Generated: the animals that move least (lingering, partly in frame, a hovering fish) in two-
 * and four-frame bursts of validation seeds past the screening test's, with and without the
 * neighbouring triggers the generator renders for them.
 */
import { describe, expect, it } from 'vitest';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent, scoreEventRows, Verdict } from '../../src/kernels/score.js';
import { Category, type CategoryName } from '../../tools/scenes/categories.js';
import { analyseScene } from '../../tools/scenes/evaluate.js';
import { renderScene } from '../../tools/scenes/render.js';
import { VALIDATION_SEEDS } from '../../tools/scenes/seeds.js';
import { readRgb } from '../helpers/fixtures.js';

describe('events without a background from other triggers', () => {
  it.each([
    ['flow-pairs/basketball1.png', 'flow-pairs/basketball2.png'],
    ['flow-pairs/rubberwhale1.png', 'flow-pairs/rubberwhale2.png'],
  ])('a real pair with real motion (%s) is not called likely-blank', async (a, b) => {
    const frames = [await readRgb(a, 320), await readRgb(b, 320)];
    const analysis = analyseEvent({ frames });
    const s = scoreEvent(MOTION_MODEL, analysis);
    console.log(`${a}: score ${s.score.toFixed(3)} (blank threshold ${MOTION_MODEL.thresholds.blank.toFixed(3)}), verdict ${s.verdict}`);
    expect(analysis.context.noBackground).toBe(true);
    expect(analysis.tracks.length).toBeGreaterThan(0);
    expect(s.verdict).not.toBe(Verdict.likelyBlank);
  });

  it('the least-moving animals in two- and four-frame bursts are never likely-blank without neighbours, and get a background with them', () => {
    const categories: CategoryName[] = [Category.animalLingering, Category.animalPartial, Category.fishHovering];
    let withBackground = 0;
    let scenes = 0;
    let belowThreshold = 0;
    for (const [ci, category] of categories.entries()) {
      for (const frames of [2, 4]) {
        for (let i = 0; i < 3; i++) {
          const scene = renderScene({ seed: VALIDATION_SEEDS.first + 500 + ci * 10 + i, category, frames });
          const alone = analyseScene({ ...scene, neighbours: [] });
          expect(alone.analysis.context.noBackground).toBe(true);
          const s = scoreEvent(MOTION_MODEL, alone.analysis);
          expect(s.verdict).not.toBe(Verdict.likelyBlank);
          if (s.score < MOTION_MODEL.thresholds.blank) belowThreshold++;
          const full = analyseScene(scene);
          scenes++;
          if (!full.analysis.context.noBackground) withBackground++;
        }
      }
    }
    // Neighbours of the same camera and light give a background to (nearly) every burst.
    expect(withBackground).toBeGreaterThanOrEqual(scenes - 1);
    // What the rule keeps (with the model of 2026-12-03: 2 of 18; with the one before: 7).
    console.log(`${belowThreshold} of ${scenes} animals without neighbours score below the blank threshold`);
  }, 120_000);

  it('the rule moves only likely-blank to unsure: a low score stays unsure, a high one stays motion', () => {
    const { lo, hi } = MOTION_MODEL.range;
    // The lower and upper ends of every feature's fitted range: a faint, shapeless track scores
    // near 0; a strong, persistent one near 1 (checked, not assumed).
    const faint = lo.map((v, j) => (j === 2 ? 0.1 : v));
    const strong = hi.map((v, j) => (j === 5 ? lo[j] : v));
    const low = scoreEventRows(MOTION_MODEL, [faint], {});
    expect(low.verdict).toBe(Verdict.likelyBlank);
    expect(scoreEventRows(MOTION_MODEL, [faint], { noBackground: true }).verdict).toBe(Verdict.unsure);
    const high = scoreEventRows(MOTION_MODEL, [strong], {});
    expect(high.verdict).toBe(Verdict.motion);
    expect(scoreEventRows(MOTION_MODEL, [strong], { noBackground: true }).verdict).toBe(Verdict.motion);
    // No track at all: score 0, unsure without a background.
    expect(scoreEventRows(MOTION_MODEL, [], { noBackground: true }).verdict).toBe(Verdict.unsure);
  });
});
