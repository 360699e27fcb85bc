/**
 * One unit of scan work: decode an event's media at the analysis size, run the motion engine,
 * write its previews, and return plain data (no class instances), so the same function runs
 * in-process or in a worker thread. A frame that fails to decode is reported and the rest of
 * the event is still analysed.
 */
import { activityWindows, clipSeedLevel, runningMedian, type ActivityWindow } from '../kernels/activity-windows.js';
import { analyseEvent } from '../kernels/analyse-event.js';
import { createClipAnalyser } from '../kernels/clip-activity.js';
import type { Blob } from '../kernels/components.js';
import { detectDataStripInFrames, ignoreMask, widerStrip, type DataStrip } from '../kernels/data-strip.js';
import type { RgbFrame } from '../kernels/frame.js';
import { CLIP_MODEL, MOTION_MODEL } from '../kernels/model.js';
import { sceneSignature } from '../kernels/scene-signature.js';
import { eventFeatureRows, scoreEvent, verdictFor, FEATURE_NAMES, type VerdictName } from '../kernels/score.js';
import { decodeImage } from '../media/decode-image.js';
import { decodeVideo } from '../media/decode-video.js';
import { MediaErrorCode } from '../media/media-errors.js';
import { writeFramePreview, writeHeatPreview, type PreviewFile } from './previews.js';

export interface TaskFile {
  abs: string;
  display: string;
}

export interface EventTask {
  eventId: string;
  kind: 'burst' | 'single' | 'clip';
  files: TaskFile[];
  /** Middle frames of neighbouring image events of the same camera and light mode, from which
   *  the engine builds a deployment background (aligned, gain-fitted, disagreeing ones dropped,
   *  per-pixel median): a single image's only reference, and for a burst the one that shows a
   *  subject standing still through all its frames. */
  neighbours: TaskFile[];
  width: number;
  height: number;
  videoFps: number;
  /** A clip's duration as its container declares it (ffprobe at inventory): decoded frames that
   *  stop well short of it mean a file cut short (a card pulled mid-write, a copy broken off). */
  durationS?: number;
  flow: boolean;
  cacheDir: string;
  /** The deployment's data strip by consensus of its triggers (deployment-strip.ts), when it had
   *  enough of them; the event ignores the wider of it and its own. */
  deploymentStrip?: DataStrip;
}

export interface TaskFailure {
  display: string;
  code: string;
  message: string;
  stage: 'read' | 'partial';
}

export type TaskOutcome =
  | { ok: true; eventId: string; score: number; verdict: VerdictName; features: unknown; detail: unknown; windows: ActivityWindow[]; previews: PreviewFile[]; failures: TaskFailure[] }
  | { ok: false; eventId: string; failures: TaskFailure[] };

const failureOf = (display: string, e: unknown, stage: 'read' | 'partial' = 'read'): TaskFailure => ({
  display,
  code: (e as { code?: string }).code ?? MediaErrorCode.decodeFailed,
  message: (e as Error).message ?? String(e),
  stage,
});

/** A few recent neighbour decodes, since consecutive events share neighbours. */
const neighbourCache = new Map<string, RgbFrame>();
function rememberNeighbour(f: TaskFile, w: number, h: number, frame: RgbFrame): void {
  neighbourCache.set(`${f.abs}@${w}x${h}`, frame);
  if (neighbourCache.size > 32) neighbourCache.delete(neighbourCache.keys().next().value!);
}
async function decodeNeighbour(f: TaskFile, w: number, h: number): Promise<RgbFrame | undefined> {
  const hit = neighbourCache.get(`${f.abs}@${w}x${h}`);
  if (hit) return hit;
  try {
    const fr = await decodeImage(f.abs, f.display, w, h);
    rememberNeighbour(f, w, h, fr);
    return fr;
  } catch {
    return undefined; // a bad neighbour is that event's error, not this one's
  }
}

const box = (b: Blob) => ({ x: b.x, y: b.y, w: b.width, h: b.height, area: b.area, peak: b.peakChange });
const round = (v: number, d = 3): number => Math.round(v * 10 ** d) / 10 ** d;

export async function runEventTask(task: EventTask): Promise<TaskOutcome> {
  return task.kind === 'clip' ? runClip(task) : runImages(task);
}

