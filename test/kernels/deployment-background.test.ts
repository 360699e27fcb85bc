/**
 * The deployment background from neighbouring triggers, checked against ground truth: analytic
 * textures rendered at known sub-pixel offsets under known gains and offsets, so the clean
 * background the kernel should recover is known exactly. Then what it is for: a subject that
 * stands still through a whole burst, invisible against the burst's own median.
 */
import { describe, expect, it } from 'vitest';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { deploymentBackground } from '../../src/kernels/deployment-background.js';
import { makeGrey, makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent, Verdict } from '../../src/kernels/score.js';
import { ErrorCode } from '../../src/shared/errors.js';
import { makeRng } from '../../tools/scenes/random.js';
import { bumpField, type Field } from '../../tools/scenes/texture.js';

const W = 192;
const H = 128;

interface Look {
  dx?: number;
  dy?: number;
  gain?: number[];
  offset?: number[];
  noise?: number;
  seed?: number;
  /** A dark disc (a subject) at x, y of radius r, fixed in the frame. */
  disc?: { x: number; y: number; r: number };
}

function place(seed: number): Field[] {
  const rng = makeRng(seed);
  return [0, 1, 2].map(() => bumpField(rng, W, H, 400, 1.5, 5));
}

/** The place seen from a camera moved by (dx, dy): pixel (x, y) shows scene point (x + dx, y + dy). */
function render(fields: Field[], look: Look = {}): RgbFrame {
  const f = makeRgb(W, H);
  const rng = makeRng(look.seed ?? 1);
  const gain = look.gain ?? [1, 1, 1];
  const offset = look.offset ?? [0, 0, 0];
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const inDisc = look.disc && Math.hypot(x - look.disc.x, y - look.disc.y) < look.disc.r;
      for (let c = 0; c < 3; c++) {
        const v = inDisc ? 30 + 10 * c : 128 + 400 * (fields[c](x + (look.dx ?? 0), y + (look.dy ?? 0)) - 0.5);
        f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(gain[c] * v + offset[c] + (look.noise ?? 0) * rng.normal())));
      }
    }
  }
  return f;
}

/** Mean absolute difference over pixels at least `margin` from the edges, optionally inside a disc only. */
function meanAbs(a: RgbFrame, b: RgbFrame, margin: number, disc?: { x: number; y: number; r: number }): number {
  let s = 0;
  let n = 0;
  for (let y = margin; y < H - margin; y++) {
    for (let x = margin; x < W - margin; x++) {
      if (disc && Math.hypot(x - disc.x, y - disc.y) >= disc.r) continue;
      for (let c = 0; c < 3; c++) s += Math.abs(a.data[(y * W + x) * 3 + c] - b.data[(y * W + x) * 3 + c]);
      n += 3;
    }
  }
  return s / n;
}

