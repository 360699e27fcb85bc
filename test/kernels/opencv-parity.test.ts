/**
 * Outside reference: OpenCV 4.5 (npm @techstark/opencv-js). Our pixel kernels must give the
 * same output as cv.absdiff, cv.threshold, cv.morphologyEx, cv.connectedComponentsWithStats,
 * cv.resize(INTER_AREA) and cv.cvtColor(RGB2GRAY), on seeded random images and on the real
 * frames of ../shared/fixtures (SOURCES.md: the MICA camera-trap burst, OpenCV's flow pairs).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { absDiff } from '../../src/kernels/abs-diff.js';
import { labelComponents } from '../../src/kernels/components.js';
import { downscaleArea } from '../../src/kernels/downscale.js';
import { makeGrey, makeRgb, type GreyFrame, type RgbFrame } from '../../src/kernels/frame.js';
import { toLuma } from '../../src/kernels/luma.js';
import { close3x3, dilate3x3, erode3x3, open3x3, openClose3x3 } from '../../src/kernels/morphology.js';
import { thresholdBinary } from '../../src/kernels/threshold.js';
import { maxChannelChange, maxOfChannels } from '../../src/kernels/change-image.js';
import { makeRng } from '../../tools/scenes/random.js';
import { loadOpenCv, matBytes, mismatches, type Cv } from '../helpers/opencv.js';
import { IR_BURST, readRgb } from '../helpers/fixtures.js';

let cv: Cv;
beforeAll(async () => {
  cv = await loadOpenCv();
});

function toMat(f: GreyFrame | RgbFrame): Cv {
  const mat = new cv.Mat(f.height, f.width, f.channels === 3 ? cv.CV_8UC3 : cv.CV_8UC1);
  mat.data.set(f.data);
  return mat;
}

function randomRgb(seed: number, w: number, h: number): RgbFrame {
  const rng = makeRng(seed);
  const f = makeRgb(w, h);
  for (let i = 0; i < f.data.length; i++) f.data[i] = rng.int(0, 255);
  return f;
}

/** Blobby random mask: smoothed noise thresholded, so components have varied shapes. */
function randomMask(seed: number, w: number, h: number, density: number): GreyFrame {
  const rng = makeRng(seed);
  const m = makeGrey(w, h);
  for (let i = 0; i < m.data.length; i++) m.data[i] = rng.chance(density) ? 255 : 0;
  return m;
}

const realPairs: Array<[string, string]> = [
  [IR_BURST[0], IR_BURST[5]],
  ['flow-pairs/rubberwhale1.png', 'flow-pairs/rubberwhale2.png'],
  ['flow-pairs/basketball1.png', 'flow-pairs/basketball2.png'],
];

/** OpenCV's absolute difference of two RGB frames, as bytes. */
function cvAbsdiff(a: RgbFrame, b: RgbFrame): Uint8Array {
  const ma = toMat(a), mb = toMat(b), md = new cv.Mat();
  cv.absdiff(ma, mb, md);
  const out = Uint8Array.from(md.data);
  [ma, mb, md].forEach((m) => m.delete());
  return out;
}

/** The change image OpenCV's absolute difference gives: its channel maximum. */
const cvChange = (a: RgbFrame, b: RgbFrame): Uint8Array => maxOfChannels({ width: a.width, height: a.height, channels: 3, data: cvAbsdiff(a, b) }).data;

describe('absdiff matches cv.absdiff', () => {
  it.each([1, 2, 3])('random seed %i', (seed) => {
    const a = randomRgb(seed, 97, 61);
    const b = randomRgb(seed + 100, 97, 61);
    expect(mismatches(absDiff(a, b).data, cvAbsdiff(a, b))).toBe('identical');
  });
  it.each(realPairs)('real pair %s (and the change image, its channel maximum)', async (fa, fb) => {
    const a = await readRgb(fa, 640);
    const b = await readRgb(fb, 640);
    expect(mismatches(absDiff(a, b).data, cvAbsdiff(a, b))).toBe('identical');
    expect(mismatches(maxChannelChange(a, b).data, cvChange(a, b))).toBe('identical');
  });
});

