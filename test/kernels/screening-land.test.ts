/**
 * Screening behaviour on validation seeds. Animal recall (not likely-blank) must be at least
 * 0.99: the engine's promise. The target for false triggers called likely-blank is 0.8; the
 * engine does not reach it yet (measured 0.41 on these seeds with models/motion-weights.json),
 * so the bar below is a regression floor under today's value, to be raised with the model.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, LAND_FALSE, isAnimal, isUnderwater } from '../../tools/scenes/categories.js';
import { notBlank, screenCategories } from '../helpers/screening.js';

describe('screening the validation seeds: land cameras, day and night', () => {
  it('keeps animals and sets aside false triggers', () => {
    const table = screenCategories([...ANIMAL_CATEGORIES.filter((c) => !isUnderwater(c)), ...LAND_FALSE]);
    const animals = table.filter((t) => isAnimal(t.category));
    const falses = table.filter((t) => !isAnimal(t.category));
    const nA = animals.reduce((s, t) => s + t.events, 0);
    const kept = animals.reduce((s, t) => s + notBlank(t), 0);
    const nF = falses.reduce((s, t) => s + t.events, 0);
    const blank = falses.reduce((s, t) => s + t['likely-blank'], 0);
    console.log(`animal recall ${kept}/${nA} = ${(kept / nA).toFixed(3)}; false triggers likely-blank ${blank}/${nF} = ${(blank / nF).toFixed(3)}`);
    expect(kept / nA).toBeGreaterThanOrEqual(0.99);
    expect(blank / nF).toBeGreaterThanOrEqual(0.3);
  });
});