describe('deployment background from neighbouring triggers (ground truth: analytic textures)', () => {
  const fields = place(7);
  const clean = render(fields);
  const visitor = { x: 70, y: 60, r: 14 };
  const looks: Look[] = [
    { dx: 1.4, dy: -0.6, gain: [0.8, 0.82, 0.78], offset: [12, 10, 14], noise: 2, seed: 2 },
    { dx: -0.8, dy: 1.7, gain: [1.2, 1.15, 1.25], offset: [-15, -10, -20], noise: 2, seed: 3, disc: visitor },
    { gain: [0.9, 0.9, 0.9], offset: [0, 0, 0], noise: 2, seed: 4 },
    { dx: 0.3, dy: 0.45, gain: [1.05, 1.1, 1], offset: [5, -5, 0], noise: 2, seed: 5 },
  ];
  const neighbours = looks.map((l) => render(fields, l));

  it('recovers the clean place from shifted, re-exposed neighbours, one holding a visitor', () => {
    const db = deploymentBackground(clean, neighbours, { minKept: 3 });
    expect(db.frame).toBeDefined();
    expect(db.fits.every((f) => f.kept)).toBe(true);
    // Shifts found to within 0.1 px (pixel (x, y) of a neighbour shows what the reference shows
    // at (x + dx, y + dy), so the shift that brings it back is (-dx, -dy)).
    looks.forEach((l, i) => {
      if (!db.fits[i].compensated) return;
      expect(Math.abs(db.fits[i].shift.dx + (l.dx ?? 0))).toBeLessThan(0.1);
      expect(Math.abs(db.fits[i].shift.dy + (l.dy ?? 0))).toBeLessThan(0.1);
    });
    // The two moved by more than 0.3 px are shifted back; the unmoved one is left alone.
    expect([0, 2, 3].map((i) => db.fits[i].compensated)).toEqual([true, false, true]);
    // Bilinear resampling of the shifted ones softens texture a little: a few levels at most.
    expect(meanAbs(db.frame!, clean, 4)).toBeLessThan(3);
    // The visitor (about 100 levels darker than the place) is gone.
    expect(meanAbs(neighbours[1], clean, 4, visitor)).toBeGreaterThan(60);
    expect(meanAbs(db.frame!, clean, 4, visitor)).toBeLessThan(4);
  });

  it('drops a neighbour that shows another place, and builds the same background without it', () => {
    const other = render(place(99), { noise: 2, seed: 6 });
    const withOther = deploymentBackground(clean, [...neighbours.slice(0, 3), other, neighbours[3]], { minKept: 3 });
    expect(withOther.fits.map((f) => f.kept)).toEqual([true, true, true, false, true]);
    expect(withOther.fits[3].disagreement).toBeGreaterThan(2 * Math.max(...withOther.fits.filter((f) => f.kept).map((f) => f.disagreement)));
    const without = deploymentBackground(clean, neighbours, { minKept: 3 });
    expect(Buffer.from(withOther.frame!.data).equals(Buffer.from(without.frame!.data))).toBe(true);
  });

  it('judges neighbours by the trigger\'s own disagreement when given, and builds nothing below minKept', () => {
    // Told the trigger's own frames agree exactly (0), neighbours with sensor noise (several
    // levels) are all over the one-level allowance.
    const noisy = [21, 22, 23, 24].map((seed) => render(fields, { noise: 6, seed }));
    const loose = deploymentBackground(clean, noisy, { minKept: 3 });
    expect(loose.fits.every((f) => f.kept && f.disagreement > 1)).toBe(true);
    const strict = deploymentBackground(clean, noisy, { minKept: 3, ownDisagreement: 0 });
    expect(strict.frame).toBeUndefined();
    expect(strict.fits).toHaveLength(4);
    expect(strict.fits.every((f) => !f.kept)).toBe(true);
    const two = deploymentBackground(clean, neighbours.slice(0, 2), { minKept: 3 });
    expect(two.frame).toBeUndefined();
    expect(two.fits.every((f) => f.kept)).toBe(true);
  });

  it('shows a subject that stands still through a whole burst, which the burst alone cannot', () => {
    const still = { x: 120, y: 70, r: 12 };
    const burst = [11, 12, 13, 14, 15].map((seed) => render(fields, { noise: 2, seed, disc: still }));
    const overlapsStill = (a: ReturnType<typeof analyseEvent>) =>
      a.tracks.some((t) => t.points.length === burst.length && t.points.every((p) => Math.hypot(p.blob.cx - still.x, p.blob.cy - still.y) < still.r));
    const alone = analyseEvent({ frames: burst });
    expect(overlapsStill(alone)).toBe(false);
    expect(alone.deploymentBackground).toBe(false);
    const placed = analyseEvent({ frames: burst, neighbours });
    expect(placed.deploymentBackground).toBe(true);
    expect(overlapsStill(placed)).toBe(true);
    expect(scoreEvent(MOTION_MODEL, placed).verdict).not.toBe(Verdict.likelyBlank);
  });

  it('keeps a neighbour taken under another cloud shadow, and still paints no subject of the reference into the background', () => {
    // A cloud shadow (light at 45%, a penumbra some 30 px wide) over the left 60% of the frame: most pixels darker, so
    // the gain fit alone leaves a median disagreement far over the limit.
    const shade = (x: number) => 1 - 0.55 / (1 + Math.exp((x - 0.6 * W) / 16));
    const shadowed = render(fields, { noise: 2, seed: 31 });
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) for (let c = 0; c < 3; c++) {
      const i = (y * W + x) * 3 + c;
      shadowed.data[i] = Math.round(shadowed.data[i] * shade(x));
    }
    // A single image holding a large subject of low contrast (a grey animal against grey ground).
    const animal = { x: 120, y: 64, r: 26 };
    const reference = render(fields, { noise: 2, seed: 32 });
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
      if (Math.hypot(x - animal.x, y - animal.y) >= animal.r) continue;
      for (let c = 0; c < 3; c++) reference.data[(y * W + x) * 3 + c] = 100;
    }
    const plain = [33, 34, 35].map((seed) => render(fields, { noise: 2, seed }));
    const db = deploymentBackground(reference, [plain[0], shadowed, plain[1], plain[2]], { minKept: 3 });
    const limit = 2 * Math.min(...db.fits.map((f) => f.relitDisagreement)) + 1;
    expect(db.fits[1].disagreement).toBeGreaterThan(limit);
    expect(db.fits[1].relitDisagreement).toBeLessThanOrEqual(limit);
    expect(db.fits.map((f) => f.kept)).toEqual([true, true, true, true]);
    // Where relighting did not help, the two measures are the same.
    expect(db.fits.filter((_, i) => i !== 1).every((f) => f.relitDisagreement <= f.disagreement)).toBe(true);
    // The background is the place, not the subject: the median of the neighbours as fitted.
    expect(meanAbs(reference, clean, 4, animal)).toBeGreaterThan(20);
    expect(meanAbs(db.frame!, clean, 4, animal)).toBeLessThan(6);
  });

  it('rejects bad input with a stable code, naming the parameter', () => {
    const small = makeRgb(W, H - 1);
    expect(() => deploymentBackground(clean, [neighbours[0], small])).toThrowError(expect.objectContaining({ code: ErrorCode.sizeMismatch, message: expect.stringMatching(/neighbours\[1\]/) }));
    expect(() => deploymentBackground(clean, neighbours, { minKept: 0 })).toThrowError(expect.objectContaining({ code: ErrorCode.invalidArgument, message: expect.stringMatching(/^minKept/) }));
    expect(() => deploymentBackground(clean, neighbours, { ownDisagreement: Number.NaN })).toThrowError(/ownDisagreement: wanted .*got NaN/);
    expect(() => deploymentBackground(clean, neighbours, { mask: makeGrey(W, 3) })).toThrowError(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
    expect(() => analyseEvent({ frames: [clean, clean], neighbours, background: clean })).toThrowError(/^background: wanted absent when neighbours are given/);
  });
});
