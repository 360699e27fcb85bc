/**
 * A wider held-out check of the burst model than the test suite can afford: the validation
 * seeds' next 24 per category (12-35; the screening test uses 0-11, the fit never sees either),
 * analysed as a scan analyses them, in one process per core (about 5 minutes here). Prints the
 * verdicts per category and the two numbers the engine is judged by: animal recall and the
 * share of false triggers called likely-blank, on land and under water. Then the animals seen
 * in the middle of a full-strength false trigger (tools/scenes/evaluate.ts, mixedRequests),
 * with their recall per trigger. Then the same seeds drawn as two-frame bursts (the generator's
 * bursts are 3-10 frames long; many cameras take two), with their neighbours as a scan passes
 * them: a two-frame burst has no burst median, so its change is the pair's difference and the
 * deployment background's.
 * Run: npm run validate:wide
 */
import { MOTION_MODEL } from '../src/kernels/model.js';
import { scoreEvent, Verdict } from '../src/kernels/score.js';
import { ALL_CATEGORIES, isAnimal, isUnderwater, type CategoryName } from './scenes/categories.js';
import { analyseScene, mixedRequests, sceneRequests } from './scenes/evaluate.js';
import { renderScene } from './scenes/render.js';
import { inParts } from './parts.js';
import { MIXED_VALIDATION_SEEDS, VALIDATION_SEEDS } from './scenes/seeds.js';

const FROM = VALIDATION_SEEDS.perCategory;
const COUNT = 24;
// The same draw as sceneRequests (bursts, and one in four single images), past the test's seeds.
const plain = sceneRequests(VALIDATION_SEEDS.first, FROM + COUNT, ALL_CATEGORIES).filter((r) => r.seed % 1000 >= FROM);
const requests: Array<{ seed: number; category: CategoryName; distractor?: CategoryName; frames?: number; pair?: boolean }> = [
  ...plain,
  ...mixedRequests(MIXED_VALIDATION_SEEDS.first, MIXED_VALIDATION_SEEDS.perPair),
  ...plain.map((r) => ({ seed: r.seed, category: r.category, frames: 2, pair: true })),
];

interface Outcome {
  category: CategoryName;
  distractor?: CategoryName;
  pair?: boolean;
  animal: boolean;
  verdict: string;
}
const outcomes = await inParts<Outcome>(import.meta.filename, async (part, parts) =>
  requests
    .filter((_, k) => k % parts === part)
    .map((r) => {
      const ev = analyseScene(renderScene(r));
      return { category: r.category, distractor: r.distractor, pair: r.pair, animal: ev.animal, verdict: scoreEvent(MOTION_MODEL, ev.analysis).verdict };
    }),
);
// A generated animal that never became visible (off the edge) is not an animal event.
const visible = outcomes.filter((o) => !isAnimal(o.category) || o.animal);
const counted = visible.filter((o) => !o.distractor && !o.pair);
const mixed = visible.filter((o) => o.distractor);
const pairs = visible.filter((o) => o.pair);
const perCategory = (xs: Outcome[]) =>
  console.table(
    ALL_CATEGORIES.map((c) => {
      const ys = xs.filter((o) => o.category === c);
      return { category: c, events: ys.length, ...Object.fromEntries(Object.values(Verdict).map((v) => [v, ys.filter((o) => o.verdict === v).length])) };
    }),
  );
perCategory(counted);
const share = (xs: Outcome[], ok: (o: Outcome) => boolean) => `${xs.filter(ok).length}/${xs.length} = ${(xs.filter(ok).length / Math.max(1, xs.length)).toFixed(3)}`;
const blank = (o: Outcome) => o.verdict === Verdict.likelyBlank;
/** The two numbers the engine is judged by, for a set of plain (not mixed) events. */
const judged = (xs: Outcome[]): string => {
  const empties = xs.filter((o) => !isAnimal(o.category));
  return `animal recall ${share(xs.filter((o) => isAnimal(o.category)), (o) => !blank(o))}; false triggers likely-blank ${share(empties, blank)}: land ${share(empties.filter((o) => !isUnderwater(o.category)), blank)}, water ${share(empties.filter((o) => isUnderwater(o.category)), blank)}`;
};
console.log(`seeds ${FROM}-${FROM + COUNT - 1} of each category, model thresholds blank ${MOTION_MODEL.thresholds.blank.toFixed(4)}`);
console.log(judged(counted));
console.table(
  [...new Set(mixed.map((o) => o.distractor!))].map((d) => {
    const xs = mixed.filter((o) => o.distractor === d);
    return { 'animals with': d, events: xs.length, ...Object.fromEntries(Object.values(Verdict).map((v) => [v, xs.filter((o) => o.verdict === v).length])) };
  }),
);
console.log(`animals in a full-strength false trigger (mixed seeds from ${MIXED_VALIDATION_SEEDS.first}, ${MIXED_VALIDATION_SEEDS.perPair} per animal and trigger): recall ${share(mixed, (o) => !blank(o))}`);
perCategory(pairs);
console.log(`the same seeds as two-frame bursts: ${judged(pairs)}`);
