/**
 * Continuous textures for the scene generator: sums of random Gaussian bumps and value noise,
 * evaluated at any real position, so shifted copies have exact (analytic) ground truth.
 */
import type { Rng } from './random.js';

export type Field = (x: number, y: number) => number;

/** A sum of `count` Gaussian bumps of radius rMin..rMax over a w x h area, values roughly 0..1. */
export function bumpField(rng: Rng, w: number, h: number, count: number, rMin: number, rMax: number): Field {
  const bumps = Array.from({ length: count }, () => ({
    x: rng.range(-0.1 * w, 1.1 * w),
    y: rng.range(-0.1 * h, 1.1 * h),
    inv: 1 / (2 * rng.range(rMin, rMax) ** 2),
    a: rng.range(-1, 1),
  }));
  const scale = 1 / Math.sqrt(count / 8 + 1);
  return (x, y) => {
    let v = 0;
    for (const b of bumps) {
      const d = (x - b.x) ** 2 + (y - b.y) ** 2;
      if (d * b.inv < 9) v += b.a * Math.exp(-d * b.inv);
    }
    return 0.5 + 0.5 * Math.tanh(v * scale);
  };
}

/** Lattice value noise with smooth interpolation, `octaves` octaves from cell size `cell`. */
export function valueNoise(rng: Rng, cell: number, octaves: number): Field {
  const size = 64; // lattice period in cells; indices wrap with & 63
  const table = new Float32Array(octaves * size * size);
  for (let i = 0; i < table.length; i++) table[i] = rng.next();
  const inv = Array.from({ length: octaves }, (_, o) => 2 ** o / cell);
  let norm = 0;
  for (let o = 0; o < octaves; o++) norm += 0.5 ** (o + 1);
  return (x, y) => {
    let v = 0;
    let amp = 0.5;
    for (let o = 0; o < octaves; o++) {
      const fx = x * inv[o];
      const fy = y * inv[o];
      const ix = Math.floor(fx);
      const iy = Math.floor(fy);
      let tx = fx - ix;
      let ty = fy - iy;
      tx = tx * tx * (3 - 2 * tx);
      ty = ty * ty * (3 - 2 * ty);
      const base = o * size * size;
      const x0 = ix & 63, x1 = (ix + 1) & 63;
      const r0 = base + (iy & 63) * size, r1 = base + ((iy + 1) & 63) * size;
      const a = table[r0 + x0] + tx * (table[r0 + x1] - table[r0 + x0]);
      const b = table[r1 + x0] + tx * (table[r1 + x1] - table[r1 + x0]);
      v += amp * (a + ty * (b - a));
      amp *= 0.5;
    }
    return v / norm;
  };
}
