/**
 * The clean plate (kernels/clean-plate.ts) against outside references:
 * - a brute-force per-pixel median over hand-labelled subject masks (the masks are where the
 *   test pasted each visitor, so the truth is known exactly), written the obvious way;
 * - the plain temporal median, which it must equal when no trigger marks anything;
 * - the true background of a real photograph (frame 1 of the real infrared burst in
 *   ../shared/fixtures/real-ir-burst, MICA project, Camtrap DP example dataset, CC-BY 4.0),
 *   which the deployment background must recover when visitors stand at the same place in most
 *   neighbouring triggers (a game trail), where the plain median keeps their ghost.
 */
import path from 'node:path';
import sharp from 'sharp';
import { beforeAll, describe, expect, it } from 'vitest';
import { cleanPlate, triggerForeground } from '../../src/kernels/clean-plate.js';
import { deploymentBackground } from '../../src/kernels/deployment-background.js';
import type { RgbFrame } from '../../src/kernels/frame.js';
import { screenEvent } from '../../src/kernels/screen-event.js';
import { temporalMedian } from '../../src/kernels/temporal-median.js';
import { ErrorCode } from '../../src/shared/errors.js';
import { makeRng } from '../../tools/scenes/random.js';

const W = 192;
const H = 136;
const FIXTURE = path.resolve(import.meta.dirname, '../../../shared/fixtures/real-ir-burst/frame-01.jpg');

let photo: RgbFrame;
beforeAll(async () => {
  const { data, info } = await sharp(FIXTURE).resize(W, H, { fit: 'fill' }).removeAlpha().raw().toBuffer({ resolveWithObject: true });
  photo = { width: info.width, height: info.height, channels: 3, data: new Uint8Array(data) };
});

interface Visitor {
  x: number;
  y: number;
  rx: number;
  ry: number;
}

/** The photo with sensor noise and, optionally, a visitor (a textured ellipse, darker or lighter
 *  than what it covers); returns the frame and the visitor's mask (255 inside). */
function shot(seed: number, visitor?: Visitor, level = 40): { frame: RgbFrame; mask: Uint8Array } {
  const rng = makeRng(seed);
  const data = new Uint8Array(photo.data.length);
  const mask = new Uint8Array(W * H);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const i = y * W + x;
      const inside = visitor && ((x - visitor.x) / visitor.rx) ** 2 + ((y - visitor.y) / visitor.ry) ** 2 <= 1;
      if (inside) mask[i] = 255;
      for (let c = 0; c < 3; c++) {
        const base = inside ? level + 25 * Math.sin(x * 0.7 + c) * Math.cos(y * 0.5) : photo.data[i * 3 + c];
        data[i * 3 + c] = Math.max(0, Math.min(255, Math.round(base + 2 * rng.normal())));
      }
    }
  }
  return { frame: { width: W, height: H, channels: 3, data }, mask };
}

/** The obvious version of the rule: at each pixel where half of the masks or more cover it (and
 *  not all), sort the values of the frames whose mask is clear there, elsewhere of all frames,
 *  and take the middle (the mean of the middle pair rounded half up for an even count). */
function bruteForce(frames: RgbFrame[], masks: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(frames[0].data.length);
  for (let i = 0; i < W * H; i++) {
    let use = frames.filter((_, k) => !masks[k][i]);
    if (use.length === 0 || 2 * use.length > frames.length) use = frames;
    for (let c = 0; c < 3; c++) {
      const v = use.map((f) => f.data[i * 3 + c]).sort((a, b) => a - b);
      const m = v.length >> 1;
      out[i * 3 + c] = v.length % 2 ? v[m] : Math.floor((v[m - 1] + v[m] + 1) / 2);
    }
  }
  return out;
}

const meanAbs = (a: Uint8Array, b: Uint8Array, where: Uint8Array): number => {
  let s = 0;
  let n = 0;
  for (let i = 0; i < where.length; i++) {
    if (!where[i]) continue;
    for (let c = 0; c < 3; c++) s += Math.abs(a[i * 3 + c] - b[i * 3 + c]);
    n += 3;
  }
  return s / n;
};

// A trail: visitors at about the same place in four of six triggers.
const SPOT = { x: 96, y: 80, rx: 22, ry: 14 };
const visitorOf = (k: number, dx = 0): Visitor | undefined => (k < 4 ? { ...SPOT, x: SPOT.x + 3 * k - 4 + dx } : undefined);

