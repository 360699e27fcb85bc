/**
 * `npm run bench:scan`: throughput of a whole scan on this machine. Builds (once, in the OS
 * temp folder) a deployment set of about 2,000 images by enlarging the sample-media JPEGs to
 * 5 MP and copying them into 32 camera folders, and a 5-minute 1280x720 clip by looping the
 * sample clip; then scans each into a fresh ledger and prints images/s, the video real-time
 * factor (clip seconds per second of scanning) and the peak resident memory.
 * Copies analyse exactly like originals; the numbers measure the pipeline, not the screener.
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import sharp from 'sharp';
import { resolveBinaries } from '../src/media/ffmpeg-binaries.js';
import { scan } from '../src/pipeline/scan.js';

const ROOT = path.resolve(import.meta.dirname, '..');
const work = path.join(os.tmpdir(), 'movesift-bench');
const images = path.join(work, 'images');
const video = path.join(work, 'video');
const copies = Number(process.env.BENCH_COPIES ?? 32);

async function buildImages(): Promise<number> {
  const srcDirs = ['ridge-trail', 'creek-bend'].map((d) => path.join(ROOT, 'sample-media', d));
  const big = path.join(work, 'big');
  if (!existsSync(big)) {
    mkdirSync(big, { recursive: true });
    for (const d of srcDirs) for (const f of readdirSync(d)) {
      await sharp(path.join(d, f)).resize(2592, 1944).jpeg({ quality: 88 }).withMetadata().toFile(path.join(big, `${path.basename(d)}-${f}`));
    }
  }
  if (!existsSync(images)) {
    for (let c = 0; c < copies; c++) {
      const dir = path.join(images, `cam-${String(c).padStart(2, '0')}`);
      mkdirSync(dir, { recursive: true });
      for (const f of readdirSync(big)) copyFileSync(path.join(big, f), path.join(dir, f));
    }
  }
  return readdirSync(images).reduce((n, d) => n + readdirSync(path.join(images, d)).length, 0);
}

function buildClip(): void {
  if (existsSync(path.join(video, 'reef-5min.mp4'))) return;
  mkdirSync(video, { recursive: true });
  const r = spawnSync(resolveBinaries().ffmpeg, ['-v', 'error', '-y', '-stream_loop', '12', '-i', path.join(ROOT, 'sample-media/reef-station/reef-drop-01.mp4'), '-vf', 'scale=1280:720', '-r', '25', '-t', '300', '-c:v', 'libx264', '-preset', 'veryfast', '-crf', '23', '-pix_fmt', 'yuv420p', path.join(video, 'reef-5min.mp4')]);
  if (r.status !== 0) throw new Error(String(r.stderr));
}

async function timed(label: string, roots: string[]): Promise<number> {
  const ledger = path.join(work, `${label}.ledger`);
  rmSync(ledger, { force: true });
  rmSync(`${ledger}-wal`, { force: true });
  rmSync(`${ledger}.previews`, { recursive: true, force: true });
  const t = process.hrtime.bigint();
  const s = await scan({ roots, ledger });
  const secs = Number(process.hrtime.bigint() - t) / 1e9;
  console.log(`${label}: ${s.files} files, ${s.events} events, ${secs.toFixed(1)} s, verdicts ${JSON.stringify(s.verdicts)}`);
  return secs;
}

const n = await buildImages();
buildClip();
const imgS = await timed('images', [images]);
const vidS = await timed('video', [video]);
console.log(`\nimages/s: ${(n / imgS).toFixed(1)} (${n} images of 5 MP, analysis width 384)`);
console.log(`video real-time factor: ${(300 / vidS).toFixed(1)}x (5-minute 1280x720 clip analysed at 4 fps)`);
console.log(`peak resident memory: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB`);
