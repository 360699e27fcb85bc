/**
 * The engine's two entries own the rules a verdict rests on. screen-event: the data strip is the
 * wider of the trigger's own and its deployment's, and a single image borrows its neighbours'
 * frames to find its own; the verdict is the model's rule over the analysis. screen-clip: a
 * clip not screened whole is never likely-blank, and its windows come from its own frames.
 */
import { describe, expect, it } from 'vitest';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { screenEvent } from '../../src/kernels/screen-event.js';
import { createClipScreener } from '../../src/kernels/screen-clip.js';
import { scoreEvent } from '../../src/kernels/score.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { mulberry32 } from '../../src/shared/stats/seeded-random.js';

const W = 160, H = 120;
/** A textured scene with sensor noise; a black bar of `strip` rows at the top with a white
 *  counter block whose place changes with `tick` (as a camera's clock does). */
function scene(seed: number, strip = 0, tick = 0): RgbFrame {
  const rnd = mulberry32(seed);
  const f = makeRgb(W, H);
  for (let y = 0; y < H; y++)
    for (let x = 0; x < W; x++) {
      const base = 90 + 40 * Math.sin(x / 7) * Math.cos(y / 9);
      for (let c = 0; c < 3; c++) f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(base + c * 10 + (rnd() - 0.5) * 6)));
    }
  for (let y = 0; y < strip; y++)
    for (let x = 0; x < W; x++) {
      const on = x >= 100 + (tick % 4) * 8 && x < 106 + (tick % 4) * 8 && y >= 2 && y < strip - 2;
      for (let c = 0; c < 3; c++) f.data[(y * W + x) * 3 + c] = on ? 250 : 5;
    }
  return f;
}

describe('screenEvent', () => {
  it('hides the wider of the trigger’s strip and the deployment’s, and says which set it', () => {
    const frames = [0, 1, 2].map((k) => scene(k + 1, 10, k));
    const own = screenEvent({ frames, neighbours: [] });
    expect(own.strip.top).toBeGreaterThanOrEqual(10);
    expect(own.stripFrom).toBe('event');
    const wider = screenEvent({ frames, neighbours: [], deploymentStrip: { top: 16, bottom: 0 } });
    expect(wider.strip).toMatchObject({ top: 16 });
    expect(wider.stripFrom).toBe('deployment');
    expect(wider.mask!.data[15 * W + 5]).toBe(0);
    expect(wider.mask!.data[16 * W + 5]).toBe(255);
  });
  it('lets a single image find its strip among its neighbours’ frames', () => {
    const single = screenEvent({ frames: [scene(1, 10, 0)], neighbours: [2, 3, 4].map((k) => scene(k + 10, 10, k)) });
    expect(single.strip.top).toBeGreaterThanOrEqual(10);
  });
  it('scores with the model’s rule over its own analysis, and explains with the best track', () => {
    const frames = [0, 1, 2].map((k) => scene(k + 1));
    // A bright square crossing the scene.
    frames.forEach((f, k) => {
      for (let y = 50; y < 70; y++) for (let x = 30 + 35 * k; x < 50 + 35 * k; x++) for (let c = 0; c < 3; c++) f.data[(y * W + x) * 3 + c] = 240;
    });
    const r = screenEvent({ frames, neighbours: [] });
    expect(r.score).toEqual(scoreEvent(MOTION_MODEL, r.analysis));
    expect(r.score.bestTrack).toBeGreaterThanOrEqual(0);
    expect(r.bestBlobs.length).toBeGreaterThan(0);
    const b = r.bestBlobs[0];
    expect(b.y).toBeLessThan(70);
    expect(b.y + b.height).toBeGreaterThan(50);
  });
});

describe('createClipScreener', () => {
  const still = (): ReturnType<typeof createClipScreener> => {
    const s = createClipScreener();
    for (let k = 0; k < 40; k++) s.push(scene(100 + k), k / 4);
    return s;
  };
  it('calls a still clip screened whole likely-blank, and the same clip cut short unsure', () => {
    const whole = still().finish({ durationS: 10, fps: 4 });
    expect(whole.verdict).toBe('likely-blank');
    expect(whole.windows).toEqual([]);
    expect(whole.incomplete).toBeUndefined();
    const short = still().finish({ durationS: 60, fps: 4 });
    expect(short.incomplete).toEqual({ kind: 'short', endS: 9.75 });
    expect(short.verdict).toBe('unsure');
    const stopped = still().finish({ stopped: true, fps: 4 });
    expect(stopped.incomplete?.kind).toBe('stopped');
    expect(stopped.verdict).toBe('unsure');
  });
});

describe('per-size working state', () => {
  it('is made once per size and keeps only the sizes used last', async () => {
    const { perSize, SIZES_KEPT } = await import('../../src/kernels/frame.js');
    let made = 0;
    const get = perSize((w, h) => ({ w, h, n: ++made }));
    const a = get(10, 10);
    expect(get(10, 10)).toBe(a);
    for (let k = 1; k < SIZES_KEPT; k++) get(20 + k, 20);
    get(10, 10); // used again: now the most recent
    get(99, 99); // one size too many: the least recently used (21 x 20) goes, not 10 x 10
    expect(get(10, 10)).toBe(a);
    const before = made;
    get(21, 20);
    expect(made).toBe(before + 1);
  });
});
