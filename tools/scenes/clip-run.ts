/**
 * Renders a planned clip and runs the streaming clip analyser over it, labelling each track that
 * reaches a frame from the ground truth: the subject's when its blob there overlaps the subject
 * mask by a quarter of its area. Shared by the clip-model fit and the clip behaviour tests.
 */
import sharp from 'sharp';
import { createClipAnalyser } from '../../src/kernels/clip-activity.js';
import type { RgbFrame } from '../../src/kernels/frame.js';
import type { MotionModel } from '../../src/kernels/score.js';
import { renderClip } from './clip.js';
import type { ClipPlan } from './clip-plans.js';

export interface ClipFrameRecord {
  t: number;
  present: boolean;
  rows: number[][];
  labels: number[];
  score: number;
}

export interface ClipRecord {
  seed: number;
  durationS: number;
  frames: ClipFrameRecord[];
}

async function compress(f: RgbFrame, quality: number): Promise<RgbFrame> {
  const { data } = await sharp(f.data, { raw: { width: f.width, height: f.height, channels: 3 } }).jpeg({ quality }).raw().toBuffer({ resolveWithObject: true });
  return { ...f, data: new Uint8Array(data.buffer, data.byteOffset, data.length) };
}

export async function runClipPlan(plan: ClipPlan, model: MotionModel): Promise<ClipRecord> {
  const clip = renderClip(plan);
  const analyser = createClipAnalyser({ model });
  const frames: ClipFrameRecord[] = [];
  for (let i = 0; i < clip.frames.length; i++) {
    const f = plan.jpegQuality ? await compress(clip.frames[i], plan.jpegQuality) : clip.frames[i];
    const r = analyser.push(f, clip.times[i]);
    const mask = clip.masks[i];
    const labels = r.tracks.map(({ blob: b }) => {
      let hit = 0;
      for (let y = b.y; y < b.y + b.height; y++) for (let x = b.x; x < b.x + b.width; x++) hit += mask[y * clip.width + x];
      return hit >= 0.25 * b.area ? 1 : 0;
    });
    frames.push({ t: clip.times[i], present: clip.present[i], rows: r.tracks.map((x) => x.row), labels, score: r.score });
  }
  return { seed: plan.seed, durationS: plan.duration, frames };
}
