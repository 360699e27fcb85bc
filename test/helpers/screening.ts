/**
 * Behaviour on the generator's validation seeds (never seen by the weight fit): verdicts per
 * category, printed as a table.
 */
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent, Verdict, type VerdictName } from '../../src/kernels/score.js';
import { isAnimal, type CategoryName } from '../../tools/scenes/categories.js';
import { mixedRequests, runScenes, sceneRequests, type LabelledEvent } from '../../tools/scenes/evaluate.js';
import { MIXED_VALIDATION_SEEDS, VALIDATION_SEEDS } from '../../tools/scenes/seeds.js';

/** Events of a row of a verdict table, and how many got each verdict. */
type VerdictCounts = { [v in VerdictName]: number } & { events: number };

export type Tally = { category: CategoryName; animal: boolean } & VerdictCounts;

/** Verdicts of the analysed events, counted per row (`rowOf` names it, or skips the event), printed as a table. */
function tally<R extends VerdictCounts>(events: readonly LabelledEvent[], rowOf: (e: LabelledEvent) => { key: CategoryName; start: () => R } | undefined): R[] {
  const rows = new Map<CategoryName, R>();
  for (const e of events) {
    const row = rowOf(e);
    if (!row) continue;
    const t = rows.get(row.key) ?? row.start();
    const counts: VerdictCounts = t; // R only adds labels to the counts
    counts.events++;
    counts[scoreEvent(MOTION_MODEL, e.analysis).verdict]++;
    rows.set(row.key, t);
  }
  const table = [...rows.values()];
  console.table(table);
  return table;
}

const noVerdicts = () => ({ events: 0, 'likely-blank': 0, unsure: 0, motion: 0 });

/**
 * The validation seeds of these categories; `twoFrames` draws the first `twoFrames` seeds of
 * each as two-frame bursts instead (the generator's own draw is 3-10 frames, or one).
 */
export function screenCategories(categories: readonly CategoryName[], twoFrames?: number): Tally[] {
  const requests = twoFrames
    ? sceneRequests(VALIDATION_SEEDS.first, twoFrames, categories).map((r) => ({ ...r, frames: 2 }))
    : sceneRequests(VALIDATION_SEEDS.first, VALIDATION_SEEDS.perCategory, categories);
  const events = runScenes(requests);
  // A generated animal that never became visible (off the edge) is not an animal event.
  return tally(events, (e) => (isAnimal(e.category) && !e.animal ? undefined : { key: e.category, start: () => ({ category: e.category, animal: e.animal, ...noVerdicts() }) }));
}

export const notBlank = (t: VerdictCounts): number => t.events - t[Verdict.likelyBlank];

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

export type MixedTally = { 'animals with': CategoryName } & VerdictCounts;

/**
 * Animals in the middle of a full-strength false trigger (mixedRequests): the first `perPair`
 * validation seeds of every animal and trigger, verdicts per trigger, printed as a table.
 */
export function screenMixed(perPair: number): MixedTally[] {
  const events = runScenes(mixedRequests(MIXED_VALIDATION_SEEDS.first, perPair));
  return tally(events, (e) => (e.animal && e.distractor ? { key: e.distractor, start: () => ({ 'animals with': e.distractor!, ...noVerdicts() }) } : undefined));
}
