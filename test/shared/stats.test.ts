/**
 * The audit's statistics against outside references:
 * - Clopper-Pearson intervals equal those of @stdlib/stats-binomial-test (the stdlib project's
 *   exact binomial test), for many k and n;
 * - 0 of n: the upper bound is exactly 1 - (alpha/2)^(1/n), and the one-sided 95% bound is near
 *   the "rule of three", 3/n (Hanley and Lippman-Hand, JAMA 1983);
 * - the planner gives 299 for a 1% tolerance at alpha 0.05 (ln 0.05 / ln 0.99 = 298.07);
 * - hypergeometric bounds equal a brute-force search over every population count, with the
 *   probabilities summed term by term from exact integer binomial coefficients (BigInt).
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { clopperPearson, clopperPearsonUpper, recallThreshold, sampleSizeForZeroMisses } from '../../src/shared/stats/binomial.js';
import { hypergeometricBounds } from '../../src/shared/stats/hypergeometric.js';
import { logGamma } from '../../src/shared/stats/log-gamma.js';

const binomialTest = createRequire(import.meta.url)('@stdlib/stats-binomial-test') as (k: number, n: number, o: { alpha: number }) => { ci: [number, number] };

describe('Clopper-Pearson', () => {
  it('equals @stdlib/stats-binomial-test on a grid of k and n', () => {
    for (const n of [1, 5, 20, 50, 150, 299, 1000]) {
      for (const k of [0, 1, 2, 3, Math.floor(n / 3), n - 1, n]) {
        if (k < 0 || k > n) continue;
        for (const alpha of [0.05, 0.1]) {
          const ours = clopperPearson(k, n, alpha);
          const ref = binomialTest(k, n, { alpha }).ci;
          expect(ours.lower, `${k}/${n} a=${alpha}`).toBeCloseTo(ref[0], 9);
          expect(ours.upper, `${k}/${n} a=${alpha}`).toBeCloseTo(ref[1], 9);
        }
      }
    }
  });
  it('0 of n: exactly 1 - (alpha/2)^(1/n); one-sided 95% near the rule of three', () => {
    for (const n of [10, 30, 100, 299, 1000]) {
      expect(clopperPearson(0, n, 0.05).upper).toBeCloseTo(1 - 0.025 ** (1 / n), 12);
      const oneSided = clopperPearsonUpper(0, n, 0.05);
      expect(oneSided).toBeCloseTo(1 - 0.05 ** (1 / n), 12);
      if (n >= 100) expect(Math.abs(oneSided - 3 / n) / (3 / n)).toBeLessThan(0.02);
    }
  });
  it('plans 299 checks for 1% at alpha 0.05, and 299 clean checks prove it where 298 do not', () => {
    expect(sampleSizeForZeroMisses(0.01, 0.05)).toBe(299);
    expect(clopperPearsonUpper(0, 299, 0.05)).toBeLessThan(0.01);
    expect(clopperPearsonUpper(0, 298, 0.05)).toBeGreaterThan(0.01);
    expect(sampleSizeForZeroMisses(0.05, 0.05)).toBe(59);
  });
  it('log-gamma matches factorials', () => {
    let f = 1;
    for (let n = 1; n <= 20; n++) {
      f *= n;
      expect(logGamma(n + 1)).toBeCloseTo(Math.log(f), 10);
    }
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 12);
  });
});

describe('hypergeometric bounds', () => {
  const choose = (n: number, k: number): bigint => {
    if (k < 0 || k > n) return 0n;
    let r = 1n;
    for (let i = 0; i < k; i++) r = (r * BigInt(n - i)) / BigInt(i + 1);
    return r;
  };
  /** P(X <= k) as a float from exact integer counts. */
  const cdf = (k: number, N: number, M: number, n: number): number => {
    let num = 0n;
    for (let i = 0; i <= k; i++) num += choose(M, i) * choose(N - M, n - i);
    return Number((num * 10n ** 15n) / choose(N, n)) / 1e15;
  };
  it('equal a brute-force search over every population count', () => {
    for (const [N, n, k] of [[60, 20, 0], [60, 20, 2], [100, 30, 5], [200, 40, 1], [25, 25, 3]]) {
      const tail = 0.025;
      let upper = 0;
      let lower = N;
      for (let M = 0; M <= N; M++) {
        if (M < k || N - M < n - k) continue; // impossible counts
        if (cdf(k, N, M, n) > tail) upper = Math.max(upper, M);
        if (1 - (k > 0 ? cdf(k - 1, N, M, n) : 0) > tail) lower = Math.min(lower, M);
      }
      if (k === 0) lower = 0;
      expect(hypergeometricBounds(k, N, n, tail), `${k} of ${n} from ${N}`).toEqual({ lower, upper });
    }
  });
});

describe('recall threshold (the rule behind the default likely-blank threshold and calibrate)', () => {
  // Reference: @stdlib/stats-binomial-test with alternative 'greater' gives the one-sided
  // Clopper-Pearson lower bound; the threshold may drop i animals only while that bound, for
  // n - i kept of n, stays at or above the target.
  const oneSided = createRequire(import.meta.url)('@stdlib/stats-binomial-test') as (k: number, n: number, o: { alpha: number; alternative: string }) => { ci: [number, number] };
  it('needs 299 animals for 99% with none missed (ln 0.05 / ln 0.99)', () => {
    const scores = (n: number) => Array.from({ length: n }, (_, i) => 0.3 + (0.7 * i) / n);
    expect(recallThreshold(scores(299), 0.99).threshold).toBeCloseTo(0.3, 12);
    expect(recallThreshold(scores(298), 0.99).threshold).toBe(0);
  });
  it.each([500, 1000, 3000])('drops as many animals as the one-sided bound allows, n = %i', (n) => {
    const scores = Array.from({ length: n }, (_, i) => ((i * 7919) % n) / n);
    const r = recallThreshold(scores, 0.99);
    const dropped = n - r.kept;
    expect(oneSided(r.kept, n, { alpha: 0.05, alternative: 'greater' }).ci[0]).toBeGreaterThanOrEqual(0.99);
    expect(oneSided(r.kept - 1, n, { alpha: 0.05, alternative: 'greater' }).ci[0]).toBeLessThan(0.99);
    expect(r.threshold).toBeCloseTo(dropped / n, 12);
    expect(scores.filter((s) => s >= r.threshold).length).toBe(r.kept);
  });
});
