/**
 * Screening behaviour on the validation seeds (never seen by the fit), land cameras (day and
 * night) and underwater, each printed as a table of verdicts per category.
 *
 * Scenes are analysed as a scan analyses them (tools/scenes/evaluate.ts): a burst is its own
 * reference; a single image gets its neighbours' median as background. Until 2026-12-02 this
 * test gave bursts a clean background the product never has, and claimed more than the product
 * does: one model measured 0.84 that way and 0.785 as a scan computes it.
 *
 * The engine's promise, asserted: animal recall (events not likely-blank) at least 0.99 in each
 * habitat and over both. The issue's bar for the blank share, 80% of false triggers called
 * likely-blank, is NOT met in the product's own mode: measured with models/motion-weights.json
 * (thresholds from out-of-fold scan records, 99% recall with 95% confidence): recall 84/84,
 * likely-blank 69/144 = 0.48 (land 52/96, water 17/48); most of the rest are unsure, 5 are
 * motion. The assertion below is a floor under today's level, so that a change that loses
 * ground fails; it is not the bar. Bursts screened with a clean background reach 0.84 with the
 * same kernels (a one-off measurement): a robust deployment background for bursts in scans is
 * the open work.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, LAND_FALSE, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { screenCategories, summarise } from '../helpers/screening.js';

// Today's level (0.479) less a margin of about four events in 144, so that refits do not flap.
const BLANK_SHARE_FLOOR = 0.45;

describe('screening the validation seeds as a scan does', () => {
  it('keeps 99% of animals in each habitat and holds the likely-blank share above its floor', () => {
    const land = screenCategories([...ANIMAL_CATEGORIES.filter((c) => !isUnderwater(c)), ...LAND_FALSE]);
    expect(summarise(land).recall).toBeGreaterThanOrEqual(0.99);
    const water = screenCategories([...ANIMAL_CATEGORIES.filter(isUnderwater), ...WATER_FALSE]);
    expect(summarise(water).recall).toBeGreaterThanOrEqual(0.99);
    const { recall, blankShare } = summarise([...land, ...water]);
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(BLANK_SHARE_FLOOR);
    // About 80 s of scene rendering and analysis on one core here.
  }, 300_000);
});
