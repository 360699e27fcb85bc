/**
 * Local shading (src/kernels/shading.ts): light that multiplies what is there is followed and
 * taken out; something that replaces what is there is left alone, and so is a place with no
 * texture to tell the two apart by. Then the engine on a burst with a soft shadow sweeping the
 * frame: without a subject nothing should be found, with one the subject should be.
 */
import { describe, expect, it } from 'vitest';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { toLuma } from '../../src/kernels/luma.js';
import { applyShading, fitShading, shadingMatters } from '../../src/kernels/shading.js';
import { ErrorCode, MovesiftError } from '../../src/shared/errors.js';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';
import { makeRng } from '../../tools/scenes/random.js';

const W = 240, H = 160;

/** A textured scene: smooth value noise at two scales (like ground and leaves), 30..220. */
function scene(seed: number): Float32Array {
  const r = mulberry32(seed);
  const grid = (step: number) => {
    const gw = Math.ceil(W / step) + 2, gh = Math.ceil(H / step) + 2;
    const g = Float32Array.from({ length: gw * gh }, () => r());
    return (x: number, y: number) => {
      const fx = x / step, fy = y / step, x0 = Math.floor(fx), y0 = Math.floor(fy), tx = fx - x0, ty = fy - y0;
      const at = (i: number, j: number) => g[j * gw + i];
      return (at(x0, y0) * (1 - tx) + at(x0 + 1, y0) * tx) * (1 - ty) + (at(x0, y0 + 1) * (1 - tx) + at(x0 + 1, y0 + 1) * tx) * ty;
    };
  };
  const coarse = grid(24), fine = grid(4);
  const out = new Float32Array(W * H);
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) out[y * W + x] = 30 + 190 * (0.5 * coarse(x, y) + 0.5 * fine(x, y));
  return out;
}

/** Renders luma-like values into RGB (a neutral scene) times a light field, plus sensor noise. */
function render(values: Float32Array, light: (x: number, y: number) => number, noiseSeed: number, sigma = 2): RgbFrame {
  const f = makeRgb(W, H);
  const rng = makeRng(noiseSeed);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const v = values[y * W + x] * light(x, y);
      for (let c = 0; c < 3; c++) f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(v * (0.9 + 0.1 * c) + sigma * rng.normal())));
    }
  }
  return f;
}

/** A soft shadow: darkening `depth` at its centre, falling off over `radius` (a Gaussian). */
const shadow = (cx: number, cy: number, radius: number, depth: number) => (x: number, y: number) => 1 - depth * Math.exp(-((x - cx) ** 2 + (y - cy) ** 2) / (2 * radius * radius));

function lumaDiffs(a: RgbFrame, b: RgbFrame, inside?: (x: number, y: number) => boolean): number[] {
  const la = toLuma(a).data, lb = toLuma(b).data;
  const out: number[] = [];
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) if (!inside || inside(x, y)) out.push(Math.abs(la[y * W + x] - lb[y * W + x]));
  return out.sort((p, q) => p - q);
}
const quantile = (xs: number[], q: number) => xs[Math.min(xs.length - 1, Math.floor(q * xs.length))];
const mean = (xs: number[]) => xs.reduce((a, v) => a + v, 0) / xs.length;

