/**
 * Kernel benchmark: our per-frame chain and our flow side by side with the same operations in
 * OpenCV.js (npm @techstark/opencv-js, WASM), on the same frames, in one run, interleaved so a
 * noisy shared machine hits both alike. Prints median times and ratios (ours / OpenCV).
 * Run: npm run bench:kernels
 *
 * The chain is timed per frame of a burst: each side transforms the reference frame's
 * correlation window once per burst, outside the timed work, as analyseEvent does. Both sides
 * convert only that window to grey for the alignment. OpenCV's side has no robust gain fit
 * (mean and deviation stand in) and no sub-pixel peak; ours does both, so its chain does more.
 * The alignment's share is also timed apart on both sides ("align ratio"; "rest ratio" is the
 * chain without it). On these frames the subject pulls our correlation peak 25 px, so ours takes
 * its second pass (a window moved to the integer shift: one more forward transform) as well as
 * the sub-pixel refinement; OpenCV's side does one pass to the integer peak. "still ratio" is
 * the chain on a pair where nothing moves (an empty trigger of the same camera, the common case
 * of a burst), where our alignment takes one pass.
 *
 * The flow is timed two ways. Per pair: both sides expand both frames and solve, like for like.
 * Per burst frame: what a burst's consecutive pairs cost per frame, where ours expands each
 * frame once and reuses it as either side of its two pairs (flowPyramid, farnebackFlowPrepared),
 * while OpenCV.js's calcOpticalFlowFarneback expands both frames on every call.
 */
import { createRequire } from 'node:module';
import { maxChannelChange } from '../src/kernels/change-image.js';
import { labelComponents } from '../src/kernels/components.js';
import { farnebackFlow, farnebackFlowPrepared, flowPyramid, DEFAULT_FLOW } from '../src/kernels/flow/farneback.js';
import type { RgbFrame } from '../src/kernels/frame.js';
import { toLuma } from '../src/kernels/luma.js';
import { openClose3x3 } from '../src/kernels/morphology.js';
import { estimateShift, shiftReference, type ShiftReference } from '../src/kernels/phase-correlate.js';
import { applyGainOffset, fitGainOffset } from '../src/kernels/photometric.js';
import { thresholdBinary } from '../src/kernels/threshold.js';
import { Category } from './scenes/categories.js';
import { renderScene } from './scenes/render.js';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
type Cv = any;
async function loadCv(): Promise<Cv> {
  const cv = createRequire(import.meta.url)('@techstark/opencv-js');
  if (!cv.Mat) await new Promise<void>((r) => (cv.onRuntimeInitialized = () => r()));
  // The module is a thenable resolving to itself; returning it from an async function would
  // never settle, so drop its then() first.
  delete cv.then;
  return cv;
}

function median(v: number[]): number {
  const s = [...v].sort((a, b) => a - b);
  return s[s.length >> 1];
}

/** Our chain; the alignment's share of it is added to `align` (milliseconds). */
function oursChain(a: RgbFrame, aShift: ShiftReference, b: RgbFrame, align: number[]): number {
  const go = fitGainOffset(a, b);
  const nb = applyGainOffset(b, go);
  // Luma on the correlation window only (estimateShift takes RGB); OpenCV's side converts the
  // same window to grey.
  const t0 = performance.now();
  estimateShift(aShift, nb);
  align.push(performance.now() - t0);
  // The change image as the screener computes it: absolute difference and channel maximum in one
  // pass (OpenCV's side: absdiff, then cvtColor to grey).
  const change = maxChannelChange(a, nb);
  // Opening then closing, as the screener does it (fused: one 5x5 dilation in the middle).
  const mask = openClose3x3(thresholdBinary(change, 20));
  return labelComponents(mask, change).count;
}

/** The reference frame's windowed transform, made once per burst on OpenCV's side too. */
function cvShiftReference(cv: Cv, a: Cv, win: Cv, w: number, h: number): Cv {
  const ra = a.roi(new cv.Rect((w - 128) >> 1, (h - 128) >> 1, 128, 128));
  const ga = new cv.Mat(), fa = new cv.Mat(), Fa = new cv.Mat();
  cv.cvtColor(ra, ga, cv.COLOR_RGB2GRAY);
  ga.convertTo(fa, cv.CV_32F);
  cv.multiply(fa, win, fa);
  cv.dft(fa, Fa, cv.DFT_COMPLEX_OUTPUT);
  [ra, ga, fa].forEach((x) => x.delete());
  return Fa;
}

