/** Reads the outside fixtures in ../shared/fixtures (see SOURCES.md there) into our frame types. */
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import sharp from 'sharp';
import type { RgbFrame } from '../../src/kernels/frame.js';

export const FIXTURES = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../shared/fixtures');

export async function readRgb(file: string, width?: number): Promise<RgbFrame> {
  let img = sharp(path.join(FIXTURES, file)).removeAlpha().toColourspace('srgb');
  if (width) img = img.resize({ width, kernel: 'linear' });
  const { data, info } = await img.raw().toBuffer({ resolveWithObject: true });
  return { width: info.width, height: info.height, channels: 3, data: new Uint8Array(data.buffer, data.byteOffset, data.length) };
}

export const IR_BURST = Array.from({ length: 10 }, (_, i) => `real-ir-burst/frame-${String(i + 1).padStart(2, '0')}.jpg`);