describe('clean plate', () => {
  it('equals a brute-force median over hand-labelled masks, pixel for pixel', () => {
    const shots = Array.from({ length: 6 }, (_, k) => shot(10 + k, visitorOf(k), k % 2 ? 30 : 200));
    const plate = cleanPlate(shots.map((s) => s.frame), shots.map((s) => s.mask));
    const truth = bruteForce(shots.map((s) => s.frame), shots.map((s) => s.mask));
    expect(Buffer.compare(Buffer.from(plate.frame.data), Buffer.from(truth))).toBe(0);
    expect(plate.replaced).toBeGreaterThan(0);
    expect(plate.ignored).toBe(0);
  });

  it('is the plain temporal median when no trigger marks anything, and counts pixels every trigger marks', () => {
    const frames = Array.from({ length: 5 }, (_, k) => shot(20 + k, visitorOf(k)).frame);
    const plate = cleanPlate(frames, frames.map(() => undefined));
    expect(Buffer.compare(Buffer.from(plate.frame.data), Buffer.from(temporalMedian(frames).data))).toBe(0);
    expect(plate.replaced).toBe(0);
    // Marks over most of the frame (a shaken camera, a light change) are not used.
    const all = new Uint8Array(W * H).fill(255);
    const covered = cleanPlate(frames, frames.map(() => all));
    expect(covered.ignored).toBe(frames.length);
    expect(Buffer.compare(Buffer.from(covered.frame.data), Buffer.from(temporalMedian(frames).data))).toBe(0);
    const block = new Uint8Array(W * H).map((_, i) => (i % W < 20 && i < 20 * W ? 255 : 0));
    const everywhere = cleanPlate(frames, frames.map(() => block));
    expect(everywhere.unresolved).toBe(400);
    expect(Buffer.compare(Buffer.from(everywhere.frame.data), Buffer.from(temporalMedian(frames).data))).toBe(0);
  });

  it("marks where a trigger's visitor moved between its two frames, and almost nothing of a still trigger", () => {
    const a = shot(31, SPOT);
    const b = shot(32, { ...SPOT, x: SPOT.x + 30 });
    const fg = triggerForeground(a.frame, b.frame).marks.data;
    const either = a.mask.map((v, i) => (v || b.mask[i] ? 255 : 0));
    const inside = either.filter((v) => v).length;
    const caught = either.reduce((n, v, i) => n + (v && fg[i] ? 1 : 0), 0);
    expect(caught / inside).toBeGreaterThan(0.9);
    // Outside the visitors and the grown margin, a clean photograph with noise marks nothing.
    const still = triggerForeground(shot(33).frame, shot(34).frame).marks.data;
    expect(still.filter((v) => v).length / (W * H)).toBeLessThan(0.01);
  });

  it('leaves no ghost where visitors stood at the same place in four of six neighbouring triggers (the plain median keeps it)', () => {
    // Each neighbouring trigger: its middle frame, and a second frame where its visitor had moved on.
    const mids = Array.from({ length: 6 }, (_, k) => shot(40 + k, visitorOf(k), 170));
    const seconds = Array.from({ length: 6 }, (_, k) => shot(50 + k, visitorOf(k, 40), 170).frame);
    const reference = shot(60).frame;
    const where = mids[0].mask.map((_, i) => (mids.slice(0, 4).every((m) => m.mask[i]) ? 255 : 0));
    const plain = deploymentBackground(reference, mids.map((m) => m.frame), { minKept: 3 });
    const clean = deploymentBackground(reference, mids.map((m) => m.frame), { minKept: 3, partners: seconds });
    expect(plain.frame && clean.frame).toBeTruthy();
    const ghost = meanAbs(plain.frame!.data, photo.data, where);
    const left = meanAbs(clean.frame!.data, photo.data, where);
    expect(ghost).toBeGreaterThan(60);
    expect(left).toBeLessThan(3);
    expect(clean.replacedShare).toBeGreaterThan(0);
  });

  it('an empty trigger on a trail: no change left where the visitors stood, once their triggers say where they moved', () => {
    const mids = Array.from({ length: 6 }, (_, k) => shot(80 + k, visitorOf(k), 170));
    const seconds = Array.from({ length: 6 }, (_, k) => shot(90 + k, visitorOf(k, 40), 170).frame);
    const empty = [shot(100).frame];
    const atSpot = (blobs: { cx: number; cy: number }[]) => blobs.some((b) => Math.abs(b.cx - SPOT.x) < SPOT.rx && Math.abs(b.cy - SPOT.y) < SPOT.ry);
    const plain = screenEvent({ frames: empty, neighbours: mids.map((m) => m.frame) });
    const clean = screenEvent({ frames: empty, neighbours: mids.map((m) => m.frame), neighbourPartners: seconds });
    expect(atSpot(plain.analysis.frames[0].blobs)).toBe(true);
    expect(atSpot(clean.analysis.frames[0].blobs)).toBe(false);
    expect(clean.score.score).toBeLessThan(plain.score.score);
  });

  it('refuses bad input with stable codes', () => {
    const f = shot(70).frame;
    expect(() => cleanPlate([], [])).toThrow(expect.objectContaining({ code: ErrorCode.notEnoughFrames }));
    expect(() => cleanPlate([f, f], [undefined])).toThrow(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
    expect(() => cleanPlate([f], [new Uint8Array(5)])).toThrow(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
    expect(() => triggerForeground(f, { ...f, width: W / 2, data: f.data.subarray(0, f.data.length / 2) })).toThrow(expect.objectContaining({ code: ErrorCode.sizeMismatch }));
    expect(() => deploymentBackground(f, [f], { partners: [f, f] })).toThrow(expect.objectContaining({ code: ErrorCode.invalidArgument }));
  });
});