function cvChain(cv: Cv, a: Cv, Fa: Cv, win: Cv, b: Cv, w: number, h: number, align: number[]): number {
  // Normalise: mean/std per channel give a gain and offset, applied with convertScaleAbs.
  const ma = new cv.Mat(), sa = new cv.Mat(), mb = new cv.Mat(), sb = new cv.Mat();
  cv.meanStdDev(a, ma, sa);
  cv.meanStdDev(b, mb, sb);
  const gain = sa.data64F[0] / Math.max(1e-6, sb.data64F[0]);
  const nb = new cv.Mat();
  cv.convertScaleAbs(b, nb, gain, ma.data64F[0] - gain * mb.data64F[0]);
  // Align: phase correlation from cv.dft on a 128x128 Hann-windowed float crop.
  const t0 = performance.now();
  const rb = nb.roi(new cv.Rect((w - 128) >> 1, (h - 128) >> 1, 128, 128));
  const gb = new cv.Mat(), fb = new cv.Mat();
  cv.cvtColor(rb, gb, cv.COLOR_RGB2GRAY);
  gb.convertTo(fb, cv.CV_32F);
  cv.multiply(fb, win, fb);
  const Fb = new cv.Mat(), P = new cv.Mat(), C = new cv.Mat();
  cv.dft(fb, Fb, cv.DFT_COMPLEX_OUTPUT);
  // This OpenCV.js build has no mulSpectrums: the normalised cross-power product is done in JS.
  const A = Fa.data32F, B = Fb.data32F;
  P.create(128, 128, cv.CV_32FC2);
  const Q = P.data32F;
  for (let i = 0; i < Q.length; i += 2) {
    const re = B[i] * A[i] + B[i + 1] * A[i + 1];
    const im = B[i + 1] * A[i] - B[i] * A[i + 1];
    const m = Math.sqrt(re * re + im * im) + 1e-9;
    Q[i] = re / m;
    Q[i + 1] = im / m;
  }
  cv.dft(P, C, cv.DFT_INVERSE | cv.DFT_REAL_OUTPUT | cv.DFT_SCALE);
  cv.minMaxLoc(C);
  align.push(performance.now() - t0);
  // Difference, threshold, morphology, components.
  const d3 = new cv.Mat(), d = new cv.Mat(), m = new cv.Mat(), k = cv.Mat.ones(3, 3, cv.CV_8U);
  cv.absdiff(a, nb, d3);
  cv.cvtColor(d3, d, cv.COLOR_RGB2GRAY);
  cv.threshold(d, m, 20, 255, cv.THRESH_BINARY);
  cv.morphologyEx(m, m, cv.MORPH_OPEN, k);
  cv.morphologyEx(m, m, cv.MORPH_CLOSE, k);
  const labels = new cv.Mat(), stats = new cv.Mat(), cents = new cv.Mat();
  const n = cv.connectedComponentsWithStats(m, labels, stats, cents, 8, cv.CV_32S);
  [ma, sa, mb, sb, nb, rb, gb, fb, Fb, P, C, d3, d, m, k, labels, stats, cents].forEach((x) => x.delete());
  return n - 1;
}

/** A 128x128 Hann window (this OpenCV.js build has no createHanningWindow), made once like ours. */
function hann(cv: Cv): Cv {
  const v = new Float32Array(128 * 128);
  for (let y = 0; y < 128; y++) for (let x = 0; x < 128; x++) v[y * 128 + x] = (0.5 - 0.5 * Math.cos((2 * Math.PI * (x + 0.5)) / 128)) * (0.5 - 0.5 * Math.cos((2 * Math.PI * (y + 0.5)) / 128));
  return cv.matFromArray(128, 128, cv.CV_32F, v);
}

function toMat(cv: Cv, f: RgbFrame): Cv {
  const m = new cv.Mat(f.height, f.width, cv.CV_8UC3);
  m.data.set(f.data);
  return m;
}

