/**
 * Exact confidence bounds on the number of marked items M in a finite population of N, from k
 * marked in a simple random sample of n drawn without replacement: the hypergeometric analogue
 * of Clopper-Pearson (e.g. Wright, "Exact confidence bounds when sampling from small finite
 * universes", JASA 1991). Used when the sample is a sizeable part of the population (over 5%),
 * where the binomial bounds would be needlessly wide.
 */
import { logChoose } from './log-gamma.js';

/** P(X <= k) for X ~ Hypergeometric(N, M marked, n drawn). */
export function hypergeometricCdf(k: number, N: number, M: number, n: number): number {
  const lo = Math.max(0, n - (N - M));
  const hi = Math.min(n, M);
  if (k < lo) return 0;
  if (k >= hi) return 1;
  const denom = logChoose(N, n);
  let s = 0;
  for (let i = lo; i <= k; i++) s += Math.exp(logChoose(M, i) + logChoose(N - M, n - i) - denom);
  return Math.min(1, s);
}

/** Bounds on M with `tail` probability beyond each (two-sided at 1 - 2 tail). */
export function hypergeometricBounds(k: number, N: number, n: number, tail: number): { lower: number; upper: number } {
  // Upper: the largest M with P(X <= k | M) > tail (the CDF falls as M grows).
  let lo = k, hi = N - (n - k);
  while (lo < hi) {
    const mid = Math.ceil((lo + hi) / 2);
    if (hypergeometricCdf(k, N, mid, n) > tail) lo = mid;
    else hi = mid - 1;
  }
  const upper = lo;
  // Lower: the smallest M with P(X >= k | M) > tail.
  let a = k, b = upper;
  while (a < b) {
    const mid = Math.floor((a + b) / 2);
    if (1 - hypergeometricCdf(k - 1, N, mid, n) > tail) b = mid;
    else a = mid + 1;
  }
  return { lower: k === 0 ? 0 : a, upper };
}
