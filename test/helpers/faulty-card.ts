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

/** The sample's day camera knocked part way through: from IMG_0020 on, every frame shows the
 *  view shifted (12% cut from the left and the top, scaled back to the frame), as a camera turned
 *  a little and tipped sees it; the other camera beside it, untouched. */
export async function writeBumpedCard(dir: string): Promise<void> {
  cpSync(path.join(ROOT, 'sample-media/ridge-trail'), path.join(dir, 'ridge-trail'), { recursive: true });
  cpSync(path.join(ROOT, 'sample-media/creek-bend'), path.join(dir, 'creek-bend'), { recursive: true });
  const card = path.join(dir, 'ridge-trail');
  for (let n = 20; n <= 32; n++) {
    const file = img(card, n);
    const info = await readImageInfo(file, path.basename(file), 0);
    const left = Math.round(0.12 * info.width), top = Math.round(0.12 * info.height);
    const { data, info: raw } = await sharp(file).extract({ left, top, width: info.width - left, height: info.height - top }).resize(info.width, info.height).raw().toBuffer({ resolveWithObject: true });
    await writeJpeg(file, { width: raw.width, height: raw.height, channels: 3, data: new Uint8Array(data) }, info.capture.sortMs, 85, 'Health Test');
  }
}
