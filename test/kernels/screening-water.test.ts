/**
 * Screening behaviour on validation seeds. Animal recall (not likely-blank) must be at least
 * 0.99: the engine's promise. The target for false triggers called likely-blank is 0.8; under
 * water the engine does not reach it yet (measured 0.75 on these seeds with
 * models/motion-weights.json; 0.625 before the edge-contrast feature, 0.44 before the
 * event-aligned training and the recall-bound threshold, 0.23 before the unexplained-change feature),
 * so the bar below is a regression floor under today's value, to be raised with the model.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { screenCategories, summarise } from '../helpers/screening.js';

describe('screening the validation seeds: underwater', () => {
  it('keeps animals and sets aside false triggers', () => {
    const table = screenCategories([...ANIMAL_CATEGORIES.filter(isUnderwater), ...WATER_FALSE]);
    const { recall, blankShare } = summarise(table);
    expect(recall).toBeGreaterThanOrEqual(0.99);
    expect(blankShare).toBeGreaterThanOrEqual(0.7);
  });
});
