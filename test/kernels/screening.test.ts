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
 * likely-blank. Measured with models/motion-weights.json (2026-12-03, with the local-light step
 * of src/kernels/shading.ts; L2 penalty 10, chosen by the fit; thresholds from out-of-fold
 * records, 99% recall with 95% confidence): recall 84/84, likely-blank 118/144 = 0.819 (land
 * 82/96 = 0.85, water 36/48 = 0.75). On the next 24 validation seeds per category (`npm run
 * validate:wide`) 225/288 = 0.781 (land 0.85, water 0.64; before the local-light step 0.736),
 * so the bar is still not met in general, and the assertion below is a floor under today's
 * level, so that a change that loses ground fails; it is not the bar. What is left is mostly
 * particles, surge, kelp and rain: many small things moving at once.
 *
 * Animals amid a full-strength false trigger (a fox under a drifting cloud or in the rain, a
 * fish in the surge: tools/scenes/evaluate.ts, mixedRequests) are the second table. The model
 * is not fitted on them (fitted on, they pulled its threshold to almost 0), and the 99% promise
 * does not hold for them: 37/38 here, 212/228 = 0.930 on the wider set, where the worst is an
 * animal under a drifting cloud shadow (14 of 24 kept). Their assertion is a floor too.
 */
import { describe, expect, it } from 'vitest';
import { ANIMAL_CATEGORIES, LAND_FALSE, WATER_FALSE, isUnderwater } from '../../tools/scenes/categories.js';
import { notBlank, screenCategories, screenMixed, summarise } from '../helpers/screening.js';

// Today's level (0.819) less a margin of about six events in 144, so that refits do not flap.
const BLANK_SHARE_FLOOR = 0.78;
// Animals amid a full-strength false trigger: today's level here (37/38 = 0.974) less a margin
// of about three events in 38.
const MIXED_RECALL_FLOOR = 0.9;

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

  it('keeps animals seen in the middle of a full-strength false trigger, above its floor', () => {
    // One validation seed per animal and trigger (39 events): see MIXED_RECALL_FLOOR.
    const table = screenMixed(1);
    const events = table.reduce((a, t) => a + t.events, 0);
    const kept = table.reduce((a, t) => a + notBlank(t), 0);
    console.log(`animals in a false trigger: kept ${kept}/${events} = ${(kept / events).toFixed(3)}`);
    expect(events).toBeGreaterThanOrEqual(30);
    expect(kept / events).toBeGreaterThanOrEqual(MIXED_RECALL_FLOOR);
  }, 120_000);
});
