/**
 * Survey clips of every clip family (tools/scenes/clip-families.ts), written as H.264 files and
 * screened by the product's own scan, then judged against their ground truth: each span with a
 * subject in view found by some window, and the share of clip time kept against the share with
 * a subject, in the fitted family and the held-out one side by side. Real footage found on the
 * machine is judged beside them (clip-truth.ts names it and its source).
 *
 *   npm run validate:clips                               4 clips per family
 *   npm run validate:clips -- --clips 2 --keep /tmp/clips   smaller, and keep the clips
 *   (a --keep folder that already holds clips and their truth is screened again as it is)
 *   npm run validate:clips -- --seed-offset 100         other clips of each family
 */
import { spawn } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseArgs } from 'node:util';
import { resolveBinaries } from '../src/media/ffmpeg-binaries.js';
import { scanFamilies } from './scan-families.js';
import { judgeClips, printClipTable, REAL_CLIPS, type ClipTruth } from './clip-truth.js';
import { CLIP_FAMILIES, CLIP_FAMILY_FACTS, clipFamilyPlan, type ClipFamilyName } from './scenes/clip-families.js';
import { renderClip } from './scenes/clip.js';
import { inParts } from './parts.js';

const { values } = parseArgs({
  options: { clips: { type: 'string' }, keep: { type: 'string' }, families: { type: 'string' }, 'seed-offset': { type: 'string' }, part: { type: 'string' } },
  allowPositionals: true,
  strict: false,
});
const perFamily = Number(values.clips ?? 4);
const families = (typeof values.families === 'string' ? values.families.split(',') : [...CLIP_FAMILIES]) as ClipFamilyName[];
/** Seeds of each family: the fitted family's are the clip model's validation seeds (never fitted). */
const FIRST_SEED: Record<ClipFamilyName, number> = { 'home-water': 950_000, 'other-water': 960_000 };
const root = typeof values.keep === 'string' ? path.resolve(values.keep) : mkdtempSync(path.join(os.tmpdir(), 'movesift-clips-'));
/** Clips not looked at while a change was made: judge on those for the number to report. */
const offset = Number(values['seed-offset'] ?? 0);
if (!Number.isInteger(offset) || offset < 0 || offset > 9_000) throw new Error(`--seed-offset must be an integer in 0..9000, got ${values['seed-offset']}`);
const plans = families.flatMap((f) => Array.from({ length: perFamily }, (_, i) => clipFamilyPlan(f, FIRST_SEED[f] + offset + i)));

async function writeClip(file: string, plan: (typeof plans)[number]): Promise<ClipTruth> {
  const clip = renderClip(plan);
  const { ffmpeg } = resolveBinaries();
  const p = spawn(ffmpeg, ['-v', 'error', '-y', '-f', 'rawvideo', '-pix_fmt', 'rgb24', '-s', `${clip.width}x${clip.height}`, '-r', String(clip.fps), '-i', 'pipe:0', '-c:v', 'libx264', '-preset', 'veryfast', '-crf', '26', '-pix_fmt', 'yuv420p', file], { stdio: ['pipe', 'inherit', 'inherit'] });
  for (const f of clip.frames) if (!p.stdin.write(f.data)) await new Promise((r) => p.stdin.once('drain', r));
  p.stdin.end();
  await new Promise<void>((res, rej) => p.on('close', (c) => (c === 0 ? res() : rej(new Error(`ffmpeg exited ${c}`)))));
  return { family: plan.family, file: `${plan.id}.mp4`, durationS: plan.duration, subject: clip.windows, source: 'generated' };
}

const kept = path.join(root, 'clip-truth.json');
const truth: ClipTruth[] = existsSync(kept)
  ? (JSON.parse(readFileSync(kept, 'utf8')) as ClipTruth[])
  : await inParts<ClipTruth>(import.meta.filename, async (part, parts) => {
      const out: ClipTruth[] = [];
      for (let k = part; k < plans.length; k += parts) {
        const dir = path.join(root, plans[k].family);
        mkdirSync(dir, { recursive: true });
        out.push(await writeClip(path.join(dir, `${plans[k].id}.mp4`), plans[k]));
      }
      return out;
    });
if (!existsSync(kept)) {
  for (const real of REAL_CLIPS) {
    if (!existsSync(real.path)) {
      console.error(`real clip not found, left out: ${real.path} (${real.install})`);
      continue;
    }
    mkdirSync(path.join(root, 'real'), { recursive: true });
    copyFileSync(real.path, path.join(root, 'real', real.truth.file));
    truth.push(real.truth);
  }
  writeFileSync(kept, JSON.stringify(truth, null, 1) + '\n');
}

try {
  const reports = await scanFamilies(root, [...families, ...(truth.some((t) => t.family === 'real') ? (['real'] as const) : [])]);
  printClipTable(judgeClips(reports, truth), { ...CLIP_FAMILY_FACTS, real: { heldOut: true } });
} finally {
  if (typeof values.keep !== 'string') rmSync(root, { recursive: true, force: true });
  else console.error(`clips, ledgers and clip-truth.json kept in ${root}`);
}
