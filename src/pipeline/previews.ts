/**
 * Review previews, written during the scan so review never decodes originals: a small WebP per
 * frame, and one change overlay per event (the frame where the best track is largest, the
 * change heat above 3 noise sigmas tinted from amber to white, and blob boxes: the best
 * track's in cyan, others' in grey). Paths are relative to the cache folder.
 */
import sharp from 'sharp';
import { promises as fs } from 'node:fs';
import path from 'node:path';
import type { Blob } from '../kernels/components.js';
import type { GreyFrame, RgbFrame } from '../kernels/frame.js';
import { SNR_SCALE } from '../kernels/params.js';

export const THUMB_WIDTH = 240;

export interface PreviewFile {
  kind: 'frame' | 'heat';
  position: number;
  path: string;
  width: number;
  height: number;
  time_s: number | null;
}

const thumbSize = (f: RgbFrame): { width: number; height: number } => {
  const width = Math.min(THUMB_WIDTH, f.width);
  return { width, height: Math.max(1, Math.round((f.height * width) / f.width)) };
};

async function writeWebp(rgb: Uint8Array, w: number, h: number, out: { width: number; height: number }, file: string): Promise<void> {
  await fs.mkdir(path.dirname(file), { recursive: true });
  const tmp = `${file}.part`;
  await sharp(rgb, { raw: { width: w, height: h, channels: 3 } }).resize(out.width, out.height, { fit: 'fill' }).webp({ quality: 72 }).toFile(tmp);
  await fs.rename(tmp, file); // a crash never leaves a half-written preview under the final name
}

export async function writeFramePreview(cacheDir: string, eventKey: string, position: number, frame: RgbFrame, timeS: number | null): Promise<PreviewFile> {
  const rel = `${eventKey}/f${String(position).padStart(3, '0')}.webp`;
  const size = thumbSize(frame);
  await writeWebp(frame.data, frame.width, frame.height, size, path.join(cacheDir, rel));
  return { kind: 'frame', position, path: rel, ...size, time_s: timeS };
}

function drawBox(rgb: Uint8Array, w: number, h: number, b: Blob, colour: readonly number[]): void {
  const x1 = Math.min(w - 1, b.x + b.width - 1), y1 = Math.min(h - 1, b.y + b.height - 1);
  const put = (x: number, y: number): void => {
    const i = (y * w + x) * 3;
    rgb[i] = colour[0];
    rgb[i + 1] = colour[1];
    rgb[i + 2] = colour[2];
  };
  for (let x = b.x; x <= x1; x++) {
    put(x, b.y);
    put(x, y1);
  }
  for (let y = b.y; y <= y1; y++) {
    put(b.x, y);
    put(x1, y);
  }
}

export async function writeHeatPreview(cacheDir: string, eventKey: string, frame: RgbFrame, heat: GreyFrame | undefined, best: Blob[], others: Blob[], position: number, timeS: number | null): Promise<PreviewFile> {
  const { width: w, height: h } = frame;
  const rgb = Uint8Array.from(frame.data);
  if (heat) {
    const lo = 3 * SNR_SCALE;
    for (let i = 0; i < w * h; i++) {
      const v = heat.data[i];
      if (v < lo) continue;
      const a = Math.min(1, (v - lo) / (6 * SNR_SCALE)) * 0.65;
      const tint = [255, 176 + Math.min(79, v - lo), Math.min(255, (v - lo) * 2)];
      for (let k = 0; k < 3; k++) rgb[i * 3 + k] = Math.round(rgb[i * 3 + k] * (1 - a) + tint[k] * a);
    }
  }
  for (const b of others) drawBox(rgb, w, h, b, [150, 150, 150]);
  for (const b of best) drawBox(rgb, w, h, b, [0, 229, 255]);
  const rel = `${eventKey}/heat.webp`;
  const size = { width: Math.min(w, 2 * THUMB_WIDTH), height: Math.round((h * Math.min(w, 2 * THUMB_WIDTH)) / w) };
  await writeWebp(rgb, w, h, size, path.join(cacheDir, rel));
  return { kind: 'heat', position, path: rel, ...size, time_s: timeS };
}
