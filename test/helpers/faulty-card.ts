/**
 * A card that comes back from the field with camera faults: a copy of the sample media's day
 * camera (our invented scenario) whose triggers 3 and 4 (IMG_0007-0012) were shot through a
 * fogged lens (a wide blur, the light kept) and whose last trigger (IMG_0030-0032) carries a
 * clock reset to the first day of 2000; the sample's other camera beside it, untouched.
 */
import { cpSync } from 'node:fs';
import path from 'node:path';
import sharp from 'sharp';
import { readImageInfo } from '../../src/media/read-image-info.js';
import { writeJpeg } from '../../tools/scenes/write-deployment.js';
import { ROOT } from './cli.js';

async function rewrite(file: string, blur: number | null, ms?: number): Promise<void> {
  const info = await readImageInfo(file, path.basename(file), 0);
  const { data, info: raw } = await (blur ? sharp(file).blur(blur) : sharp(file)).raw().toBuffer({ resolveWithObject: true });
  // sortMs of a time without offset is its wall clock read as UTC (capture-time.ts); writeJpeg writes it back the same way.
  await writeJpeg(file, { width: raw.width, height: raw.height, channels: 3, data: new Uint8Array(data) }, ms ?? info.capture.sortMs, 85, 'Health Test');
}

const img = (card: string, n: number) => path.join(card, `IMG_${String(n).padStart(4, '0')}.JPG`);

/** Writes the two cameras into `dir` (ridge-trail with the faults, creek-bend as it is). */
export async function writeFaultyCard(dir: string): Promise<void> {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(dir, 'ridge-trail'), { recursive: true });
  cpSync(path.join(ROOT, 'sample-media/creek-bend'), path.join(dir, 'creek-bend'), { recursive: true });
  const card = path.join(dir, 'ridge-trail');
  for (let n = 7; n <= 12; n++) await rewrite(img(card, n), 8);
  for (let n = 30; n <= 32; n++) await rewrite(img(card, n), null, Date.UTC(2000, 0, 1, 0, 0, n - 30));
}
