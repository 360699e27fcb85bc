/** Seeded uniform numbers in [0, 1) (mulberry32): the same seed draws the same sample everywhere. */
export function mulberry32(seed: number): () => number {
  let s = seed >>> 0 || 0x9e3779b9;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** A simple random sample of `n` of `items` without replacement (partial Fisher-Yates), in draw order. */
export function sampleWithoutReplacement<T>(items: readonly T[], n: number, next: () => number): T[] {
  const a = [...items];
  const m = Math.min(n, a.length);
  for (let i = 0; i < m; i++) {
    const j = i + Math.floor(next() * (a.length - i));
    [a[i], a[j]] = [a[j], a[i]];
  }
  return a.slice(0, m);
}
