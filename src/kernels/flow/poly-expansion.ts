/**
 * Polynomial expansion (Farnebäck, SCIA 2003, section 2): around every pixel the image is
 * approximated by a quadratic x'Ax + b'x + c, fitted by Gaussian-weighted least squares over a
 * (2n+1)^2 neighbourhood. Done separably with the weighted basis {1, x, x^2} per axis and the
 * inverse Gram matrix of the basis (the paper's normalised convolution with a constant
 * certainty). Output: 5 coefficients per pixel, in this order:
 *   [0] b_y, [1] b_x, [2] A_yy, [3] A_xx, [4] A_xy (the constant c is not needed).
 * Borders replicate the edge pixel. The flow passes its polyN here as n, as OpenCV's
 * implementation does (FarnebackPolyExp), so the default polyN = 5 fits over 11 x 11 pixels.
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
  return expand(src, n, sigma, n === 5);
}

/** The same with the generic loops for every n (the n = 5 rows must equal it bit for bit). */
export function polyExpansionGeneric(src: FloatImage, n: number, sigma: number): FloatImage {
  return expand(src, n, sigma, false);
}

function expand(src: FloatImage, n: number, sigma: number, unrolled: boolean): FloatImage {
  const { width: w, height: h } = src;
  const { g, xg, xxg, ig11, ig03, ig33, ig55 } = polyBasis(n, sigma);
  const out = new Float32Array(w * h * 5);
  // The vertical sums of 1, y and y^2 along each column, one plane each (contiguous rows read
  // better than an interleaved triple), with n replicated pixels at both ends.
  const len = w + 2 * n;
  const v0 = new Float64Array(len);
  const v1 = new Float64Array(len);
  const v2 = new Float64Array(len);
  const s = src.data;
  const above = new Int32Array(n + 1);
  const below = new Int32Array(n + 1);
  for (let y = 0; y < h; y++) {
    const row = y * w;
    for (let k = 1; k <= n; k++) {
      above[k] = Math.max(y - k, 0) * w;
      below[k] = Math.min(y + k, h - 1) * w;
    }
    if (unrolled) verticalSums5(s, v0, v1, v2, g, xg, xxg, row, above, below, w);
    else verticalSums(s, v0, v1, v2, g, xg, xxg, n, row, above, below, w);
    for (let x = 0; x < n; x++) {
      v0[n - 1 - x] = v0[n];
      v1[n - 1 - x] = v1[n];
      v2[n - 1 - x] = v2[n];
      v0[n + w + x] = v0[n + w - 1];
      v1[n + w + x] = v1[n + w - 1];
      v2[n + w + x] = v2[n + w - 1];
    }
    if (unrolled) horizontalSums5(v0, v1, v2, g, xg, xxg, out, row, w, ig11, ig03, ig33, ig55);
    else horizontalSums(v0, v1, v2, g, xg, xxg, n, out, row, w, ig11, ig03, ig33, ig55);
  }
  return { width: w, height: h, channels: 5, data: out };
}

/**
 * The vertical sums of 1, y and y^2 (weighted by g, xg, xxg) along each column of one row, the
 * rows k above and below at offsets above[k] and below[k] (edge rows replicated). Each column's
 * three sums stay in registers over all taps and are stored once (a pass per tap read and wrote
 * all three planes n + 1 times).
 */
function verticalSums(s: Float32Array, v0: Float64Array, v1: Float64Array, v2: Float64Array, g: Float64Array, xg: Float64Array, xxg: Float64Array, n: number, row: number, above: Int32Array, below: Int32Array, w: number): void {
  const g0 = g[n];
  for (let x = 0; x < w; x++) {
    let a0 = s[row + x] * g0;
    let a1 = 0;
    let a2 = 0;
    for (let k = 1; k <= n; k++) {
      const a = s[above[k] + x];
      const b = s[below[k] + x];
      const p = a + b;
      a0 += g[n + k] * p;
      a1 += xg[n + k] * (b - a);
      a2 += xxg[n + k] * p;
    }
    v0[n + x] = a0;
    v1[n + x] = a1;
    v2[n + x] = a2;
  }
}

/** The horizontal pass over one row's vertical sums: the five coefficients of every pixel. */
function horizontalSums(v0: Float64Array, v1: Float64Array, v2: Float64Array, g: Float64Array, xg: Float64Array, xxg: Float64Array, n: number, out: Float32Array, row: number, w: number, ig11: number, ig03: number, ig33: number, ig55: number): void {
  const g0 = g[n];
  for (let x = 0; x < w; x++) {
    const at = n + x;
    let b1 = v0[at] * g0, b2 = 0, b3 = v1[at] * g0, b4 = 0, b5 = v2[at] * g0, b6 = 0;
    for (let k = 1; k <= n; k++) {
      const p = at + k, m = at - k;
      const gk = g[n + k], xgk = xg[n + k];
      const tg = v0[p] + v0[m];
      b1 += tg * gk;
      b4 += tg * xxg[n + k];
      b2 += (v0[p] - v0[m]) * xgk;
      b3 += (v1[p] + v1[m]) * gk;
      b6 += (v1[p] - v1[m]) * xgk;
      b5 += (v2[p] + v2[m]) * gk;
    }
    const d = (row + x) * 5;
    out[d] = b3 * ig11;
    out[d + 1] = b2 * ig11;
    out[d + 2] = b1 * ig03 + b5 * ig33;
    out[d + 3] = b1 * ig03 + b4 * ig33;
    out[d + 4] = b6 * ig55;
  }
}

