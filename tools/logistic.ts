/**
 * Weighted L2-regularised logistic regression by Newton's method (IRLS), on standardised
 * features. Small and exact enough for a few thousand rows and a dozen features.
 */
export interface Fit {
  mean: number[];
  std: number[];
  weights: number[];
  bias: number;
}

function solve(a: number[][], b: number[]): number[] {
  const n = b.length;
  const m = a.map((row, i) => [...row, b[i]]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r][c]) > Math.abs(m[p][c])) p = r;
    [m[c], m[p]] = [m[p], m[c]];
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = m[r][c] / m[c][c];
      for (let k = c; k <= n; k++) m[r][k] -= f * m[c][k];
    }
  }
  return m.map((row, i) => row[n] / row[i]);
}

export function fitLogistic(rows: number[][], labels: number[], sampleWeights: number[], lambda: number): Fit {
  const d = rows[0].length;
  const mean = Array.from({ length: d }, (_, j) => rows.reduce((s, r) => s + r[j], 0) / rows.length);
  const std = Array.from({ length: d }, (_, j) => Math.sqrt(rows.reduce((s, r) => s + (r[j] - mean[j]) ** 2, 0) / rows.length) || 1);
  const x = rows.map((r) => [1, ...r.map((v, j) => (v - mean[j]) / std[j])]);
  let beta = new Array(d + 1).fill(0);
  for (let iter = 0; iter < 50; iter++) {
    const h = Array.from({ length: d + 1 }, () => new Array(d + 1).fill(0));
    const g = new Array(d + 1).fill(0);
    for (let i = 0; i < x.length; i++) {
      const z = x[i].reduce((s, v, j) => s + v * beta[j], 0);
      const p = 1 / (1 + Math.exp(-z));
      const w = sampleWeights[i];
      for (let j = 0; j <= d; j++) {
        g[j] += w * (labels[i] - p) * x[i][j];
        for (let k = 0; k <= d; k++) h[j][k] += w * p * (1 - p) * x[i][j] * x[i][k];
      }
    }
    for (let j = 1; j <= d; j++) {
      g[j] -= lambda * beta[j];
      h[j][j] += lambda;
    }
    h[0][0] += 1e-9;
    const step = solve(h, g);
    beta = beta.map((b, j) => b + step[j]);
    if (Math.max(...step.map(Math.abs)) < 1e-8) break;
  }
  return { mean, std, weights: beta.slice(1), bias: beta[0] };
}
