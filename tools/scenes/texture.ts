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
  const size = 64;
  const tables = Array.from({ length: octaves }, () => Float32Array.from({ length: size * size }, () => rng.next()));
  const smooth = (t: number): number => t * t * (3 - 2 * t);
  return (x, y) => {
    let v = 0;
    let amp = 0.5;
    let c = cell;
    let norm = 0;
    for (const t of tables) {
      const fx = x / c, fy = y / c;
      const ix = Math.floor(fx), iy = Math.floor(fy);
      const tx = smooth(fx - ix), ty = smooth(fy - iy);
      const at = (i: number, j: number): number => t[(((j % size) + size) % size) * size + (((i % size) + size) % size)];
      const a = at(ix, iy) + tx * (at(ix + 1, iy) - at(ix, iy));
      const b = at(ix, iy + 1) + tx * (at(ix + 1, iy + 1) - at(ix, iy + 1));
      v += amp * (a + ty * (b - a));
      norm += amp;
      amp *= 0.5;
      c /= 2;
    }
    return v / norm;
  };
}
