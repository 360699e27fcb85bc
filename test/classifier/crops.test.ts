/**
 * The classifier's crops (src/classifier/crops.ts) on a burst the engine analysed: a dark disc
 * crossing a textured field. Outside reference: OpenCV's resize with INTER_LINEAR (npm
 * @techstark/opencv-js) of the crop's square, on float images, which maps output pixel centres
 * into the source as crops.ts does ((i + 0.5) * scale - 0.5; OpenCV's resize documentation and
 * source); the contrast scaling is then applied from its definition in crops.ts.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { analyseEvent, type EventAnalysis } from '../../src/kernels/analyse-event.js';
import { changeCrops, CLIP, CONTRAST_FLOOR, CROP_CHANNELS, cropTargets, type CropTarget } from '../../src/classifier/crops.js';
import { makeRgb, type RgbFrame } from '../../src/kernels/frame.js';
import { MOTION_MODEL } from '../../src/kernels/model.js';
import { scoreEvent } from '../../src/kernels/score.js';
import { makeRng } from '../../tools/scenes/random.js';
import { bumpField } from '../../tools/scenes/texture.js';
import { loadOpenCv, type Cv } from '../helpers/opencv.js';

const W = 200, H = 120;
let cv: Cv;
let a: EventAnalysis;
beforeAll(async () => {
  cv = await loadOpenCv();
  const rng = makeRng(8);
  const fields = [0, 1, 2].map(() => bumpField(rng, W, H, 400, 1.5, 5));
  const frames: RgbFrame[] = [0, 1, 2].map((k) => {
    const f = makeRgb(W, H);
    for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
      const disc = Math.hypot(x - (50 + 40 * k), y - 60) < 9;
      for (let c = 0; c < 3; c++) f.data[(y * W + x) * 3 + c] = Math.max(0, Math.min(255, Math.round(disc ? 30 + 20 * c : 128 + 300 * (fields[c](x, y) - 0.5) + 2 * rng.normal())));
    }
    return f;
  });
  a = analyseEvent({ frames });
});

/** A float Mat of a frame's square [x0, x0 + side) resized by OpenCV to size x size. */
function cvCrop(f: RgbFrame | Float32Array, x0: number, y0: number, side: number, size: number): Float32Array {
  const data = f instanceof Float32Array ? f : Float32Array.from((f as RgbFrame).data);
  const src = cv.matFromArray(H, W, cv.CV_32FC3, Array.from(data));
  const roi = src.roi(new cv.Rect(x0, y0, side, side));
  const dst = new cv.Mat();
  cv.resize(roi, dst, new cv.Size(size, size), 0, 0, cv.INTER_LINEAR);
  const out = Float32Array.from(dst.data32F);
  [src, roi, dst].forEach((m) => m.delete());
  return out;
}

describe('crops of an analysed burst', () => {
  it('pick the best-scored tracks at their largest blob', () => {
    const s = scoreEvent(MOTION_MODEL, a);
    expect(a.tracks.length).toBeGreaterThanOrEqual(1);
    const t = cropTargets(a, s.trackScores, 2);
    expect(t[0].track).toBe(s.bestTrack);
    const best = a.tracks[s.bestTrack].points;
    expect(t[0].blob.area).toBe(Math.max(...best.map((p) => p.blob.area)));
    expect(() => cropTargets(a, [0.5, ...s.trackScores], 1)).toThrow(/trackScores/);
  });

  it('planes equal OpenCV’s resize of the frame, of frame minus plate and of frame minus the next frame, scaled by the crop’s contrast', () => {
    // A box on frame 1's disc (centre 90, 60) whose square lies inside the frame at whole pixels: side 40 at (70, 40).
    const target: CropTarget = { track: 0, frame: 1, blob: { ...a.frames[1].blobs[0], x: 80, y: 50, width: 20, height: 20 } };
    const size = 24;
    const got = changeCrops(a, [target], size);
    expect(got).toHaveLength(CROP_CHANNELS.length * size * size);
    const frame = a.planes.work[1];
    const rgb = cvCrop(frame, 70, 40, 40, size);
    const diff = (b: RgbFrame) => Float32Array.from(frame.data, (v, i) => v - b.data[i]);
    const plate = cvCrop(diff(a.planes.median!), 70, 40, 40, size);
    const step = cvCrop(diff(a.planes.work[2]), 70, 40, 40, size);
    const px = size * size;
    const mean = [0, 1, 2].map((c) => rgb.filter((_, i) => i % 3 === c).reduce((s, v) => s + v, 0) / px);
    const all = Array.from(rgb);
    const mu = all.reduce((s, v) => s + v, 0) / all.length;
    const sd = Math.sqrt(all.reduce((s, v) => s + (v - mu) ** 2, 0) / all.length);
    const k = 1 / (sd + CONTRAST_FLOOR);
    const clip = (v: number) => Math.max(-CLIP, Math.min(CLIP, v));
    let worst = 0;
    for (let o = 0; o < px; o++) for (let c = 0; c < 3; c++) {
      worst = Math.max(worst,
        Math.abs(got[c * px + o] - clip(plate[o * 3 + c] * k)),
        Math.abs(got[(3 + c) * px + o] - clip(step[o * 3 + c] * k)),
        Math.abs(got[(6 + c) * px + o] - clip((rgb[o * 3 + c] - mean[c]) * k)));
    }
    expect(worst).toBeLessThan(1e-3);
    // The disc shows as change against the plate, and the field around it does not.
    const centre = (size >> 1) * size + (size >> 1);
    expect(Math.abs(got[centre])).toBeGreaterThan(1);
    expect(Math.abs(got[0])).toBeLessThan(0.3);
  });

  it('a single image has no step planes, and without a plate no plate planes', () => {
    const one = analyseEvent({ frames: [a.planes.work[0]] });
    const t: CropTarget = { track: 0, frame: 0, blob: { ...a.frames[0].blobs[0] } };
    const got = changeCrops(one, [t], 16);
    const px = 256;
    expect(got.subarray(0, 6 * px).every((v) => v === 0)).toBe(true);
    expect(got.subarray(6 * px).some((v) => v !== 0)).toBe(true);
  });

  it('refuses a bad size or frame', () => {
    const t: CropTarget = { track: 0, frame: 5, blob: { ...a.frames[0].blobs[0] } };
    expect(() => changeCrops(a, [t], 16)).toThrow(/targets.frame/);
    expect(() => changeCrops(a, [], 2)).toThrow(/size/);
  });
});
