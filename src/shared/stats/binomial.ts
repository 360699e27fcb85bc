/**
 * Exact (Clopper-Pearson) confidence bounds for a binomial proportion: k successes in n trials.
 * The upper bound U solves P(X <= k | n, U) = tail, the lower bound L solves P(X >= k | n, L) =
 * tail (Clopper and Pearson, Biometrika 1934). Solved by bisection on the binomial CDF, so no
 * inverse beta function is needed; the result is exact to 1e-12.
 */
import { logChoose } from './log-gamma.js';

/** P(X <= k) for X ~ Binomial(n, p). */
export function binomialCdf(k: number, n: number, p: number): number {
  if (k < 0) return 0;
  if (k >= n) return 1;
  if (p <= 0) return 1;
  if (p >= 1) return 0;
  let s = 0;
  const lp = Math.log(p), lq = Math.log1p(-p);
  for (let i = 0; i <= k; i++) s += Math.exp(logChoose(n, i) + i * lp + (n - i) * lq);
  return Math.min(1, s);
}

function bisect(f: (p: number) => number, target: number): number {
  // f is decreasing in p from f(0) to f(1); find p with f(p) = target.
  let lo = 0, hi = 1;
  for (let i = 0; i < 60; i++) {
    const mid = (lo + hi) / 2;
    if (f(mid) > target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/** One bound with `tail` probability beyond it (0.025 for each side of a two-sided 95% interval, 0.05 for a one-sided 95% bound). */
export function clopperPearsonUpper(k: number, n: number, tail: number): number {
  if (k >= n) return 1;
  return bisect((p) => binomialCdf(k, n, p), tail);
}

export function clopperPearsonLower(k: number, n: number, tail: number): number {
  if (k <= 0) return 0;
  // P(X >= k | p) = 1 - P(X <= k - 1 | p), increasing in p.
  return bisect((p) => binomialCdf(k - 1, n, p), 1 - tail);
}

export interface Interval {
  estimate: number;
  lower: number;
  upper: number;
}

/** Two-sided exact interval at confidence 1 - alpha. */
export function clopperPearson(k: number, n: number, alpha = 0.05): Interval {
  return { estimate: n ? k / n : 0, lower: clopperPearsonLower(k, n, alpha / 2), upper: clopperPearsonUpper(k, n, alpha / 2) };
}

/**
 * How many to check so that finding no animal at all proves the miss rate below `tolerance` at
 * confidence 1 - alpha (one-sided): the smallest n with (1 - tolerance)^n <= alpha, that is
 * n >= ln(alpha) / ln(1 - tolerance). 299 for 1% at alpha 0.05.
 */
export function sampleSizeForZeroMisses(tolerance: number, alpha = 0.05): number {
  return Math.ceil(Math.log(alpha) / Math.log(1 - tolerance) - 1e-9);
}

export interface RecallThreshold {
  /** Scores below it are called blank; every animal score at or above it is kept. */
  threshold: number;
  /** One-sided lower confidence bound on the recall at that threshold. */
  lower: number;
  /** Animals at or above the threshold. */
  kept: number;
}

/**
 * The highest threshold whose recall on the given animal scores is at least `recall` with
 * confidence 1 - alpha: raising the threshold past the i-th lowest score loses i animals, and
 * the one-sided Clopper-Pearson lower bound of (kept / n) must still reach the target. Returns
 * threshold 0 (nothing called blank) when even keeping every animal cannot show the target,
 * which happens below sampleSizeForZeroMisses(1 - recall) animals.
 */
export function recallThreshold(animalScores: readonly number[], recall: number, alpha = 0.05): RecallThreshold {
  const scores = [...animalScores].sort((a, b) => a - b);
  const n = scores.length;
  let best: RecallThreshold = { threshold: 0, lower: n ? clopperPearsonLower(n, n, alpha) : 0, kept: n };
  for (let i = 0; i < n; i++) {
    const kept = n - i;
    const lower = clopperPearsonLower(kept, n, alpha);
    if (lower < recall) break;
    best = { threshold: scores[i], lower, kept };
  }
  return best;
}
