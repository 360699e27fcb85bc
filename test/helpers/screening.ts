/**
 * Behaviour on the generator's validation seeds (never seen by the weight fit): verdicts per
 * category, printed as a table.
 */
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent, Verdict } from '../../src/kernels/score.js';
import { isAnimal, type CategoryName } from '../../tools/scenes/categories.js';
import { mixedRequests, runScenes, sceneRequests } from '../../tools/scenes/evaluate.js';
import { MIXED_VALIDATION_SEEDS, VALIDATION_SEEDS } from '../../tools/scenes/seeds.js';

export interface Tally {
  category: CategoryName;
  animal: boolean;
  events: number;
  'likely-blank': number;
  unsure: number;
  motion: number;
}

export function screenCategories(categories: readonly CategoryName[]): Tally[] {
  const events = runScenes(sceneRequests(VALIDATION_SEEDS.first, VALIDATION_SEEDS.perCategory, categories));
  const rows = new Map<CategoryName, Tally>();
  for (const e of events) {
    // A generated animal that never became visible (off the edge) is not an animal event.
    if (isAnimal(e.category) && !e.animal) continue;
    const t = rows.get(e.category) ?? { category: e.category, animal: e.animal, events: 0, 'likely-blank': 0, unsure: 0, motion: 0 };
    t.events++;
    t[scoreEvent(MOTION_MODEL, e.analysis).verdict]++;
    rows.set(e.category, t);
  }
  const table = [...rows.values()];
  console.table(table);
  return table;
}

export const notBlank = (t: Pick<Tally, 'events' | 'likely-blank'>): number => t.events - t[Verdict.likelyBlank];

/** Animal recall (events not likely-blank) and the share of false triggers called likely-blank. */
export function summarise(table: Tally[]): { recall: number; blankShare: number } {
  const animals = table.filter((t) => isAnimal(t.category));
  const falses = table.filter((t) => !isAnimal(t.category));
  const nA = animals.reduce((s, t) => s + t.events, 0);
  const kept = animals.reduce((s, t) => s + notBlank(t), 0);
  const nF = falses.reduce((s, t) => s + t.events, 0);
  const blank = falses.reduce((s, t) => s + t['likely-blank'], 0);
  console.log(`animal recall ${kept}/${nA} = ${(kept / nA).toFixed(3)}; false triggers likely-blank ${blank}/${nF} = ${(blank / nF).toFixed(3)}`);
  return { recall: kept / nA, blankShare: blank / nF };
}

export interface MixedTally {
  'animals with': CategoryName;
  events: number;
  'likely-blank': number;
  unsure: number;
  motion: number;
}

/**
 * Animals in the middle of a full-strength false trigger (mixedRequests): the first `perPair`
 * validation seeds of every animal and trigger, verdicts per trigger, printed as a table.
 */
export function screenMixed(perPair: number): MixedTally[] {
  const events = runScenes(mixedRequests(MIXED_VALIDATION_SEEDS.first, MIXED_VALIDATION_SEEDS.perPair).filter((r) => r.seed % 100 < perPair));
  const rows = new Map<CategoryName, MixedTally>();
  for (const e of events) {
    if (!e.animal || !e.distractor) continue;
    const t = rows.get(e.distractor) ?? { 'animals with': e.distractor, events: 0, 'likely-blank': 0, unsure: 0, motion: 0 };
    t.events++;
    t[scoreEvent(MOTION_MODEL, e.analysis).verdict]++;
    rows.set(e.distractor, t);
  }
  const table = [...rows.values()];
  console.table(table);
  return table;
}
