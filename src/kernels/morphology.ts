/**
 * 3x3 binary morphology on uint8 masks (0/255). Pixels outside the image are ignored, which is
 * OpenCV's default border for erode/dilate/morphologyEx (the constant "morphology default
 * border"). Opening removes speckle (rain, sensor noise); closing bridges small gaps inside a
 * subject so that one animal gives one blob.
 */
import { checkFrame, makeGrey, type GreyFrame } from './frame.js';

/** Branch-free minimum of two bytes (sign mask of the difference). */
function min(a: number, b: number): number {
  const k = a - b;
  return b + (k & (k >> 31));
}

// Only erosion is written out: dilation is erosion of the complement, complemented
// (max(a, b) = 255 - min(255 - a, 255 - b), and "outside the image is ignored" maps to itself).
// Separable: a 3x3 square is a 1x3 then a 3x1 minimum. Borders apart from the interior, so the
// inner loops have no branches on the position or the data (masks flip unpredictably at edges).
function erodeBytes(src: Uint8Array, w: number, h: number): Uint8Array {
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    if (w === 1) {
      tmp[r] = src[r];
      continue;
    }
    tmp[r] = min(src[r], src[r + 1]);
    for (let x = r + 1, end = r + w - 1; x < end; x++) tmp[x] = min(min(src[x - 1], src[x]), src[x + 1]);
    const e = r + w - 1;
    tmp[e] = min(src[e], src[e - 1]);
  }
  if (h === 1) return tmp;
  const out = new Uint8Array(w * h);
  const last = (h - 1) * w;
  for (let x = 0; x < w; x++) out[x] = min(tmp[x], tmp[x + w]);
  for (let i = w; i < last; i++) out[i] = min(min(tmp[i - w], tmp[i]), tmp[i + w]);
  for (let i = last; i < last + w; i++) out[i] = min(tmp[i], tmp[i - w]);
  return out;
}

/**
 * Masks of 0/255 bytes whose rows are whole 32-bit words: four pixels per operation. For such
 * bytes the minimum is a bitwise AND, so shifted words give the left and right neighbours of all
 * four pixels at once (little-endian: the byte at the lowest address is the lowest byte of the
 * word). Same result as the byte passes, about four times fewer operations. Returns undefined
 * when the frame does not qualify.
 */
function binaryWords(src: GreyFrame): Uint32Array | undefined {
  const d = src.data;
  if (src.width % 4 !== 0 || d.byteOffset % 4 !== 0 || !LITTLE_ENDIAN) return undefined;
  let bad = 0;
  // (v + 1) & 0xfe is 0 exactly for v = 0 and v = 255.
  for (let i = 0; i < d.length; i++) bad |= (d[i] + 1) & 0xfe;
  return bad ? undefined : new Uint32Array(d.buffer, d.byteOffset, d.length >> 2);
}
const LITTLE_ENDIAN = new Uint8Array(Uint32Array.of(1).buffer)[0] === 1;

/** One 3x3 erosion (AND) on rows of `words` words; outside the image counts as all ones. */
function erodeWords(src: Uint32Array, words: number, h: number): Uint32Array {
  const tmp = new Uint32Array(src.length);
  for (let y = 0; y < h; y++) {
    const r = y * words;
    for (let i = 0; i < words; i++) {
      const c = src[r + i];
      const prev = i > 0 ? src[r + i - 1] : 0xffffffff;
      const next = i < words - 1 ? src[r + i + 1] : 0xffffffff;
      tmp[r + i] = c & ((c << 8) | (prev >>> 24)) & ((c >>> 8) | (next << 24));
    }
  }
  if (h === 1) return tmp;
  const out = new Uint32Array(src.length);
  const last = (h - 1) * words;
  for (let i = 0; i < words; i++) out[i] = tmp[i] & tmp[i + words];
  for (let i = words; i < last; i++) out[i] = tmp[i - words] & tmp[i] & tmp[i + words];
  for (let i = last; i < last + words; i++) out[i] = tmp[i] & tmp[i - words];
  return out;
}

/** Bitwise complement into a new array (for a byte, ~v stores as 255 - v). */
function complement<T extends Uint8Array | Uint32Array>(d: T): T {
  const out = d.slice() as T;
  for (let i = 0; i < out.length; i++) out[i] = ~out[i];
  return out;
}

/**
 * Applies a sequence of passes (true = erode, false = dilate), on words when the mask allows it.
 * A dilation erodes the complement: the data is complemented whenever the kind of pass changes,
 * and once more at the end if it was left complemented.
 */
function passes(src: GreyFrame, ops: readonly boolean[]): GreyFrame {
  checkFrame('src', src, 1);
  const { width: w, height: h } = src;
  const words = binaryWords(src);
  let d: Uint8Array | Uint32Array = words ?? src.data;
  let flipped = false;
  for (const isErode of ops) {
    if (isErode === flipped) {
      d = complement(d);
      flipped = !flipped;
    }
    d = d instanceof Uint32Array ? erodeWords(d, w >> 2, h) : erodeBytes(d, w, h);
  }
  if (flipped) d = complement(d);
  return makeGrey(w, h, d instanceof Uint32Array ? new Uint8Array(d.buffer, d.byteOffset, src.data.length) : d);
}

export function erode3x3(src: GreyFrame): GreyFrame {
  return passes(src, [true]);
}
export function dilate3x3(src: GreyFrame): GreyFrame {
  return passes(src, [false]);
}
export function open3x3(src: GreyFrame): GreyFrame {
  return passes(src, [true, false]);
}
export function close3x3(src: GreyFrame): GreyFrame {
  return passes(src, [false, true]);
}