async function runImages(task: EventTask): Promise<TaskOutcome> {
  const failures: TaskFailure[] = [];
  const frames: RgbFrame[] = [];
  const kept: number[] = [];
  for (let i = 0; i < task.files.length; i++) {
    try {
      frames.push(await decodeImage(task.files[i].abs, task.files[i].display, task.width, task.height));
      kept.push(i);
    } catch (e) {
      failures.push(failureOf(task.files[i].display, e));
    }
  }
  if (frames.length === 0) return { ok: false, eventId: task.eventId, failures };
  // Later events take this one's middle frame as a neighbour: keep it decoded.
  const middle = task.files.length >> 1;
  const at = kept.indexOf(middle);
  if (at >= 0) rememberNeighbour(task.files[middle], task.width, task.height, frames[at]);
  const neighbours: RgbFrame[] = [];
  const neighbourFiles: string[] = [];
  for (const n of task.neighbours) {
    const fr = await decodeNeighbour(n, task.width, task.height);
    if (fr) {
      neighbours.push(fr);
      neighbourFiles.push(n.display);
    }
  }
  const own = detectDataStripInFrames(frames.length >= 3 ? frames : [...frames, ...neighbours]);
  const strip = widerStrip(own, task.deploymentStrip);
  const mask = strip.top || strip.bottom ? ignoreMask(task.width, task.height, strip) : undefined;
  const a = analyseEvent({ frames, neighbours, mask, flow: task.flow });
  const s = scoreEvent(MOTION_MODEL, a);
  const best = s.bestTrack >= 0 ? a.tracks[s.bestTrack] : undefined;
  const rows = eventFeatureRows(a);
  const previews: PreviewFile[] = [];
  for (let k = 0; k < frames.length; k++) previews.push(await writeFramePreview(task.cacheDir, task.eventId, kept[k], frames[k], null));
  let heatFrame = frames.length >> 1;
  if (best) heatFrame = best.points.reduce((m, p) => (p.blob.area > m.blob.area ? p : m)).frame;
  const bestBlobs = best ? best.points.filter((p) => p.frame === heatFrame).map((p) => p.blob) : [];
  const others = a.frames[heatFrame].blobs.filter((b) => !bestBlobs.includes(b));
  previews.push(await writeHeatPreview(task.cacheDir, task.eventId, frames[heatFrame], a.heat, bestBlobs, others, kept[heatFrame], null));
  return {
    ok: true,
    eventId: task.eventId,
    score: s.score,
    verdict: s.verdict,
    features: {
      names: FEATURE_NAMES,
      best: s.bestTrack >= 0 ? rows[s.bestTrack].map((v) => round(v, 4)) : null,
      tracks: a.tracks.length,
      context: a.context,
      flow: best && a.trackFlows ? a.trackFlows[s.bestTrack] : undefined,
    },
    detail: {
      // What the camera saw, for the deployment's health (deployment-health.ts): the middle frame.
      scene: sceneSignature(frames[frames.length >> 1], mask),
      strip,
      // Which detection set the ignored rows: the event's own frames, the deployment's consensus, or both agreed.
      stripFrom: strip.top + strip.bottom === 0 ? null : own.top === strip.top && own.bottom === strip.bottom ? 'event' : 'deployment',
      // Neighbours offered and how each fitted (kept ones make the deployment background).
      background: neighbours.length,
      deployment: a.deploymentBackground,
      // Each neighbour by its file (another trigger's middle file): deployment-health.ts reads
      // a camera that moved from which neighbours stopped agreeing.
      neighbours: (a.neighbourFits ?? []).map((f, k) => ({ file: neighbourFiles[k], kept: f.kept, compensated: f.compensated, disagreement: round(f.disagreement, 2), shift: { dx: round(f.shift.dx, 2), dy: round(f.shift.dy, 2) } })),
      movingLight: a.context.movingLight,
      frames: a.frames.map((f, k) => ({
        position: kept[k],
        shift: { dx: round(f.shift.dx, 2), dy: round(f.shift.dy, 2), confidence: round(f.shift.confidence, 2) },
        compensated: f.compensated,
        blobs: f.blobs.map(box),
      })),
      bestTrack: best ? best.points.map((p) => ({ position: kept[p.frame], ...box(p.blob) })) : [],
    },
    windows: [],
    previews,
    failures,
  };
}

