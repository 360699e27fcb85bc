/** Seed ranges: the weight fit never sees the validation seeds. */
export const FIT_SEEDS = { first: 100_000, perCategory: Number(process.env.FIT_PER_CATEGORY ?? 72) } as const;
export const VALIDATION_SEEDS = { first: 900_000, perCategory: 12 } as const;
