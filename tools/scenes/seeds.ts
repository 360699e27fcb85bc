/** Seed ranges: the weight fit never sees the validation seeds. */
/** `perCategory` scenes of every category, and animal categories up to `animalsPerCategory`
 *  (same seed formula, first + 1000 * category index + i): the blank threshold rests on the
 *  lowest-scoring animals, so it needs many more of them than the false triggers do (see
 *  tools/fit-weights.ts). */
export const FIT_SEEDS = {
  first: 100_000,
  perCategory: Number(process.env.FIT_PER_CATEGORY ?? 72),
  animalsPerCategory: Number(process.env.FIT_ANIMALS_PER_CATEGORY ?? 288),
} as const;
export const VALIDATION_SEEDS = { first: 900_000, perCategory: 12 } as const;
/** Animals in a full-strength false trigger (mixedRequests): `perPair` seeds per animal and
 *  trigger. Never trained on (see DEVELOPERS.md for what that did): the fit holds its own set
 *  out to choose the penalty by, the validation set is the check. */
export const MIXED_FIT_SEEDS = { first: 200_000, perPair: Number(process.env.FIT_MIXED_PER_PAIR ?? 8) } as const;
export const MIXED_VALIDATION_SEEDS = { first: 950_000, perPair: 6 } as const;
