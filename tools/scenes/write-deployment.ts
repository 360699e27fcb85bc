/**
 * Writes an invented deployment (families.ts) to a folder as a camera would leave it on a card:
 * JPEGs named in shooting order, EXIF DateTimeOriginal and DateTime set (one-second resolution,
 * EXIF 2.32), file times to match. Returns the ground truth of every trigger, files relative
 * to the folder's parent (as a scan of that parent reports them).
 */
import { mkdirSync, utimesSync } from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import type { RgbFrame } from '../../src/kernels/frame.js';
import type { CategoryName } from './categories.js';
import type { DeploymentDraw } from './families.js';
import { renderScene } from './render.js';

export interface TriggerTruth {
  deployment: string;
  family: string;
  files: string[];
  category: CategoryName;
  /** The false trigger an animal passed in (families.ts TriggerDraw.distractor). */
  distractor?: CategoryName;
  animal: boolean;
}

export const exifTime = (ms: number): string => new Date(ms).toISOString().slice(0, 19).replace('T', ' ').replace(/-/g, ':');

/** One JPEG with its capture time in EXIF and as the file time. */
export async function writeJpeg(file: string, frame: RgbFrame, ms: number, quality: number, model: string): Promise<void> {
  await sharp(frame.data, { raw: { width: frame.width, height: frame.height, channels: 3 } })
    .jpeg({ quality })
    .withExif({ IFD0: { Make: 'Movesift Sim', Model: model, DateTime: exifTime(ms) }, IFD2: { DateTimeOriginal: exifTime(ms) } })
    .toFile(file);
  utimesSync(file, ms / 1000, ms / 1000);
}

export async function writeDeployment(d: DeploymentDraw, parent: string, startMs = Date.parse('2025-07-01T05:30:00Z')): Promise<TriggerTruth[]> {
  const dir = path.join(parent, d.id);
  mkdirSync(dir, { recursive: true });
  const truth: TriggerTruth[] = [];
  let t = startMs;
  let counter = 1;
  for (const tr of d.triggers) {
    t += tr.gapMin * 60_000;
    const scene = renderScene({
      seed: tr.seed, category: tr.category, frames: tr.frames, intervalS: tr.intervalS, width: d.width, height: d.height,
      world: d.world, light: tr.light, strip: d.strip ?? undefined, style: d.style, neighbours: false, distractor: tr.distractor,
    });
    const files: string[] = [];
    for (let k = 0; k < scene.frames.length; k++) {
      const name = `IMG_${String(counter++).padStart(4, '0')}.JPG`;
      await writeJpeg(path.join(dir, name), scene.frames[k], t + Math.round(scene.times[k] * 1000 - scene.times[0] * 1000), d.jpegQuality, `${d.family} (invented)`);
      files.push(`${d.id}/${name}`);
    }
    truth.push({ deployment: d.id, family: d.family, files, category: tr.category, ...(tr.distractor ? { distractor: tr.distractor } : {}), animal: scene.animal });
  }
  return truth;
}
