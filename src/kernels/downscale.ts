/**
 * Area (box) downscale: each output pixel is the mean of the input area it covers, with
 * fractional weights at the edges. This is the anti-aliased reduction OpenCV calls INTER_AREA;
 * it keeps sensor noise statistics honest at the analysis size (point sampling would alias
 * foliage texture into false motion).
 */
import { invalidArgument } from '../shared/errors.js';
import { checkInteger } from '../shared/validate.js';
import { checkFrame, type Frame } from './frame.js';

interface Taps {
  start: Int32Array;
  count: Int32Array;
  weights: Float64Array;
  stride: number;
}

function buildTaps(inSize: number, outSize: number): Taps {
  const scale = inSize / outSize;
  const stride = Math.ceil(scale) + 1;
  const start = new Int32Array(outSize);
  const count = new Int32Array(outSize);
  const weights = new Float64Array(outSize * stride);
  for (let o = 0; o < outSize; o++) {
    const a = o * scale;
    const b = Math.min(inSize, a + scale);
    let n = 0;
    for (let i = Math.floor(a); i < b && n < stride; i++) {
      const w = Math.min(b, i + 1) - Math.max(a, i);
      if (w <= 1e-9) continue;
      if (n === 0) start[o] = i;
      weights[o * stride + n++] = w / scale;
    }
    count[o] = n;
  }
  return { start, count, weights, stride };
}

/** Downscale `frame` to outWidth x outHeight by area averaging. Upscaling is refused. */
export function downscaleArea<T extends Frame>(frame: T, outWidth: number, outHeight: number): T {
  checkFrame('frame', frame);
  checkInteger('outWidth', outWidth, 1, frame.width);
  checkInteger('outHeight', outHeight, 1, frame.height);
  const { width, height, channels } = frame;
  if (outWidth === width && outHeight === height) return { ...frame, data: frame.data.slice() };
  const tx = buildTaps(width, outWidth);
  const ty = buildTaps(height, outHeight);
  // Horizontal pass into a float buffer, then vertical pass with rounding.
  const mid = new Float64Array(outWidth * height * channels);
  const src = frame.data;
  for (let y = 0; y < height; y++) {
    const row = y * width * channels;
    for (let ox = 0; ox < outWidth; ox++) {
      const s = tx.start[ox];
      const n = tx.count[ox];
      const wOff = ox * tx.stride;
      for (let c = 0; c < channels; c++) {
        let acc = 0;
        for (let k = 0; k < n; k++) acc += tx.weights[wOff + k] * src[row + (s + k) * channels + c];
        mid[(y * outWidth + ox) * channels + c] = acc;
      }
    }
  }
  const out = new Uint8Array(outWidth * outHeight * channels);
  const rowLen = outWidth * channels;
  for (let oy = 0; oy < outHeight; oy++) {
    const s = ty.start[oy];
    const n = ty.count[oy];
    const wOff = oy * ty.stride;
    for (let i = 0; i < rowLen; i++) {
      let acc = 0;
      for (let k = 0; k < n; k++) acc += ty.weights[wOff + k] * mid[(s + k) * rowLen + i];
      out[oy * rowLen + i] = Math.min(255, Math.round(acc));
    }
  }
  return { ...frame, width: outWidth, height: outHeight, data: out };
}

/** The analysis size for a source of width x height at a target width, keeping aspect ratio. */
export function analysisSize(width: number, height: number, targetWidth: number): { width: number; height: number } {
  checkInteger('width', width, 1, 1 << 16);
  checkInteger('height', height, 1, 1 << 16);
  checkInteger('targetWidth', targetWidth, 16, 1 << 16);
  if (width <= targetWidth) return { width, height };
  const h = Math.max(1, Math.round((height * targetWidth) / width));
  if (!Number.isFinite(h)) throw invalidArgument('height', 'finite', h);
  return { width: targetWidth, height: h };
}
