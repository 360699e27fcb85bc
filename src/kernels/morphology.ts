/**
 * 3x3 binary morphology on uint8 masks (0/255). Pixels outside the image are ignored, which is
 * OpenCV's default border for erode/dilate/morphologyEx (the constant "morphology default
 * border"). Opening removes speckle (rain, sensor noise); closing bridges small gaps inside a
 * subject so that one animal gives one blob.
 */
import { checkFrame, makeGrey, type GreyFrame } from './frame.js';

/** Branch-free minimum and maximum of two bytes (sign mask of the difference). */
function min(a: number, b: number): number {
  const k = a - b;
  return b + (k & (k >> 31));
}
function max(a: number, b: number): number {
  const k = a - b;
  return a - (k & (k >> 31));
}

// Separable: a 3x3 square is a 1x3 then a 3x1 min (erode) or max (dilate). Written out once per
// operation, borders apart from the interior, so the inner loops have no branches on the
// operation, the position or the data (masks flip unpredictably at blob edges).
function erodePass(src: GreyFrame): GreyFrame {
  const { width: w, height: h } = src;
  const s = src.data;
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    if (w === 1) {
      tmp[r] = s[r];
      continue;
    }
    tmp[r] = s[r] < s[r + 1] ? s[r] : s[r + 1];
    for (let x = r + 1, end = r + w - 1; x < end; x++) {
      tmp[x] = min(min(s[x - 1], s[x]), s[x + 1]);
    }
    const e = r + w - 1;
    tmp[e] = s[e] < s[e - 1] ? s[e] : s[e - 1];
  }
  const out = makeGrey(w, h);
  const d = out.data;
  if (h === 1) {
    d.set(tmp);
    return out;
  }
  for (let x = 0; x < w; x++) d[x] = tmp[x] < tmp[x + w] ? tmp[x] : tmp[x + w];
  for (let i = w, end = (h - 1) * w; i < end; i++) {
    d[i] = min(min(tmp[i - w], tmp[i]), tmp[i + w]);
  }
  for (let i = (h - 1) * w; i < h * w; i++) d[i] = tmp[i] < tmp[i - w] ? tmp[i] : tmp[i - w];
  return out;
}

function dilatePass(src: GreyFrame): GreyFrame {
  const { width: w, height: h } = src;
  const s = src.data;
  const tmp = new Uint8Array(w * h);
  for (let y = 0; y < h; y++) {
    const r = y * w;
    if (w === 1) {
      tmp[r] = s[r];
      continue;
    }
    tmp[r] = s[r] > s[r + 1] ? s[r] : s[r + 1];
    for (let x = r + 1, end = r + w - 1; x < end; x++) {
      tmp[x] = max(max(s[x - 1], s[x]), s[x + 1]);
    }
    const e = r + w - 1;
    tmp[e] = s[e] > s[e - 1] ? s[e] : s[e - 1];
  }
  const out = makeGrey(w, h);
  const d = out.data;
  if (h === 1) {
    d.set(tmp);
    return out;
  }
  for (let x = 0; x < w; x++) d[x] = tmp[x] > tmp[x + w] ? tmp[x] : tmp[x + w];
  for (let i = w, end = (h - 1) * w; i < end; i++) {
    d[i] = max(max(tmp[i - w], tmp[i]), tmp[i + w]);
  }
  for (let i = (h - 1) * w; i < h * w; i++) d[i] = tmp[i] > tmp[i - w] ? tmp[i] : tmp[i - w];
  return out;
}

/**
 * Masks of 0/255 bytes whose rows are whole 32-bit words: four pixels per operation. For such
 * bytes the minimum is a bitwise AND and the maximum a bitwise OR, so shifted words give the
 * left and right neighbours of all four pixels at once (little-endian: the byte at the lowest
 * address is the lowest byte of the word). Same result as the byte passes, about four times
 * fewer operations. Returns undefined when the frame does not qualify.
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

/** One 3x3 erode (AND) or dilate (OR) on word rows; `outside` is the identity of the operation. */
function wordPass(src: Uint32Array, words: number, h: number, isErode: boolean): Uint32Array {
  const outside = isErode ? 0xffffffff : 0;
  const tmp = new Uint32Array(src.length);
  for (let y = 0; y < h; y++) {
    const r = y * words;
    for (let i = 0; i < words; i++) {
      const c = src[r + i];
      const prev = i > 0 ? src[r + i - 1] : outside;
      const next = i < words - 1 ? src[r + i + 1] : outside;
      const left = (c << 8) | (prev >>> 24);
      const right = (c >>> 8) | (next << 24);
      tmp[r + i] = isErode ? c & left & right : c | left | right;
    }
  }
  const out = new Uint32Array(src.length);
  if (h === 1) {
    out.set(tmp);
    return out;
  }
  const last = (h - 1) * words;
  if (isErode) {
    for (let i = 0; i < words; i++) out[i] = tmp[i] & tmp[i + words];
    for (let i = words; i < last; i++) out[i] = tmp[i - words] & tmp[i] & tmp[i + words];
    for (let i = last; i < last + words; i++) out[i] = tmp[i] & tmp[i - words];
  } else {
    for (let i = 0; i < words; i++) out[i] = tmp[i] | tmp[i + words];
    for (let i = words; i < last; i++) out[i] = tmp[i - words] | tmp[i] | tmp[i + words];
    for (let i = last; i < last + words; i++) out[i] = tmp[i] | tmp[i - words];
  }
  return out;
}

/** Applies a sequence of passes (true = erode), on words when the mask allows it. */
function passes(src: GreyFrame, ops: readonly boolean[]): GreyFrame {
  checkFrame('src', src, 1);
  const words = binaryWords(src);
  if (words) {
    let w = words;
    for (const isErode of ops) w = wordPass(w, src.width >> 2, src.height, isErode);
    return makeGrey(src.width, src.height, new Uint8Array(w.buffer, w.byteOffset, src.data.length));
  }
  let f = src;
  for (const isErode of ops) f = isErode ? erodePass(f) : dilatePass(f);
  return f;
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
