/**
 * Writes the bundled sample media: an invented scenario from the project's own generator, never
 * real footage. Two camera deployments of a dozen triggers each (a colour day camera on a ridge
 * trail, an infrared night camera at a creek bend), with animals and each kind of false trigger,
 * JPEGs with EXIF capture times and a data strip, plus one short underwater clip (H.264), and
 * ground-truth.json saying which triggers hold an animal and when the fish are in view.
 *
 *   npm run sample-media                       regenerates sample-media/ (committed)
 *   npm run sample-media -- --out /tmp/big --scale 40 --clip-seconds 300 --clip-width 1280
 *                                              a larger set for benchmarks (about 2,000 images)
 */
import { spawn } from 'node:child_process';
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { resolveBinaries } from '../src/media/ffmpeg-binaries.js';
import { Category, type CategoryName } from './scenes/categories.js';
import { renderScene } from './scenes/render.js';
import { renderClip } from './scenes/clip.js';
import { makeRng } from './scenes/random.js';
import { writeJpeg } from './scenes/write-deployment.js';

const { values } = parseArgs({ options: { out: { type: 'string' }, scale: { type: 'string' }, 'clip-seconds': { type: 'string' }, 'clip-width': { type: 'string' }, seed: { type: 'string' } } });
const out = path.resolve(values.out ?? 'sample-media');
const scale = Math.max(1, Number(values.scale ?? 1));
const clipSeconds = Number(values['clip-seconds'] ?? 24);
const clipWidth = Number(values['clip-width'] ?? 480);
const baseSeed = Number(values.seed ?? 7100);

interface Plan {
  folder: string;
  light: 'day' | 'ir';
  start: string;
  triggers: CategoryName[];
}

const plans: Plan[] = [
  { folder: 'ridge-trail', light: 'day', start: '2025-06-01T06:10:00', triggers: [Category.wind, Category.animalCrossing, Category.empty, Category.exposure, Category.cloudShadow, Category.animalPartial, Category.rain, Category.shake, Category.animalSmall, Category.insect, Category.wind, Category.animalLingering] },
  { folder: 'creek-bend', light: 'ir', start: '2025-06-01T21:40:00', triggers: [Category.irLamp, Category.animalNight, Category.empty, Category.rain, Category.animalNight, Category.insect, Category.irLamp, Category.shake, Category.empty, Category.animalNight, Category.wind, Category.animalLingering] },
];

async function writeDeployment(p: Plan, di: number, truth: unknown[]): Promise<number> {
  const dir = path.join(out, p.folder);
  mkdirSync(dir, { recursive: true });
  const rng = makeRng(baseSeed + di);
  let t = Date.parse(`${p.start}Z`); // wall-clock time of the camera, written without an offset
  let counter = 1;
  let images = 0;
  for (let rep = 0; rep < scale; rep++) {
    for (let i = 0; i < p.triggers.length; i++) {
      const category = p.triggers[i];
      const frames = i % 5 === 4 ? 1 : 3; // most cameras here shoot 3-frame bursts; some triggers are single shots
      const scene = renderScene({ seed: baseSeed * 100 + di * 1000 + rep * 50 + i, category, frames, width: 640, height: 480, world: baseSeed + di, light: p.light, strip: { edge: 'bottom', share: 0.05, bar: 14, ink: 235 } });
      const files: string[] = [];
      for (let k = 0; k < scene.frames.length; k++) {
        const name = `IMG_${String(counter++).padStart(4, '0')}.JPG`;
        const ms = t + k * 1000;
        const file = path.join(dir, name);
        await writeJpeg(file, scene.frames[k], ms, 80, 'TC-1 (invented)');
        files.push(`${p.folder}/${name}`);
        images++;
      }
      truth.push({ deployment: p.folder, files, category, animal: scene.animal });
      t += Math.round(rng.range(4, 40)) * 60_000; // next trigger minutes later
    }
  }
  return images;
}

async function writeClip(truth: Record<string, unknown>): Promise<void> {
  const dir = path.join(out, 'reef-station');
  mkdirSync(dir, { recursive: true });
  const width = clipWidth, height = Math.round((clipWidth * 9) / 16 / 2) * 2, fps = 8;
  const visits = [{ start_s: 0.25 * clipSeconds, end_s: 0.45 * clipSeconds }, { start_s: 0.7 * clipSeconds, end_s: 0.85 * clipSeconds }];
  const clip = renderClip({ seed: baseSeed + 50, width, height, fps, duration: clipSeconds, visits });
  const file = path.join(dir, 'reef-drop-01.mp4');
  const { ffmpeg } = resolveBinaries();
  const p = spawn(ffmpeg, ['-v', 'error', '-y', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-s', `${width}x${height}`, '-r', String(fps), '-i', 'pipe:0', '-c:v', 'libx264', '-preset', 'medium', '-crf', '26', '-pix_fmt', 'yuv420p', '-movflags', '+faststart', '-metadata', 'creation_time=2025-06-02T09:30:00Z', file], { stdio: ['pipe', 'inherit', 'inherit'] });
  for (const f of clip.frames) if (!p.stdin.write(f.data)) await new Promise((r) => p.stdin.once('drain', r));
  p.stdin.end();
  await new Promise<void>((res, rej) => p.on('close', (c) => (c === 0 ? res() : rej(new Error(`ffmpeg exited ${c}`)))));
  truth['reef-station/reef-drop-01.mp4'] = { fishInView: clip.windows, durationS: clipSeconds, fps };
}

rmSync(out, { recursive: true, force: true });
mkdirSync(out, { recursive: true });
const events: unknown[] = [];
let images = 0;
for (let d = 0; d < plans.length; d++) images += await writeDeployment(plans[d], d, events);
const clips: Record<string, unknown> = {};
await writeClip(clips);
writeFileSync(path.join(out, 'ground-truth.json'), JSON.stringify({ about: 'Invented scenario rendered by tools/make-sample-media.ts; not real footage.', events, clips }, null, 1) + '\n');
console.log(`wrote ${images} images in ${plans.length} deployments and 1 clip to ${out}`);