/*
 * The same two passes written out for n = 5 (the default polyN, 11 taps), the sums in the
 * generic loops' order so the results are identical. With the taps in locals instead of read
 * from arrays inside a loop of five, the expansion takes less than half the time (measured with
 * tools/bench-kernels.ts, which runs the flow that calls it).
 */
function verticalSums5(s: Float32Array, v0: Float64Array, v1: Float64Array, v2: Float64Array, g: Float64Array, xg: Float64Array, xxg: Float64Array, row: number, above: Int32Array, below: Int32Array, w: number): void {
  const g0 = g[5], g1 = g[6], g2 = g[7], g3 = g[8], g4 = g[9], g5 = g[10];
  const x1 = xg[6], x2 = xg[7], x3 = xg[8], x4 = xg[9], x5 = xg[10];
  const q1 = xxg[6], q2 = xxg[7], q3 = xxg[8], q4 = xxg[9], q5 = xxg[10];
  const u1 = above[1], u2 = above[2], u3 = above[3], u4 = above[4], u5 = above[5];
  const d1 = below[1], d2 = below[2], d3 = below[3], d4 = below[4], d5 = below[5];
  for (let x = 0; x < w; x++) {
    const a1 = s[u1 + x], a2 = s[u2 + x], a3 = s[u3 + x], a4 = s[u4 + x], a5 = s[u5 + x];
    const b1 = s[d1 + x], b2 = s[d2 + x], b3 = s[d3 + x], b4 = s[d4 + x], b5 = s[d5 + x];
    const p1 = a1 + b1, p2 = a2 + b2, p3 = a3 + b3, p4 = a4 + b4, p5 = a5 + b5;
    v0[5 + x] = s[row + x] * g0 + g1 * p1 + g2 * p2 + g3 * p3 + g4 * p4 + g5 * p5;
    v1[5 + x] = 0 + x1 * (b1 - a1) + x2 * (b2 - a2) + x3 * (b3 - a3) + x4 * (b4 - a4) + x5 * (b5 - a5);
    v2[5 + x] = 0 + q1 * p1 + q2 * p2 + q3 * p3 + q4 * p4 + q5 * p5;
  }
}

function horizontalSums5(v0: Float64Array, v1: Float64Array, v2: Float64Array, g: Float64Array, xg: Float64Array, xxg: Float64Array, out: Float32Array, row: number, w: number, ig11: number, ig03: number, ig33: number, ig55: number): void {
  const g0 = g[5], g1 = g[6], g2 = g[7], g3 = g[8], g4 = g[9], g5 = g[10];
  const x1 = xg[6], x2 = xg[7], x3 = xg[8], x4 = xg[9], x5 = xg[10];
  const q1 = xxg[6], q2 = xxg[7], q3 = xxg[8], q4 = xxg[9], q5 = xxg[10];
  // The eleven values of each plane around the pixel ride along in locals, one new value read
  // per plane and pixel (rather than 33 reads a pixel): 1.4x faster, the same sums.
  let a0 = v0[0], a1 = v0[1], a2 = v0[2], a3 = v0[3], a4 = v0[4], a5 = v0[5], a6 = v0[6], a7 = v0[7], a8 = v0[8], a9 = v0[9];
  let b0 = v1[0], b1 = v1[1], b2 = v1[2], b3 = v1[3], b4 = v1[4], b5 = v1[5], b6 = v1[6], b7 = v1[7], b8 = v1[8], b9 = v1[9];
  let c0 = v2[0], c1 = v2[1], c2 = v2[2], c3 = v2[3], c4 = v2[4], c5 = v2[5], c6 = v2[6], c7 = v2[7], c8 = v2[8], c9 = v2[9];
  for (let x = 0, d = row * 5; x < w; x++, d += 5) {
    const a10 = v0[x + 10], b10 = v1[x + 10], c10 = v2[x + 10];
    const s1 = a6 + a4, s2 = a7 + a3, s3 = a8 + a2, s4 = a9 + a1, s5 = a10 + a0;
    const e1 = a5 * g0 + s1 * g1 + s2 * g2 + s3 * g3 + s4 * g4 + s5 * g5;
    const e4 = 0 + s1 * q1 + s2 * q2 + s3 * q3 + s4 * q4 + s5 * q5;
    const e2 = 0 + (a6 - a4) * x1 + (a7 - a3) * x2 + (a8 - a2) * x3 + (a9 - a1) * x4 + (a10 - a0) * x5;
    const e3 = b5 * g0 + (b6 + b4) * g1 + (b7 + b3) * g2 + (b8 + b2) * g3 + (b9 + b1) * g4 + (b10 + b0) * g5;
    const e6 = 0 + (b6 - b4) * x1 + (b7 - b3) * x2 + (b8 - b2) * x3 + (b9 - b1) * x4 + (b10 - b0) * x5;
    const e5 = c5 * g0 + (c6 + c4) * g1 + (c7 + c3) * g2 + (c8 + c2) * g3 + (c9 + c1) * g4 + (c10 + c0) * g5;
    out[d] = e3 * ig11;
    out[d + 1] = e2 * ig11;
    out[d + 2] = e1 * ig03 + e5 * ig33;
    out[d + 3] = e1 * ig03 + e4 * ig33;
    out[d + 4] = e6 * ig55;
    a0 = a1; a1 = a2; a2 = a3; a3 = a4; a4 = a5; a5 = a6; a6 = a7; a7 = a8; a8 = a9; a9 = a10;
    b0 = b1; b1 = b2; b2 = b3; b3 = b4; b4 = b5; b5 = b6; b6 = b7; b7 = b8; b8 = b9; b9 = b10;
    c0 = c1; c1 = c2; c2 = c3; c3 = c4; c4 = c5; c5 = c6; c6 = c7; c7 = c8; c8 = c9; c9 = c10;
  }
}
