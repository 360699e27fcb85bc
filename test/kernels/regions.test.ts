/** Data-strip detection, ignore masks and the restless-pixel map on generated scenes. */
import { describe, expect, it } from 'vitest';
import { detectDataStrip, detectDataStripInFrames, ignoreMask } from '../../src/kernels/data-strip.js';
import { makeGrey, makeRgb } from '../../src/kernels/frame.js';
import { addActivity, makeRestlessMap, restlessWeights } from '../../src/kernels/restless.js';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { renderScene } from '../../tools/scenes/render.js';
import { Category } from '../../tools/scenes/categories.js';
import { paintStrip } from '../../tools/scenes/data-strip.js';
import { makeRng } from '../../tools/scenes/random.js';
import { bumpField } from '../../tools/scenes/texture.js';
import { translateValidity } from '../../src/kernels/translate.js';

describe('data strip detection', () => {
  it.each([
    [11, 'top', 0.04, 15, 230],
    [12, 'bottom', 0.06, 0, 255],
    [13, 'top', 0.03, 60, 200],
    [14, 'bottom', 0.025, 210, 20],
  ] as const)('seed %i: strip at the %s, %f of the height', (seed, edge, share, bar, ink) => {
    const s = renderScene({ seed, category: Category.empty, frames: 4, strip: { edge, share, bar, ink } });
    const found = detectDataStripInFrames(s.frames);
    const rows = Math.max(5, Math.round(s.height * share));
    const got = edge === 'top' ? found.top : found.bottom;
    expect(got).toBeGreaterThanOrEqual(rows);
    expect(got).toBeLessThanOrEqual(rows + 2);
    expect(edge === 'top' ? found.bottom : found.top).toBe(0);
  });
  it('finds no strip on scenes without one, day or night', () => {
    for (const seed of [21, 22, 23, 24, 25, 26]) {
      const s = renderScene({ seed, category: seed % 2 ? Category.animalNight : Category.wind, frames: 3 });
      const f = detectDataStripInFrames(s.frames);
      expect(f.top + f.bottom).toBe(0);
    }
  });
  it('a flat dark picture taller than the strip limit is not a strip', () => {
    const f = makeRgb(100, 80);
    f.data.fill(5);
    expect(detectDataStrip(f)).toEqual({ top: 0, bottom: 0 });
  });
  it('the ignore mask joins the strip and a drawn region', () => {
    const drawn = makeGrey(10, 10);
    drawn.data.fill(255);
    drawn.data[55] = 0;
    const m = ignoreMask(10, 10, { top: 2, bottom: 1 }, drawn);
    expect(m.data.slice(0, 20).every((v) => v === 0)).toBe(true);
    expect(m.data.slice(90).every((v) => v === 0)).toBe(true);
    expect(m.data[55]).toBe(0);
    expect(m.data[45]).toBe(255);
  });
  it('rejects a bad option, naming it', () => {
    expect(() => detectDataStrip(makeRgb(10, 10), { maxShare: 2 })).toThrowError(/maxShare: wanted number/);
  });
});

describe('restless-pixel map', () => {
  it('discounts a place active in every event and leaves the rest at full weight', () => {
    const map = makeRestlessMap(20, 10);
    for (let e = 0; e < 10; e++) {
      const active = new Uint8Array(200);
      active[5 * 20 + 3] = 1; // the branch, every time
      if (e === 4) active[2 * 20 + 15] = 1; // an animal once
      addActivity(map, active);
    }
    const w = restlessWeights(map)!;
    expect(w[5 * 20 + 3]).toBeCloseTo(0.35, 5);
    expect(w[2 * 20 + 15]).toBe(1);
    expect(w[0]).toBe(1);
  });
  it('gives no weights before enough events, and rejects a wrong-size activity', () => {
    const map = makeRestlessMap(4, 4);
    addActivity(map, new Uint8Array(16));
    expect(restlessWeights(map)).toBeUndefined();
    expect(() => addActivity(map, new Uint8Array(5))).toThrowError(/active.length/);
  });
  it('with the map, a swaying scene loses most of its active area', () => {
    const scenes = [1, 2, 3, 4, 5, 6].map((i) => renderScene({ seed: 500, event: i, category: Category.wind, frames: 4, width: 256, height: 144 }));
    const map = makeRestlessMap(256, 144);
    for (const s of scenes.slice(0, 5)) addActivity(map, analyseEvent({ frames: s.frames }).activity);
    const restless = restlessWeights(map)!;
    const last = scenes[5];
    const before = analyseEvent({ frames: last.frames }).context.activeFraction;
    const after = analyseEvent({ frames: last.frames, restless }).context.activeFraction;
    expect(after).toBeLessThan(before * 0.7);
  });
});

describe('an ignored strip moves with a shaken frame', () => {
  // Ground truth from construction: a still textured place seen by a camera that shook by known
  // whole and sub-pixel amounts, a data strip that changes every frame painted on each frame.
  // Once the shake is compensated nothing is left to find; the strip's edge, shifted into the
  // analysed rows, must not be found either.
  it('finds nothing in a shaken still scene with a changing strip', () => {
    const W = 256, H = 160;
    const rng = makeRng(41);
    const fields = [0, 1, 2].map(() => bumpField(rng, W + 20, H + 20, 600, 2, 6));
    const shakes = [[0, 0], [2.4, -1.7], [-1.6, 2.2], [1.2, 1.9], [-2.1, -2.3]];
    const frames = shakes.map(([dx, dy], k) => {
      const f = makeRgb(W, H);
      for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) for (let c = 0; c < 3; c++) {
        f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(128 + 300 * (fields[c](x + 10 + dx, y + 10 + dy) - 0.5))));
      }
      paintStrip(f, { edge: 'bottom', share: 0.06, bar: 10, ink: 240 }, `1203${k}${k * 7}`);
      return f;
    });
    const strip = detectDataStripInFrames(frames);
    expect(strip.bottom).toBeGreaterThan(0);
    const a = analyseEvent({ frames, mask: ignoreMask(W, H, strip) });
    expect(a.frames.filter((f) => f.compensated).length).toBe(4);
    for (const f of a.frames) expect(f.blobs.map((b) => `${b.x},${b.y} ${b.width}x${b.height}`)).toEqual([]);
  });
  it('validity after a shift: the frame edge and the moved mask are both excluded', () => {
    const mask = new Uint8Array(10 * 6).fill(255);
    for (let x = 0; x < 10; x++) mask[5 * 10 + x] = 0; // bottom row ignored
    const v = translateValidity(10, 6, 0.5, 1.5, mask);
    // out(x, y) reads rows y + 1.5 -> floor and ceil: y = 3 touches row 5, y = 4 is off the frame.
    expect([0, 1, 2, 3, 4, 5].map((y) => v[y * 10 + 2])).toEqual([255, 255, 255, 0, 0, 0]);
    // Column 9 reads x = 9.5: off the frame.
    expect(v[0 * 10 + 9]).toBe(0);
    expect(() => translateValidity(10, 6, 0, 0, new Uint8Array(5))).toThrowError(/mask.length/);
  });
});
