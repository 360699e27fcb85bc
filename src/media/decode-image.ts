/**
 * Decodes an image straight to the analysis size. sharp shrinks JPEGs on load (the DCT scales
 * by 1/2, 1/4 or 1/8 before the final resize), so a 12 MP trigger photo is never held at full
 * size to be analysed at 480 px. EXIF orientation is applied, alpha dropped, grey expanded, so
 * every frame comes out as interleaved RGB8 of exactly the requested size.
 */
import sharp, { type OutputInfo } from 'sharp';
import { makeRgb, type RgbFrame } from '../kernels/frame.js';
import { decodeError } from './read-image-info.js';
import { fromFsError } from './media-errors.js';
import { promises as fs } from 'node:fs';

export async function decodeImage(abs: string, display: string, width: number, height: number): Promise<RgbFrame> {
  let out: { data: Buffer; info: OutputInfo };
  try {
    await fs.access(abs);
  } catch (e) {
    throw fromFsError(display, e);
  }
  try {
    out = await sharp(abs, { failOn: 'warning', sequentialRead: true })
      .rotate()
      .resize(width, height, { fit: 'fill' })
      .toColourspace('srgb')
      .raw()
      .toBuffer({ resolveWithObject: true });
  } catch (e) {
    throw decodeError(display, e);
  }
  const { channels } = out.info;
  const frame = makeRgb(width, height);
  const src = out.data;
  const n = width * height;
  if (channels === 3) frame.data.set(src.subarray(0, n * 3));
  else for (let i = 0; i < n; i++) {
    const base = i * channels;
    const g = src[base];
    frame.data[i * 3] = g;
    frame.data[i * 3 + 1] = channels >= 3 ? src[base + 1] : g;
    frame.data[i * 3 + 2] = channels >= 3 ? src[base + 2] : g;
  }
  return frame;
}
