import { describe, expect, it } from 'vitest';
import { fitLogistic } from '../../src/shared/stats/logistic.js';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

function sample(n: number, truth: number[], bias: number, seed: number) {
  const r = mulberry32(seed);
  const rows: number[][] = [];
  const labels: number[] = [];
  for (let i = 0; i < n; i++) {
    const x = truth.map(() => (r() - 0.5) * 4);
    const z = bias + x.reduce((s, v, j) => s + v * truth[j], 0);
    rows.push(x);
    labels.push(r() < 1 / (1 + Math.exp(-z)) ? 1 : 0);
  }
  return { rows, labels };
}

describe('weighted L2 logistic regression (the fit behind models/motion-weights.json)', () => {
  it('stops where the penalised gradient vanishes (the optimum condition of the objective)', () => {
    const { rows, labels } = sample(3000, [1.5, -0.7, 0, 0.3], -0.4, 11);
    const weights = rows.map((_, i) => 0.5 + (i % 5) * 0.3);
    const lambda = 7;
    const f = fitLogistic(rows, labels, weights, lambda);
    // Gradient of sum w (y log p + (1-y) log(1-p)) - lambda/2 |beta|^2 in the standardised space.
    const d = rows[0].length;
    const grad = new Array(d + 1).fill(0);
    rows.forEach((r, i) => {
      const x = [1, ...r.map((v, j) => (v - f.mean[j]) / f.std[j])];
      const z = f.bias + x.slice(1).reduce((s, v, j) => s + v * f.weights[j], 0);
      const p = 1 / (1 + Math.exp(-z));
      x.forEach((v, j) => (grad[j] += weights[i] * (labels[i] - p) * v));
    });
    for (let j = 1; j <= d; j++) grad[j] -= lambda * f.weights[j - 1];
    for (const g of grad) expect(Math.abs(g)).toBeLessThan(1e-6);
  });

  it('recovers the generating coefficients from many rows with a negligible penalty', () => {
    const truth = [1.2, -0.8, 0.5];
    const { rows, labels } = sample(40000, truth, 0.3, 5);
    const f = fitLogistic(rows, labels, rows.map(() => 1), 1e-6);
    // Back from standardised to raw units: w_raw = w / std, bias_raw = bias - sum w mean / std.
    const raw = f.weights.map((w, j) => w / f.std[j]);
    const bias = f.bias - f.weights.reduce((s, w, j) => s + (w * f.mean[j]) / f.std[j], 0);
    raw.forEach((w, j) => expect(Math.abs(w - truth[j])).toBeLessThan(0.06));
    expect(Math.abs(bias - 0.3)).toBeLessThan(0.06);
  });

  it('shrinks the weights as the penalty grows', () => {
    const { rows, labels } = sample(2000, [1, -1], 0, 3);
    const norms = [0.1, 10, 10000].map((l) => Math.hypot(...fitLogistic(rows, labels, rows.map(() => 1), l).weights));
    expect(norms[1]).toBeLessThan(norms[0]);
    expect(norms[2]).toBeLessThan(norms[1] / 5);
  });
});
