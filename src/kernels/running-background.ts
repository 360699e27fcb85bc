/**
 * Running background for video: an exponential moving average whose memory is given in seconds,
 * so the same setting means the same thing at any analysis rate. For a frame dt seconds after the
 * previous one, alpha = 1 - exp(-dt / tau): the background forgets a change with time constant tau.
 * Output type: float32 per channel (uint8 would stall at small alpha through rounding).
 */
import { checkNumber, checkPositive } from '../shared/validate.js';
import { checkFrame, type FloatImage, type Frame } from './frame.js';
import { sizeMismatch } from '../shared/errors.js';

export function startBackground(frame: Frame): FloatImage {
  checkFrame('frame', frame);
  return { width: frame.width, height: frame.height, channels: frame.channels, data: Float32Array.from(frame.data) };
}

export function learningRate(dtSeconds: number, tauSeconds: number): number {
  checkNumber('dtSeconds', dtSeconds, 0, 1e6);
  checkPositive('tauSeconds', tauSeconds);
  return 1 - Math.exp(-dtSeconds / tauSeconds);
}

/** Update `bg` in place towards `frame`. Pixels where `freeze` is nonzero keep their value
 *  (so a subject that stops is not learned into the background while it is being tracked). */
export function updateBackground(bg: FloatImage, frame: Frame, alpha: number, freeze?: Uint8Array): void {
  checkFrame('frame', frame);
  checkNumber('alpha', alpha, 0, 1);
  if (bg.data.length !== frame.data.length) throw sizeMismatch('bg', `${frame.data.length} values`, String(bg.data.length));
  const b = bg.data;
  const f = frame.data;
  const ch = frame.channels;
  for (let i = 0; i < b.length; i++) {
    if (freeze && freeze[(i / ch) | 0]) continue;
    b[i] += alpha * (f[i] - b[i]);
  }
}

export function backgroundToFrame<T extends Frame>(bg: FloatImage, like: T): T {
  const out = new Uint8Array(bg.data.length);
  for (let i = 0; i < out.length; i++) out[i] = Math.round(bg.data[i]);
  return { ...like, data: out };
}
