/**
 * The video median background: equal to a brute-force per-pixel sort of the sampled frames
 * (slow obvious version), sampled at the stated interval, and free of a ghost where a subject
 * stood once the subject has left (the exponential running average keeps one; running-background.ts).
 */
import { describe, expect, it } from 'vitest';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { createMedianHistory, offerFrame } from '../../src/kernels/median-history.js';
import { learningRate, startBackground, updateBackground } from '../../src/kernels/running-background.js';
import { temporalMedian } from '../../src/kernels/temporal-median.js';

function scene(w: number, h: number, square: boolean, seed: number): RgbFrame {
  const f = makeRgb(w, h);
  let s = seed;
  for (let i = 0; i < f.data.length; i++) {
    s = (s * 1103515245 + 12345) >>> 0;
    f.data[i] = 100 + ((s >>> 16) % 5); // a flat grey with a little noise
  }
  if (square) for (let y = 10; y < 20; y++) for (let x = 10; x < 20; x++) f.data.fill(250, (y * w + x) * 3, (y * w + x) * 3 + 3);
  return f;
}

describe('median history', () => {
  it('equals a brute-force median of the frames it sampled, one every windowS / (samples - 1)', () => {
    const h = createMedianHistory(8, 5); // a sample every 2 s
    const kept: RgbFrame[] = [];
    let bg: RgbFrame | undefined;
    for (let i = 0; i < 40; i++) {
      const t = i * 0.5;
      const f = scene(24, 16, false, i + 1);
      bg = offerFrame(h, f, t);
      if (h.samplesTaken[h.samplesTaken.length - 1] === f) kept.push(f);
    }
    expect(kept.length).toBe(10); // t = 0, 2, 4, ... 18
    const last = kept.slice(-5);
    for (let i = 0; i < bg!.data.length; i += 97) {
      const v = last.map((f) => f.data[i]).sort((a, b) => a - b);
      expect(bg!.data[i]).toBe(v[2]);
    }
  });
  it('kept incrementally, equals the temporal median of the samples at every step, odd and even counts', () => {
    for (const samples of [1, 2, 5, 6, 31]) {
      const h = createMedianHistory(10, samples);
      const every = samples > 1 ? 10 / (samples - 1) : 10;
      for (let i = 0; i < samples * 3; i++) {
        const bg = offerFrame(h, scene(17, 9, i % 4 === 0, i * 7 + samples), i * every * 1.000001); // clear of float ties
        expect(bg.data, `samples ${samples}, step ${i}`).toEqual(temporalMedian(h.samplesTaken).data);
        expect(h.samplesTaken.length).toBe(Math.min(samples, i + 1));
      }
    }
  });
  it('leaves no ghost once a subject that stayed 10 s of a 60 s window has gone; the running average does', () => {
    const h = createMedianHistory(60, 31);
    const run = startBackground(scene(32, 32, false, 1));
    let bg: RgbFrame | undefined;
    for (let i = 1; i <= 4 * 60; i++) {
      const t = i / 4;
      const present = t >= 30 && t < 40;
      const f = scene(32, 32, present, i);
      bg = offerFrame(h, f, t);
      updateBackground(run, f, learningRate(0.25, 8));
    }
    const at = (data: ArrayLike<number>) => data[(15 * 32 + 15) * 3];
    expect(at(bg!.data)).toBeLessThan(110); // the square's place reads as the empty scene
    expect(at(run.data)).toBeGreaterThan(110); // 20 s later the running average still holds part of it
  });
  it('rejects a bad window, sample count and frame size', () => {
    expect(() => createMedianHistory(0, 5)).toThrowError(/windowS: wanted number/);
    expect(() => createMedianHistory(10, 0)).toThrowError(/samples/);
    const h = createMedianHistory(10, 3);
    offerFrame(h, makeRgb(8, 8), 0);
    expect(() => offerFrame(h, makeRgb(9, 8), 20)).toThrowError(/frame/);
  });
});
