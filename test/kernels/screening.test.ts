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
 * habitat and over both. The bar for the blank share is 80% of false triggers called
 * likely-blank. Measured with models/motion-weights.json (2026-12-03: L2 penalty 10, chosen
 * by the fit; thresholds from out-of-fold records, 99% recall with 95% confidence): recall
 * 84/84, likely-blank 116/144 = 0.806 (land 83/96 = 0.86, water 33/48 = 0.69). That clears the
 * bar on these seeds by one event, but not on more of them: on the next 24 validation seeds per
 * category (`npm run validate:wide`) 211/288 = 0.733 (land 0.82, water 0.55), and out of fold
 * on the fit set 0.74. So the bar is not met in general, and the assertion below is a floor
 * under today's level, so that a change that loses ground fails; it is not the bar. What is
 * left is mostly particles, surge, kelp and rain: many small things moving at once.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, LAND_FALSE, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { screenCategories, summarise } from '../helpers/screening.js';

// Today's level (0.806) less a margin of about six events in 144, so that refits do not flap.
const BLANK_SHARE_FLOOR = 0.76;

describe('screening the validation seeds as a scan does', () => {
  it('keeps 99% of animals in each habitat and holds the likely-blank share above its floor', () => {
    const land = screenCategories([...ANIMAL_CATEGORIES.filter((c) => !isUnderwater(c)), ...LAND_FALSE]);
    expect(summarise(land).recall).toBeGreaterThanOrEqual(0.99);
    const water = screenCategories([...ANIMAL_CATEGORIES.filter(isUnderwater), ...WATER_FALSE]);
    expect(summarise(water).recall).toBeGreaterThanOrEqual(0.99);
    const { recall, blankShare } = summarise([...land, ...water]);
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(BLANK_SHARE_FLOOR);
    // About 110 s of scene rendering and analysis on one core here.
  }, 300_000);
});