async function runClip(task: EventTask): Promise<TaskOutcome> {
  const file = task.files[0];
  const analyser = createClipAnalyser({ model: CLIP_MODEL });
  const times: number[] = [];
  const scores: number[] = [];
  const bucketS = 5;
  const candidates = new Map<number, { t: number; score: number; frame: RgbFrame; blobs: Blob[] }>();
  let first: RgbFrame | undefined;
  const stream = decodeVideo(file.abs, file.display, { width: task.width, height: task.height, fps: task.videoFps });
  try {
    for await (const { frame, t } of stream.frames) {
      const r = analyser.push(frame, t);
      times.push(t);
      scores.push(r.score);
      if (!first) first = frame;
      if (r.score >= CLIP_MODEL.thresholds.blank) {
        const b = Math.floor(t / bucketS);
        const c = candidates.get(b);
        if (!c || r.score > c.score) candidates.set(b, { t, score: r.score, frame, blobs: r.blobs });
      }
    }
  } catch (e) {
    return { ok: false, eventId: task.eventId, failures: [failureOf(file.display, e)] };
  }
  if (!first) return { ok: false, eventId: task.eventId, failures: [{ display: file.display, code: MediaErrorCode.videoDecode, message: `${file.display}: no frame could be decoded`, stage: 'read' }] };
  const failures: TaskFailure[] = [];
  const problem = stream.problem();
  const end = times[times.length - 1] ?? 0;
  if (problem) failures.push({ display: file.display, code: MediaErrorCode.videoDecode, message: `${file.display}: decoding stopped early at ${end.toFixed(1)} s (${problem}); the part before it was screened`, stage: 'partial' });
  // Short of the declared end by more than a second and two analysed frames (the last frame
  // sits up to one frame interval before the end): the file holds less than it says.
  else if (task.durationS && end < task.durationS - Math.max(1, 2 / task.videoFps)) {
    failures.push({ display: file.display, code: MediaErrorCode.videoShort, message: `${file.display}: the file declares ${task.durationS.toFixed(1)} s but its frames end at ${end.toFixed(1)} s (cut short?); only the part before was screened`, stage: 'partial' });
  }
  // The level the windows are built from (activityWindows smooths the same way). A window opens
  // only where it rises above what this clip's place does all the time (clipSeedLevel); it then
  // spans every frame above the fitted threshold around that point.
  const level = runningMedian(scores, CLIP_MODEL.window.smoothFrames);
  const seed = clipSeedLevel(level, CLIP_MODEL.thresholds.blank);
  const windows = activityWindows(times, scores, { threshold: CLIP_MODEL.thresholds.blank, durationS: end, ...CLIP_MODEL.window, seed });
  // The clip's score is the highest level its windows are built from (the smoothed frame
  // scores), so a clip with a window is never likely-blank. A clip whose activity reached the
  // threshold but never the clip's own seed level has no window and is unsure, not blank: a
  // person looks at it whole. One frame that alone reached the motion level still makes it
  // unsure: a missed fish costs more than a look.
  const score = level.reduce((m, v) => Math.max(m, v), 0);
  const rawPeak = scores.reduce((m, v) => Math.max(m, v), 0);
  let verdict = verdictFor(CLIP_MODEL, score);
  if (verdict === 'likely-blank' && rawPeak >= CLIP_MODEL.thresholds.motion) verdict = 'unsure';
  // A clip screened only in part was not seen whole: what was not decoded may hold the fish.
  if (verdict === 'likely-blank' && failures.length) verdict = 'unsure';
  const previews: PreviewFile[] = [await writeFramePreview(task.cacheDir, task.eventId, 0, first, 0)];
  const picks = windows.slice(0, 12).map((w) => {
    let bestC: { t: number; score: number; frame: RgbFrame; blobs: Blob[] } | undefined;
    for (const c of candidates.values()) if (c.t >= w.start_s && c.t <= w.end_s && (!bestC || c.score > bestC.score)) bestC = c;
    return bestC;
  });
  let pos = 1;
  for (const c of picks) if (c) previews.push(await writeFramePreview(task.cacheDir, task.eventId, pos++, c.frame, round(c.t, 2)));
  const top = [...candidates.values()].sort((x, y) => y.score - x.score)[0];
  previews.push(await writeHeatPreview(task.cacheDir, task.eventId, top ? top.frame : first, undefined, top ? top.blobs : [], [], 0, top ? round(top.t, 2) : 0));
  return {
    ok: true,
    eventId: task.eventId,
    score,
    verdict,
    features: { frames: times.length, durationS: round(end, 2), rawPeak: round(rawPeak, 4), seed: round(seed, 4) },
    detail: { times: times.map((t) => round(t, 2)), scores: scores.map((v) => round(v, 3)) },
    windows: windows.map((w) => ({ start_s: round(w.start_s, 2), end_s: round(w.end_s, 2), score: round(w.score, 4) })),
    previews,
    failures,
  };
}