async function main(): Promise<void> {
  const cv = await loadCv();
  const reps = Number(process.env.BENCH_REPS ?? 30);
  console.log(`OpenCV.js ${cv.getBuildInformation().match(/General configuration for OpenCV ([^\s=]+)/)?.[1] ?? ''}; ${reps} rounds each, interleaved; medians in ms`);
  const rows: Array<Record<string, string>> = [];
  for (const [w, h] of [[320, 180], [640, 360]]) {
    const s = renderScene({ seed: 77, category: Category.animalCrossing, width: w, height: h, frames: 2 });
    const [a, b] = s.frames;
    const ca = toMat(cv, a), cb = toMat(cv, b);
    const la = toLuma(a), lb = toLuma(b);
    // Per frame of a burst: both sides transform the reference frame's window once per burst,
    // outside the timed work (as analyseEvent does).
    const aShift = shiftReference(a);
    const cvWin = hann(cv);
    const cvFa = cvShiftReference(cv, ca, cvWin, w, h);
    const ga = new cv.Mat(h, w, cv.CV_8UC1), gb = new cv.Mat(h, w, cv.CV_8UC1);
    ga.data.set(la.data);
    gb.data.set(lb.data);
    // A pair where nothing moves, for the chain's common case.
    const [sa, sb] = renderScene({ seed: 78, category: Category.empty, width: w, height: h, frames: 2 }).frames;
    const csa = toMat(cv, sa), csb = toMat(cv, sb);
    const saShift = shiftReference(sa);
    const csFa = cvShiftReference(cv, csa, cvWin, w, h);
    const t = { oursStill: [] as number[], cvStill: [] as number[], ours: [] as number[], cv: [] as number[], oursAlign: [] as number[], cvAlign: [] as number[], oursFlow: [] as number[], oursBurst: [] as number[], cvFlow: [] as number[] };
    // Warm both up first: a scan runs these thousands of times, so steady state is what counts
    // (V8 optimises our code after a few runs; OpenCV's WASM is compiled ahead of time).
    const scratch: number[] = [];
    for (let r = 0; r < 30; r++) {
      oursChain(a, aShift, b, scratch);
      cvChain(cv, ca, cvFa, cvWin, cb, w, h, scratch);
      oursChain(sa, saShift, sb, scratch);
      cvChain(cv, csa, csFa, cvWin, csb, w, h, scratch);
    }
    for (let r = 0; r < 10; r++) {
      farnebackFlow(la, lb);
    }
    for (let r = 0; r < reps; r++) {
      let t0 = performance.now();
      oursChain(a, aShift, b, t.oursAlign);
      t.ours.push(performance.now() - t0);
      t0 = performance.now();
      cvChain(cv, ca, cvFa, cvWin, cb, w, h, t.cvAlign);
      t.cv.push(performance.now() - t0);
      t0 = performance.now();
      oursChain(sa, saShift, sb, scratch);
      t.oursStill.push(performance.now() - t0);
      t0 = performance.now();
      cvChain(cv, csa, csFa, cvWin, csb, w, h, scratch);
      t.cvStill.push(performance.now() - t0);
      if (r < Math.max(3, reps / 3)) {
        t0 = performance.now();
        farnebackFlow(la, lb);
        t.oursFlow.push(performance.now() - t0);
        const pa = flowPyramid(la);
        t0 = performance.now();
        farnebackFlowPrepared(pa, flowPyramid(lb));
        t.oursBurst.push(performance.now() - t0);
        const flow = new cv.Mat();
        const p = DEFAULT_FLOW;
        t0 = performance.now();
        cv.calcOpticalFlowFarneback(ga, gb, flow, p.pyrScale, p.levels, p.winSize, p.iterations, p.polyN, p.polySigma, 0);
        t.cvFlow.push(performance.now() - t0);
        flow.delete();
      }
    }
    const m = Object.fromEntries(Object.entries(t).map(([k, v]) => [k, median(v)])) as Record<keyof typeof t, number>;
    rows.push({
      size: `${w}x${h}`,
      'chain ours': m.ours.toFixed(2),
      'chain OpenCV': m.cv.toFixed(2),
      'chain ratio': (m.ours / m.cv).toFixed(2),
      'align ratio': (m.oursAlign / m.cvAlign).toFixed(2),
      'rest ratio': ((m.ours - m.oursAlign) / (m.cv - m.cvAlign)).toFixed(2),
      'still ratio': (m.oursStill / m.cvStill).toFixed(2),
      'flow ours': m.oursFlow.toFixed(1),
      'flow OpenCV': m.cvFlow.toFixed(1),
      'flow ratio': (m.oursFlow / m.cvFlow).toFixed(2),
      'flow ours per burst frame': m.oursBurst.toFixed(1),
      'burst frame ratio': (m.oursBurst / m.cvFlow).toFixed(2),
    });
    [ca, cb, ga, gb, cvFa, cvWin, csa, csb, csFa].forEach((x) => x.delete());
  }
  console.table(rows);
}

await main();
