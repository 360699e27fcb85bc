/**
 * 3x3 binary morphology on uint8 masks (0/255). Pixels outside the image are ignored, which is
 * OpenCV's default border for erode/dilate/morphologyEx (the constant "morphology default
 * border"). Opening removes speckle (rain, sensor noise); closing bridges small gaps inside a
 * subject so that one animal gives one blob.
 */
import { LITTLE_ENDIAN, checkFrame, makeGrey, type GreyFrame } from './frame.js';

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
 * when the frame does not qualify. Int32 rather than Uint32 words: V8 keeps them as small
 * integers, where a word above 2^31 in a Uint32Array becomes a double.
 */
function binaryWords(src: GreyFrame): Int32Array | undefined {
  const d = src.data;
  if (src.width % 4 !== 0 || d.byteOffset % 4 !== 0 || !LITTLE_ENDIAN) return undefined;
  const words = new Int32Array(d.buffer, d.byteOffset, d.length >> 2);
  let bad = 0;
  // A byte is 0 or 255 exactly when its eight bits are equal: v ^ (v << 1) compares each bit
  // with the one below it, and 0xfefefefe drops the comparisons across byte boundaries.
  for (let i = 0; i < words.length; i++) {
    const v = words[i];
    bad |= (v ^ (v << 1)) & 0xfefefefe;
  }
  return bad ? undefined : words;
}
/**
 * One erosion by a (2r+1) x (2r+1) square, r = 1 or 2, on rows of `words` words, from `src`
 * into `dst` through `tmp`; outside the image counts as all ones. `flip` (0 or -1) is XORed
 * into every word read and written: with -1 the pass is a dilation (erosion of the complement,
 * complemented), at no extra pass. For a box-shaped image a 5x5 pass equals two 3x3 passes:
 * every pixel within two steps is reached through an in-image pixel within one.
 */
function erodeWords(src: Int32Array, dst: Int32Array, tmp: Int32Array, words: number, h: number, r: 1 | 2, flip: number): void {
  for (let y = 0; y < h; y++) {
    const row = y * words;
    const end = row + words;
    let prev = -1;
    let c = src[row] ^ flip;
    for (let i = row; i < end; i++) {
      const next = i + 1 < end ? src[i + 1] ^ flip : -1;
      let v = c & ((c << 8) | (prev >>> 24)) & ((c >>> 8) | (next << 24));
      if (r === 2) v &= ((c << 16) | (prev >>> 16)) & ((c >>> 16) | (next << 16));
      tmp[i] = v;
      prev = c;
      c = next;
    }
  }
  // Vertically: rows beyond the image are replaced by the edge row, which the AND holds
  // already (AND is idempotent), so every row takes the same branch-free loop.
  const lastRow = h - 1;
  for (let y = 0; y < h; y++) {
    const a = Math.max(0, y - 1) * words;
    const b = y * words;
    const c = Math.min(lastRow, y + 1) * words;
    if (r === 1) {
      for (let x = 0; x < words; x++) dst[b + x] = (tmp[a + x] & tmp[b + x] & tmp[c + x]) ^ flip;
    } else {
      const a2 = Math.max(0, y - 2) * words;
      const c2 = Math.min(lastRow, y + 2) * words;
      for (let x = 0; x < words; x++) dst[b + x] = (tmp[a2 + x] & tmp[a + x] & tmp[b + x] & tmp[c + x] & tmp[c2 + x]) ^ flip;
    }
  }
}

/** A pass: erode (true) or dilate (false), and its radius. */
type Pass = readonly [erode: boolean, radius: 1 | 2];

/** Bitwise complement into a new array (for a byte, ~v stores as 255 - v). */
function complement(d: Uint8Array): Uint8Array {
  const out = d.slice();
  for (let i = 0; i < out.length; i++) out[i] = ~out[i];
  return out;
}

/** Byte path (grey images, odd widths): radius-1 passes only; a dilation erodes the complement. */
function bytePasses(src: GreyFrame, ops: readonly Pass[]): Uint8Array {
  let d = src.data;
  for (const [isErode, r] of ops) {
    for (let k = 0; k < r; k++) d = isErode ? erodeBytes(d, src.width, src.height) : complement(erodeBytes(complement(d), src.width, src.height));
  }
  return d === src.data ? d.slice() : d;
}

function passes(src: GreyFrame, ops: readonly Pass[]): GreyFrame {
  checkFrame('src', src, 1);
  const { width: w, height: h } = src;
  const words = binaryWords(src);
  if (!words) return makeGrey(w, h, bytePasses(src, ops));
  const n = words.length;
  const tmp = new Int32Array(n);
  let a = new Int32Array(n);
  let b = ops.length > 1 ? new Int32Array(n) : a;
  let from = words;
  for (const [isErode, r] of ops) {
    erodeWords(from, a, tmp, w >> 2, h, r, isErode ? 0 : -1);
    from = a;
    [a, b] = [b, a];
  }
  return makeGrey(w, h, new Uint8Array(from.buffer, 0, src.data.length));
}

export function erode3x3(src: GreyFrame): GreyFrame {
  return passes(src, [[true, 1]]);
}
export function dilate3x3(src: GreyFrame): GreyFrame {
  return passes(src, [[false, 1]]);
}
export function open3x3(src: GreyFrame): GreyFrame {
  return passes(src, [[true, 1], [false, 1]]);
}
export function close3x3(src: GreyFrame): GreyFrame {
  return passes(src, [[false, 1], [true, 1]]);
}
/**
 * close3x3(open3x3(src)) in three passes instead of four: the two dilations in the middle are one
 * 5x5 dilation.
 */
export function openClose3x3(src: GreyFrame): GreyFrame {
  return passes(src, [[true, 1], [false, 2], [true, 1]]);
}
