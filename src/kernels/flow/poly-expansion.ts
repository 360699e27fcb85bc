/**
 * Polynomial expansion (Farnebäck, SCIA 2003, section 2): around every pixel the image is
 * approximated by a quadratic x'Ax + b'x + c, fitted by Gaussian-weighted least squares over a
 * (2n+1)^2 neighbourhood. Done separably with the weighted basis {1, x, x^2} per axis and the
 * inverse Gram matrix of the basis (the paper's normalised convolution with a constant
 * certainty). Output: 5 coefficients per pixel, in this order:
 *   [0] b_y, [1] b_x, [2] A_yy, [3] A_xx, [4] A_xy (the constant c is not needed).
 * Borders replicate the edge pixel.
 */
import type { FloatImage } from '../frame.js';

interface Basis {
  g: Float64Array;
  xg: Float64Array;
  xxg: Float64Array;
  ig11: number;
  ig03: number;
  ig33: number;
  ig55: number;
}

function invert(m: number[][]): number[][] {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let p = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[p][c])) p = r;
    [a[c], a[p]] = [a[p], a[c]];
    const d = a[c][c];
    for (let k = 0; k < 2 * n; k++) a[c][k] /= d;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      for (let k = 0; k < 2 * n; k++) a[r][k] -= f * a[c][k];
    }
  }
  return a.map((row) => row.slice(n));
}

export function polyBasis(n: number, sigma: number): Basis {
  const s = sigma < 1e-6 ? n * 0.3 : sigma;
  const g = new Float64Array(2 * n + 1);
  let sum = 0;
  for (let x = -n; x <= n; x++) {
    g[x + n] = Math.fround(Math.exp((-x * x) / (2 * s * s)));
    sum += g[x + n];
  }
  const xg = new Float64Array(2 * n + 1);
  const xxg = new Float64Array(2 * n + 1);
  for (let x = -n; x <= n; x++) {
    g[x + n] = Math.fround(g[x + n] / sum);
    xg[x + n] = Math.fround(x * g[x + n]);
    xxg[x + n] = Math.fround(x * x * g[x + n]);
  }
  // Gram matrix of the basis {1, x, y, x^2, y^2, xy} under the separable weight g(x) g(y).
  const G = Array.from({ length: 6 }, () => new Array(6).fill(0));
  for (let y = -n; y <= n; y++) {
    for (let x = -n; x <= n; x++) {
      const w = g[y + n] * g[x + n];
      G[0][0] += w;
      G[1][1] += w * x * x;
      G[3][3] += w * x ** 4;
      G[5][5] += w * x * x * y * y;
    }
  }
  G[2][2] = G[0][3] = G[0][4] = G[3][0] = G[4][0] = G[1][1];
  G[4][4] = G[3][3];
  G[3][4] = G[4][3] = G[5][5];
  const inv = invert(G);
  return { g, xg, xxg, ig11: inv[1][1], ig03: inv[0][3], ig33: inv[3][3], ig55: inv[5][5] };
}

export function polyExpansion(src: FloatImage, n: number, sigma: number): FloatImage {
  const { width: w, height: h } = src;
  const { g, xg, xxg, ig11, ig03, ig33, ig55 } = polyBasis(n, sigma);
  const out = new Float32Array(w * h * 5);
  const row = new Float64Array((w + 2 * n) * 3);
  const o = n * 3; // offset of x = 0 in `row`
  const s = src.data;
  for (let y = 0; y < h; y++) {
    // Vertical pass: weighted sums of 1, y, y^2 along the column.
    for (let x = 0; x < w; x++) {
      row[o + x * 3] = s[y * w + x] * g[n];
      row[o + x * 3 + 1] = 0;
      row[o + x * 3 + 2] = 0;
    }
    for (let k = 1; k <= n; k++) {
      const r0 = Math.max(y - k, 0) * w;
      const r1 = Math.min(y + k, h - 1) * w;
      for (let x = 0; x < w; x++) {
        const p = s[r0 + x] + s[r1 + x];
        row[o + x * 3] += g[n + k] * p;
        row[o + x * 3 + 1] += xg[n + k] * (s[r1 + x] - s[r0 + x]);
        row[o + x * 3 + 2] += xxg[n + k] * p;
      }
    }
    for (let x = 0; x < n; x++) {
      for (let c = 0; c < 3; c++) {
        row[o - (x + 1) * 3 + c] = row[o + c];
        row[o + (w + x) * 3 + c] = row[o + (w - 1) * 3 + c];
      }
    }
    // Horizontal pass.
    for (let x = 0; x < w; x++) {
      const at = o + x * 3;
      let b1 = row[at] * g[n], b2 = 0, b3 = row[at + 1] * g[n], b4 = 0, b5 = row[at + 2] * g[n], b6 = 0;
      for (let k = 1; k <= n; k++) {
        const p = at + k * 3, m = at - k * 3;
        const tg = row[p] + row[m];
        b1 += tg * g[n + k];
        b4 += tg * xxg[n + k];
        b2 += (row[p] - row[m]) * xg[n + k];
        b3 += (row[p + 1] + row[m + 1]) * g[n + k];
        b6 += (row[p + 1] - row[m + 1]) * xg[n + k];
        b5 += (row[p + 2] + row[m + 2]) * g[n + k];
      }
      const d = (y * w + x) * 5;
      out[d] = b3 * ig11;
      out[d + 1] = b2 * ig11;
      out[d + 2] = b1 * ig03 + b5 * ig33;
      out[d + 3] = b1 * ig03 + b4 * ig33;
      out[d + 4] = b6 * ig55;
    }
  }
  return { width: w, height: h, channels: 5, data: out };
}
