/**
 * A subject that moves more than its own size between frames, as a small animal does in a burst
 * taken a second apart, must come out as one track at the places it was in each frame, with no
 * second copy where it had been (the "ghost" a plain frame-to-frame difference leaves). Ground
 * truth from construction: an analytic texture with a dark disc drawn at known positions.
 */
import { describe, expect, it } from 'vitest';
import { analyseEvent } from '../../src/kernels/analyse-event.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { makeRng } from '../../tools/scenes/random.js';
import { bumpField, type Field } from '../../tools/scenes/texture.js';

const W = 240;
const H = 140;

function scene(fields: Field[], disc: { x: number; y: number; r: number } | undefined, seed: number): RgbFrame {
  const f = makeRgb(W, H);
  const rng = makeRng(seed);
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const inDisc = disc && Math.hypot(x - disc.x, y - disc.y) < disc.r;
      for (let c = 0; c < 3; c++) {
        const v = inDisc ? 40 + 15 * c : 128 + 300 * (fields[c](x, y) - 0.5);
        f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(v + 2 * rng.normal())));
      }
    }
  }
  return f;
}

describe('a subject stepping further than its size between frames', () => {
  for (const { frames, step, r, seed } of [
    { frames: 6, step: 22, r: 6, seed: 1 },
    { frames: 4, step: 30, r: 5, seed: 2 },
    { frames: 9, step: 18, r: 4, seed: 3 },
  ]) {
    it(`${frames} frames, ${step} px steps, radius ${r}: one track, no copy where it was`, () => {
      const rng = makeRng(seed);
      const fields = [0, 1, 2].map(() => bumpField(rng, W, H, 500, 1.5, 5));
      const discs = Array.from({ length: frames }, (_, k) => ({ x: 30 + k * step * 0.95, y: 40 + k * step * 0.3, r }));
      const a = analyseEvent({ frames: discs.map((d, k) => scene(fields, d, seed * 100 + k)) });
      // Every blob of frame k holds the disc's centre in frame k.
      a.frames.forEach((fa, k) => {
        expect(fa.blobs.length, `frame ${k} blobs`).toBeGreaterThanOrEqual(1);
        for (const b of fa.blobs) expect(Math.hypot(b.cx - discs[k].x, b.cy - discs[k].y), `frame ${k} blob at ${b.cx.toFixed(0)},${b.cy.toFixed(0)}`).toBeLessThan(r);
      });
      expect(a.tracks.length).toBe(1);
      const t = a.trackFeatures[0];
      expect(t.persistence).toBe(1);
      expect(t.straightness).toBeGreaterThan(0.98);
    });
  }
});