describe('local shading', () => {
  const base = scene(7);
  const reference = render(base, () => 1, 1);

  it('follows a soft shadow and a ramp of light, and takes them out', () => {
    const light = (x: number, y: number) => (0.8 + (0.3 * x) / W) * shadow(0.4 * W, 0.5 * H, 0.25 * W, 0.4)(x, y);
    const current = render(base, light, 2);
    const before = lumaDiffs(reference, current);
    const field = fitShading(toLuma(reference), toLuma(current));
    expect(shadingMatters(field)).toBe(true);
    const after = lumaDiffs(reference, applyShading(current, field));
    // Sensor noise alone (sigma 2 in each frame) gives a median luma difference near 2.
    expect(quantile(before, 0.5)).toBeGreaterThan(15);
    expect(quantile(after, 0.5)).toBeLessThan(3.5);
    expect(quantile(after, 0.95)).toBeLessThan(9);
  });

  it('leaves a subject that replaces the texture where it stands', () => {
    const other = scene(99);
    const inSquare = (x: number, y: number) => x >= 100 && x < 150 && y >= 50 && y < 100;
    const mixed = Float32Array.from(base, (v, i) => (inSquare(i % W, Math.floor(i / W)) ? 0.6 * other[i] : v));
    const light = shadow(0.3 * W, 0.4 * H, 0.3 * W, 0.35);
    const current = render(mixed, light, 3);
    const lit = applyShading(current, fitShading(toLuma(reference), toLuma(current)));
    // The background agrees again; the subject still differs as much as it did without light.
    expect(quantile(lumaDiffs(reference, lit, (x, y) => !inSquare(x, y)), 0.5)).toBeLessThan(3.5);
    const plain = render(mixed, () => 1, 3);
    const subjectAfter = mean(lumaDiffs(reference, lit, inSquare));
    const subjectWithoutLight = mean(lumaDiffs(reference, plain, inSquare));
    expect(subjectAfter).toBeGreaterThan(0.7 * subjectWithoutLight);
    expect(subjectWithoutLight).toBeGreaterThan(20);
  });

  it('changes nothing when only a subject appears, or where there is no texture to judge by', () => {
    const other = scene(5);
    const inSquare = (x: number, y: number) => x >= 60 && x < 140 && y >= 40 && y < 120;
    const current = render(Float32Array.from(base, (v, i) => (inSquare(i % W, Math.floor(i / W)) ? other[i] : v)), () => 1, 4);
    const field = fitShading(toLuma(reference), toLuma(current));
    for (const g of field.gain) expect(Math.abs(g - 1)).toBeLessThan(0.03);
    // A flat ground darkened where a uniform subject stands looks like a shadow: not trusted.
    const flat = render(new Float32Array(W * H).fill(150), () => 1, 5);
    const darker = render(new Float32Array(W * H).fill(150), (x, y) => (x < W / 2 ? 0.6 : 1), 6);
    expect(shadingMatters(fitShading(toLuma(flat), toLuma(darker)))).toBe(false);
  });

  it('rejects frames of different sizes and parameters out of range, naming them', () => {
    const code = (fn: () => unknown) => {
      try {
        fn();
      } catch (e) {
        return e instanceof MovesiftError ? `${e.code}: ${e.message}` : String(e);
      }
      return 'no error';
    };
    expect(code(() => fitShading(toLuma(reference), toLuma(makeRgb(W, H + 1))))).toMatch(new RegExp(`^${ErrorCode.sizeMismatch}: current`));
    expect(code(() => fitShading(toLuma(reference), toLuma(reference), undefined, { cellsAcross: Number.NaN }))).toMatch(new RegExp(`^${ErrorCode.invalidArgument}: cellsAcross`));
    expect(code(() => fitShading(toLuma(reference), toLuma(reference), undefined, { minFollowing: 2 }))).toMatch(/minFollowing/);
  });
});

describe('a soft shadow sweeping a burst', () => {
  const base = scene(11);
  // Five frames; the shadow's centre crosses the frame from left to right (a cloud edge or a
  // patch of shade moving over the ground), 45% dark at its centre.
  const light = (k: number) => shadow((0.1 + 0.2 * k) * W, 0.5 * H, 0.3 * W, 0.45);

  it('finds nothing without a subject', () => {
    const frames = [0, 1, 2, 3, 4].map((k) => render(base, light(k), 20 + k));
    const a = analyseEvent({ frames });
    const active = mean(a.frames.map((f) => f.activeFraction));
    expect(active).toBeLessThan(0.01);
  });

  it('finds a subject crossing under it', () => {
    const fur = scene(123);
    const at = (k: number) => ({ x: 50 + 28 * k, y: 60 });
    const frames = [0, 1, 2, 3, 4].map((k) => {
      const p = at(k);
      const inBody = (x: number, y: number) => x >= p.x && x < p.x + 30 && y >= p.y && y < p.y + 30;
      return render(Float32Array.from(base, (v, i) => (inBody(i % W, Math.floor(i / W)) ? 0.5 * fur[i] : v)), light(k), 40 + k);
    });
    const a = analyseEvent({ frames });
    // The subject is found in every frame where it is, and nothing large anywhere off its path
    // (what the shadow would leave: a band of change as wide as the shadow).
    a.frames.forEach((f, k) => {
      const c = at(k);
      expect(f.blobs.some((b) => Math.abs(b.cx - (c.x + 15)) < 8 && Math.abs(b.cy - (c.y + 15)) < 8 && b.area > 500)).toBe(true);
      for (const b of f.blobs) if (b.area > 50) expect(Math.abs(b.cy - (c.y + 15))).toBeLessThan(15);
    });
  });
});
