/**
 * Screening behaviour on the validation seeds (never seen by the fit), land cameras (day and
 * night) and underwater, each printed as a table of verdicts per category. The engine's promise
 * and the bar of its issue, over both together: animal recall (events not likely-blank) at least
 * 0.99, and at least 80% of false-trigger events called likely-blank.
 * Measured with models/motion-weights.json: recall 84/84, blank 119/144 = 0.83 (land 0.84,
 * water 0.79). History of the blank share: 0.35 before the unexplained-change feature, 0.53
 * before the event-aligned training and the recall-bound threshold, 0.71 before edge contrast.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, LAND_FALSE, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { screenCategories, summarise } from '../helpers/screening.js';

describe('screening the validation seeds', () => {
  it('keeps 99% of animals in each habitat and calls at least 80% of false triggers likely-blank over both', () => {
    const land = screenCategories([...ANIMAL_CATEGORIES.filter((c) => !isUnderwater(c)), ...LAND_FALSE]);
    expect(summarise(land).recall).toBeGreaterThanOrEqual(0.99);
    const water = screenCategories([...ANIMAL_CATEGORIES.filter(isUnderwater), ...WATER_FALSE]);
    expect(summarise(water).recall).toBeGreaterThanOrEqual(0.99);
    const { recall, blankShare } = summarise([...land, ...water]);
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(0.8);
    // About 80 s of scene rendering and analysis on one core here.
  }, 300_000);
});