describe('the change image is the channel maximum of cv.absdiff', () => {
  // maxChannelChange reads four pixels at a time from 32-bit words when both buffers sit on a
  // 4-byte boundary, and byte by byte otherwise (and for the last pixels of an odd count).
  // Either way it must be max(|dR|, |dG|, |dB|) of OpenCV's absolute difference.
  const atOffset = (f: RgbFrame, offset: number): RgbFrame => {
    const buf = new Uint8Array(f.data.length + offset);
    buf.set(f.data, offset);
    return { ...f, data: buf.subarray(offset) };
  };
  it.each([
    [97, 61, 0],
    [97, 61, 1],
    [64, 3, 0],
    [5, 1, 2],
  ])('%i x %i, buffers at byte offset %i', (w, h, offset) => {
    const a = randomRgb(w * 31 + h, w, h);
    const b = randomRgb(w * 31 + h + 1, w, h);
    expect(mismatches(maxChannelChange(atOffset(a, offset), atOffset(b, offset)).data, cvChange(a, b))).toBe('identical');
  });
});

describe('threshold and morphology match OpenCV', () => {
  const ops = [
    ['erode', erode3x3, () => cv.MORPH_ERODE],
    ['dilate', dilate3x3, () => cv.MORPH_DILATE],
    ['open', open3x3, () => cv.MORPH_OPEN],
    ['close', close3x3, () => cv.MORPH_CLOSE],
  ] as const;
  /** Every operation of ours on `img` against cv.morphologyEx with a 3x3 square. */
  function expectSameMorphology(img: GreyFrame): void {
    const src = toMat(img);
    const kernel = cv.Mat.ones(3, 3, cv.CV_8U);
    for (const [, fn, op] of ops) {
      const out = new cv.Mat();
      cv.morphologyEx(src, out, op(), kernel);
      expect(mismatches(fn(img).data, out.data)).toBe('identical');
      out.delete();
    }
    // The fused opening-then-closing against OpenCV's two calls in a row.
    const both = new cv.Mat();
    cv.morphologyEx(src, both, cv.MORPH_OPEN, kernel);
    cv.morphologyEx(both, both, cv.MORPH_CLOSE, kernel);
    expect(mismatches(openClose3x3(img).data, both.data)).toBe('identical');
    [src, kernel, both].forEach((m) => m.delete());
  }
  it.each(realPairs)('on the change image of %s', async (fa, fb) => {
    const change = maxOfChannels(absDiff(await readRgb(fa, 480), await readRgb(fb, 480)));
    for (const t of [0, 12, 40, 254]) {
      const src = toMat(change), dst = new cv.Mat();
      cv.threshold(src, dst, t, 255, cv.THRESH_BINARY);
      const ours = thresholdBinary(change, t);
      expect(mismatches(ours.data, dst.data)).toBe('identical');
      expectSameMorphology(ours);
      [src, dst].forEach((m) => m.delete());
    }
  });
  it.each([0.05, 0.3, 0.5, 0.8])('on random masks of density %f', (density) => {
    expectSameMorphology(randomMask(Math.round(density * 1000), 83, 57, density));
  });
  it('on a grey image (not a mask), whose width would allow the word path', () => {
    const rng = makeRng(5);
    const grey = makeGrey(64, 40);
    for (let i = 0; i < grey.data.length; i++) grey.data[i] = Math.floor(rng.range(0, 256));
    expectSameMorphology(grey);
  });
  // The 3x3 passes treat the first and last row and column apart from the interior: thin
  // images exercise every one of those paths. Widths that are a multiple of 4 take the
  // four-pixels-per-word path, the others the byte path.
  it.each([[1, 9], [9, 1], [2, 7], [7, 2], [3, 3], [1, 1], [4, 1], [4, 9], [8, 2], [84, 57], [256, 3]])('on a %i x %i random mask', (w, h) => {
    expectSameMorphology(randomMask(w * 31 + h, w, h, 0.5));
  });
});

