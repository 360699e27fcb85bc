/**
 * Frame types. Pixels live in typed arrays with explicit width, height and channels.
 * RGB is interleaved (R, G, B per pixel), row-major, no padding. Grey is one byte per pixel.
 * Float images carry intermediate results (backgrounds, flow) at full precision.
 */
import { emptyFrame, invalidArgument, sizeMismatch } from '../shared/errors.js';

export interface Frame {
  readonly width: number;
  readonly height: number;
  readonly channels: 1 | 3;
  readonly data: Uint8Array;
}
export interface RgbFrame extends Frame {
  readonly channels: 3;
}
export interface GreyFrame extends Frame {
  readonly channels: 1;
}
export interface FloatImage {
  readonly width: number;
  readonly height: number;
  readonly channels: number;
  readonly data: Float32Array;
}

export function makeRgb(width: number, height: number, data?: Uint8Array): RgbFrame {
  return { width, height, channels: 3, data: data ?? new Uint8Array(width * height * 3) };
}

export function makeGrey(width: number, height: number, data?: Uint8Array): GreyFrame {
  return { width, height, channels: 1, data: data ?? new Uint8Array(width * height) };
}

export function makeFloat(width: number, height: number, channels = 1): FloatImage {
  return { width, height, channels, data: new Float32Array(width * height * channels) };
}

/** Checks that a frame's buffer matches its declared shape. Used at public kernel entries. */
export function checkFrame<T extends Frame | FloatImage>(name: string, frame: T, channels?: number): T {
  if (!frame || typeof frame !== 'object') throw invalidArgument(name, 'a frame', frame);
  const { width, height } = frame;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 0 || height < 0) {
    throw invalidArgument(`${name}.width/height`, 'non-negative integers', `${width}x${height}`);
  }
  if (width === 0 || height === 0) throw emptyFrame(name);
  if (channels !== undefined && frame.channels !== channels) {
    throw sizeMismatch(`${name}.channels`, String(channels), String(frame.channels));
  }
  const expected = width * height * frame.channels;
  if (frame.data.length !== expected) {
    throw sizeMismatch(`${name}.data.length`, `${expected} (${width}x${height}x${frame.channels})`, String(frame.data.length));
  }
  return frame;
}

export function checkSameShape(nameA: string, a: Frame | FloatImage, nameB: string, b: Frame | FloatImage): void {
  if (a.width !== b.width || a.height !== b.height || a.channels !== b.channels) {
    throw sizeMismatch(
      nameB,
      `${a.width}x${a.height}x${a.channels} like ${nameA}`,
      `${b.width}x${b.height}x${b.channels}`,
    );
  }
}

/** Whether this machine stores the lowest byte of a word first (word-at-a-time pixel loops need it). */
export const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;

/** Sizes whose working state is kept at once: a deployment is one camera (one analysis size),
 *  and a scan of several cameras moves from one to the next. */
export const SIZES_KEPT = 4;

/**
 * Memoises per-size working state (transform plans, windows, scratch arrays): a scan runs
 * thousands of frames of one size, and building these per call showed up as allocation and
 * garbage-collection time. The state belongs to the thread that made it (each worker thread
 * loads its own copy of the kernels, so threads never share scratch), and only the SIZES_KEPT
 * sizes used last are kept: a stray resized file does not hold its scratch for the whole scan.
 */
export function perSize<T>(make: (width: number, height: number) => T): (width: number, height: number) => T {
  const cache = new Map<number, T>();
  return (width, height) => {
    const key = width * 65536 + height;
    let v = cache.get(key);
    if (v === undefined) {
      v = make(width, height);
      if (cache.size >= SIZES_KEPT) cache.delete(cache.keys().next().value!);
    } else cache.delete(key); // re-inserted below: the map's order is the order of last use
    cache.set(key, v);
    return v;
  };
}
