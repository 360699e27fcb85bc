/** Seeded pseudo-random numbers (mulberry32): the same seed renders the same scene everywhere. */
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

export interface Rng {
  next(): number;
  range(lo: number, hi: number): number;
  int(lo: number, hiInclusive: number): number;
  normal(): number;
  pick<T>(items: readonly T[]): T;
  chance(p: number): boolean;
}

export function makeRng(seed: number): Rng {
  const next = mulberry32(seed);
  let spare: number | null = null;
  return {
    next,
    range: (lo, hi) => lo + (hi - lo) * next(),
    int: (lo, hi) => lo + Math.floor(next() * (hi - lo + 1)),
    normal: () => {
      if (spare !== null) {
        const v = spare;
        spare = null;
        return v;
      }
      let u = 0;
      while (u === 0) u = next();
      const v = next();
      const r = Math.sqrt(-2 * Math.log(u));
      spare = r * Math.sin(2 * Math.PI * v);
      return r * Math.cos(2 * Math.PI * v);
    },
    pick: (items) => items[Math.floor(next() * items.length)],
    chance: (p) => next() < p,
  };
}
