/**
 * Screening behaviour on the validation seeds (never seen by the weight fit), land cameras (day and
 * night) and underwater, each printed as a table of verdicts per category.
 *
 * Scenes are analysed as a scan analyses them (tools/scenes/evaluate.ts): the event's frames and
 * the middle frames of four neighbouring triggers, which are not clean (their own exposure and
 * shading, sometimes a visitor, a lingering animal still there), from which the engine builds a
 * deployment background. Until 2026-12-02 this test first gave bursts a clean background the
 * product never has (0.84 claimed, 0.785 as a scan computed it), then none (0.48).
 *
 * The engine's promise, asserted: animal recall (events not likely-blank) at least 0.99 in each
 * habitat and over both, and the bar: at least 80% of false triggers called
 * likely-blank. Measured with models/motion-weights.json (fitted 2026-12-03: five folds, 2015
 * animals, L2 penalty 100 chosen by the fit; thresholds from out-of-fold records, 99% recall
 * with 95% confidence; no blank without a background; under moving light, a blank only below
 * 0.028): recall 84/84, likely-blank 118/144 = 0.819 (land 81/96, water 37/48; 124/144 before
 * the moving-light rule). On the next 24 validation seeds per category (`npm run
 * validate:wide`) 238/288 = 0.826 (land 0.870, water 0.740). What is left is mostly particles
 * (5 of 24 there: many small things drifting, each like a small fish) and cloud shadows, which
 * are judged under moving light or find no neighbouring trigger alike enough to serve as a
 * background (8 of 24 likely-blank there).
 *
 * Animals amid a full-strength false trigger (a fox under a drifting cloud or in the rain, a
 * fish in the surge: tools/scenes/evaluate.ts, mixedRequests) are the second table. The model
 * is not fitted on them (fitted on, they pulled its threshold to almost 0), and the 99% promise
 * does not hold for them: 38/38 here, 222/228 = 0.974 on the wider set, where animals under a
 * drifting cloud shadow are kept 23 of 24 (15 of 24 before the moving-light rule). Their
 * assertion is a floor under today's level, so that a change that loses ground fails.
 *
 * Two-frame bursts are the third: the generator draws 3-10 frames (or one), and many cameras
 * take two. A pair has no burst median; its change is the pair's difference and the deployment
 * background's. Measured: 42/42 animals, 62/72 = 0.861 likely-blank on the first six seeds per
 * category; 168/168 and 249/288 = 0.865 on validate:wide's seeds drawn as pairs.
 */
import { describe, expect, it } from 'vitest';
import { ALL_CATEGORIES, ANIMAL_CATEGORIES, LAND_FALSE, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { notBlank, screenCategories, screenMixed, summarise } from '../helpers/screening.js';

// The bar (today 0.819, about two events in 144 above it).
const BLANK_SHARE = 0.8;
// Animals amid a full-strength false trigger: today's level here (38/38; 37/38 before the
// moving-light rule) less a margin of about three events in 38.
const MIXED_RECALL_FLOOR = 0.9;

describe('screening the validation seeds as a scan does', () => {
  it('keeps 99% of animals in each habitat and calls 80% of false triggers likely-blank', () => {
    const land = screenCategories([...ANIMAL_CATEGORIES.filter((c) => !isUnderwater(c)), ...LAND_FALSE]);
    expect(summarise(land).recall).toBeGreaterThanOrEqual(0.99);
    const water = screenCategories([...ANIMAL_CATEGORIES.filter(isUnderwater), ...WATER_FALSE]);
    expect(summarise(water).recall).toBeGreaterThanOrEqual(0.99);
    const { recall, blankShare } = summarise([...land, ...water]);
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(BLANK_SHARE);
    // About 110 s of scene rendering and analysis on one core here.
  }, 300_000);

  it('keeps animals seen in the middle of a full-strength false trigger, above its floor', () => {
    // One validation seed per animal and trigger (39 events): see MIXED_RECALL_FLOOR.
    const table = screenMixed(1);
    const events = table.reduce((a, t) => a + t.events, 0);
    const kept = table.reduce((a, t) => a + notBlank(t), 0);
    console.log(`animals in a false trigger: kept ${kept}/${events} = ${(kept / events).toFixed(3)}`);
    expect(events).toBeGreaterThanOrEqual(30);
    expect(kept / events).toBeGreaterThanOrEqual(MIXED_RECALL_FLOOR);
  }, 120_000);

  it('screens two-frame bursts to the same promise', () => {
    // The first six validation seeds of every category, drawn as pairs (114 events, about 45 s).
    const { recall, blankShare } = summarise(screenCategories(ALL_CATEGORIES, 6));
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(BLANK_SHARE);
  }, 240_000);
});