function compareComponents(mask: GreyFrame): void {
  const src = toMat(mask), labels = new cv.Mat(), stats = new cv.Mat(), cents = new cv.Mat();
  const n = cv.connectedComponentsWithStats(src, labels, stats, cents, 8, cv.CV_32S);
  const ours = labelComponents(mask);
  expect(ours.count).toBe(n - 1);
  const theirLabels = Int32Array.from(labels.data32S);
  // Labels may be numbered differently; the partition must be identical (one-to-one mapping).
  const map = new Map<number, number>();
  for (let i = 0; i < theirLabels.length; i++) {
    const a = ours.labels[i], b = theirLabels[i];
    if ((a === 0) !== (b === 0)) throw new Error(`pixel ${i}: ours ${a}, OpenCV ${b}`);
    if (a === 0) continue;
    const m = map.get(a);
    if (m === undefined) map.set(a, b);
    else expect(m).toBe(b);
  }
  expect(new Set(map.values()).size).toBe(map.size);
  const st = stats.data32S, ce = cents.data64F;
  for (const blob of ours.blobs) {
    const k = map.get(blob.label)!;
    expect([blob.x, blob.y, blob.width, blob.height, blob.area]).toEqual(Array.from(st.slice(k * 5, k * 5 + 5)));
    expect(blob.cx).toBeCloseTo(ce[k * 2], 9);
    expect(blob.cy).toBeCloseTo(ce[k * 2 + 1], 9);
  }
  [src, labels, stats, cents].forEach((m) => m.delete());
}

describe('connected components match cv.connectedComponentsWithStats (8-connectivity)', () => {
  it.each([0.1, 0.45, 0.6])('random mask density %f', (d) => compareComponents(randomMask(7 + d * 10, 131, 77, d)));
  it.each(realPairs)('thresholded change of %s', async (fa, fb) => {
    const change = maxOfChannels(absDiff(await readRgb(fa, 480), await readRgb(fb, 480)));
    compareComponents(thresholdBinary(change, 20));
  });
  it('single pixel, full and empty masks', () => {
    const one = makeGrey(5, 4);
    one.data[7] = 255;
    compareComponents(one);
    compareComponents({ ...one, data: new Uint8Array(20).fill(255) });
    compareComponents(makeGrey(5, 4));
  });
});

describe('area downscale and luma match OpenCV', () => {
  it.each([
    [640, 360, 320, 180],
    [2048, 1440, 480, 338],
    [97, 61, 40, 23],
  ])('%ix%i -> %ix%i within one grey level of cv.resize INTER_AREA', async (w, h, ow, oh) => {
    const src = w === 2048 ? await readRgb(IR_BURST[0]) : randomRgb(w, w, h);
    const m = toMat(src), out = new cv.Mat();
    cv.resize(m, out, new cv.Size(ow, oh), 0, 0, cv.INTER_AREA);
    const ref = matBytes(out);
    const ours = downscaleArea(src, ow, oh).data;
    let worst = 0;
    for (let i = 0; i < ref.length; i++) worst = Math.max(worst, Math.abs(ref[i] - ours[i]));
    // OpenCV rounds its fixed-point weights; one level is its own quantisation step.
    expect(worst).toBeLessThanOrEqual(1);
    [m, out].forEach((x) => x.delete());
  });
  it('BT.601 luma within one level of cv.cvtColor(COLOR_RGB2GRAY)', async () => {
    const src = await readRgb('flow-pairs/rubberwhale1.png');
    const m = toMat(src), out = new cv.Mat();
    cv.cvtColor(m, out, cv.COLOR_RGB2GRAY);
    const ref = matBytes(out);
    const ours = toLuma(src).data;
    let worst = 0;
    for (let i = 0; i < ref.length; i++) worst = Math.max(worst, Math.abs(ref[i] - ours[i]));
    expect(worst).toBeLessThanOrEqual(1);
    // ITU-R BT.601 worked values: pure red, green, blue and white.
    const px = makeRgb(4, 1, Uint8Array.from([255, 0, 0, 0, 255, 0, 0, 0, 255, 255, 255, 255]));
    expect(Array.from(toLuma(px).data)).toEqual([76, 150, 29, 255]);
    [m, out].forEach((x) => x.delete());
  });
});
