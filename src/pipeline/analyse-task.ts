/**
 * One unit of scan work around the engine's two entries (kernels/screen-event.ts for a trigger
 * of images, kernels/screen-clip.ts for a clip): decode the event's media at the analysis size,
 * hand the frames to the engine, write its previews, and return plain data (no class
 * instances), so the same function runs in-process or in a worker thread. A frame that fails to
 * decode is reported and the rest of the event is still analysed. What one thread keeps between
 * events (decoded neighbour frames) lives in its TaskWorkspace, made once per thread.
 */
import type { Blob } from '../kernels/components.js';
import type { DataStrip } from '../kernels/data-strip.js';
import type { RgbFrame } from '../kernels/frame.js';
import { createClipScreener } from '../kernels/screen-clip.js';
import { screenEvent } from '../kernels/screen-event.js';
import { FEATURE_NAMES, type VerdictName } from '../kernels/score.js';
import type { EventScreening } from '../kernels/screen-event.js';
import { joinedVerdict, type CombineRule, type DrivenBy } from '../classifier/combine.js';
import { changeCrops, cropTargets } from '../classifier/crops.js';
import { loadClassifier, type LoadedClassifier } from '../classifier/session.js';
import type { ActivityWindow } from '../kernels/activity-windows.js';
import { decodeImage } from '../media/decode-image.js';
import { decodeVideo } from '../media/decode-video.js';
import { MediaErrorCode } from '../media/media-errors.js';
import { writeFramePreview, writeHeatPreview, type PreviewFile } from './previews.js';

export interface TaskFile {
  abs: string;
  display: string;
}

/** A neighbouring trigger: its middle file, and for a burst another of its files, from which the
 *  engine learns where that trigger had a visitor (kernels/clean-plate.ts). */
export interface NeighbourFile extends TaskFile {
  partner?: TaskFile;
}

export interface EventTask {
  eventId: string;
  kind: 'burst' | 'single' | 'clip';
  files: TaskFile[];
  /** Middle frames of neighbouring image events of the same camera and light mode, from which
   *  the engine builds a deployment background (aligned, gain-fitted, disagreeing ones dropped,
   *  the clean plate of the rest, kernels/clean-plate.ts): a single image's only reference, and for a burst the one that shows a
   *  subject standing still through all its frames. */
  neighbours: NeighbourFile[];
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
  /** A change classifier's manifest (absolute path) whose opinion joins the motion score. */
  classifier?: string;
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

/**
 * What one analysing thread keeps from event to event: the last few neighbour frames it
 * decoded, since consecutive events share most of their neighbours (and an event's middle frame
 * is a later event's neighbour). One per worker thread, or per in-process scan.
 */
export interface TaskWorkspace {
  neighbourFrames: Map<string, RgbFrame>;
  /** Classifier sessions by manifest path, loaded on first use (one per thread). */
  classifiers: Map<string, Promise<LoadedClassifier>>;
}

/** Decoded neighbour frames kept per thread: 32 frames of 384 x 288 are about 10 MB. Each
 *  neighbour is two frames (middle and partner), so 32 hold the 12 of one event and those
 *  the next events share. */
const NEIGHBOUR_FRAMES_KEPT = 32;

export function createTaskWorkspace(): TaskWorkspace {
  return { neighbourFrames: new Map(), classifiers: new Map() };
}

function rememberNeighbour(ws: TaskWorkspace, f: TaskFile, w: number, h: number, frame: RgbFrame): void {
  ws.neighbourFrames.set(`${f.abs}@${w}x${h}`, frame);
  if (ws.neighbourFrames.size > NEIGHBOUR_FRAMES_KEPT) ws.neighbourFrames.delete(ws.neighbourFrames.keys().next().value!);
}
async function decodeNeighbour(ws: TaskWorkspace, f: TaskFile, w: number, h: number): Promise<RgbFrame | undefined> {
  const hit = ws.neighbourFrames.get(`${f.abs}@${w}x${h}`);
  if (hit) return hit;
  try {
    const fr = await decodeImage(f.abs, f.display, w, h);
    rememberNeighbour(ws, f, w, h, fr);
    return fr;
  } catch {
    return undefined; // a bad neighbour is that event's error, not this one's
  }
}

const box = (b: Blob) => ({ x: b.x, y: b.y, w: b.width, h: b.height, area: b.area, peak: b.peakChange });
const round = (v: number, d = 3): number => Math.round(v * 10 ** d) / 10 ** d;

export async function runEventTask(task: EventTask, ws: TaskWorkspace = createTaskWorkspace()): Promise<TaskOutcome> {
  return task.kind === 'clip' ? runClip(task) : runImages(task, ws);
}

async function runImages(task: EventTask, ws: TaskWorkspace): Promise<TaskOutcome> {
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
  // Later events take this one's middle frame and first frame as a neighbour: keep them decoded.
  for (const k of task.files.length >= 2 ? [0, task.files.length >> 1] : [0]) {
    const at = kept.indexOf(k);
    if (at >= 0) rememberNeighbour(ws, task.files[k], task.width, task.height, frames[at]);
  }
  const neighbours: RgbFrame[] = [];
  const partners: Array<RgbFrame | undefined> = [];
  const neighbourFiles: string[] = [];
  for (const n of task.neighbours) {
    const fr = await decodeNeighbour(ws, n, task.width, task.height);
    if (fr) {
      neighbours.push(fr);
      // Without its second frame the neighbour still serves, as a single image's does.
      partners.push(n.partner ? await decodeNeighbour(ws, n.partner, task.width, task.height) : undefined);
      neighbourFiles.push(n.display);
    }
  }
  const r = screenEvent({ frames, neighbours, neighbourPartners: partners, deploymentStrip: task.deploymentStrip, flow: task.flow });
  const a = r.analysis;
  const s = r.score;
  const second = task.classifier ? await secondOpinion(ws, task.classifier, r) : undefined;
  const best = s.bestTrack >= 0 ? a.tracks[s.bestTrack] : undefined;
  const previews: PreviewFile[] = [];
  for (let k = 0; k < frames.length; k++) previews.push(await writeFramePreview(task.cacheDir, task.eventId, kept[k], frames[k], null));
  previews.push(await writeHeatPreview(task.cacheDir, task.eventId, frames[r.heatFrame], a.heat, r.bestBlobs, r.otherBlobs, kept[r.heatFrame], null));
  return {
    ok: true,
    eventId: task.eventId,
    score: s.score,
    verdict: second ? second.verdict : s.verdict,
    features: {
      // The classifier's opinion and its rule (classifier/combine.ts), which the second pass applies again.
      classifier: second,
      names: FEATURE_NAMES,
      best: s.bestTrack >= 0 ? r.rows[s.bestTrack].map((v) => round(v, 4)) : null,
      tracks: a.tracks.length,
      context: a.context,
      flow: best && a.trackFlows ? a.trackFlows[s.bestTrack] : undefined,
    },
    detail: {
      // What the camera saw, for the deployment's health (deployment-health.ts): the middle frame.
      scene: r.scene,
      strip: r.strip,
      // Which detection set the ignored rows: the event's own frames, the deployment's consensus, or both agreed.
      stripFrom: r.stripFrom,
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

/** What the ledger keeps of the classifier's opinion: the model, its opinion (the most
 *  subject-like crop) and each crop's, its rule, motion's own verdict and which decided. */
interface SecondOpinion {
  model: string;
  sha256: string;
  score: number;
  crops: Array<{ track: number; p: number }>;
  rule: CombineRule;
  motionVerdict: VerdictName;
  verdict: VerdictName;
  drivenBy: DrivenBy;
}

/** The classifier's opinion on the event's strongest tracks, joined with the motion verdict. */
async function secondOpinion(ws: TaskWorkspace, manifest: string, r: EventScreening): Promise<SecondOpinion> {
  let loading = ws.classifiers.get(manifest);
  if (!loading) ws.classifiers.set(manifest, (loading = loadClassifier(manifest)));
  const c = await loading;
  const targets = cropTargets(r.analysis, r.score.trackScores, c.manifest.cropsPerEvent);
  const p = await c.subjectProbabilities(changeCrops(r.analysis, targets, c.manifest.input.size), targets.length);
  // Rounded as stored, so that the second pass, which reads it back, judges alike.
  const opinion = round(targets.reduce((m, _, i) => Math.max(m, p[i]), 0), 4);
  const v = joinedVerdict(c.manifest.combine, r.score.verdict, r.score.score, opinion, r.analysis.context);
  return { model: c.manifest.name, sha256: c.manifest.sha256, score: opinion, crops: targets.map((t, i) => ({ track: t.track, p: round(p[i], 4) })), rule: c.manifest.combine, motionVerdict: r.score.verdict, ...v };
}

async function runClip(task: EventTask): Promise<TaskOutcome> {
  const file = task.files[0];
  const screener = createClipScreener();
  let first: RgbFrame | undefined;
  const stream = decodeVideo(file.abs, file.display, { width: task.width, height: task.height, fps: task.videoFps });
  try {
    for await (const { frame, t } of stream.frames) {
      screener.push(frame, t);
      first ??= frame;
    }
  } catch (e) {
    return { ok: false, eventId: task.eventId, failures: [failureOf(file.display, e)] };
  }
  if (!first) return { ok: false, eventId: task.eventId, failures: [{ display: file.display, code: MediaErrorCode.videoDecode, message: `${file.display}: no frame could be decoded`, stage: 'read' }] };
  const problem = stream.problem();
  const r = screener.finish({ stopped: !!problem, durationS: task.durationS, fps: task.videoFps });
  const failures: TaskFailure[] = [];
  if (r.incomplete?.kind === 'stopped') failures.push({ display: file.display, code: MediaErrorCode.videoDecode, message: `${file.display}: decoding stopped early at ${r.incomplete.endS.toFixed(1)} s (${problem}); the part before it was screened`, stage: 'partial' });
  if (r.incomplete?.kind === 'short') failures.push({ display: file.display, code: MediaErrorCode.videoShort, message: `${file.display}: the file declares ${task.durationS!.toFixed(1)} s but its frames end at ${r.incomplete.endS.toFixed(1)} s (cut short?); only the part before was screened`, stage: 'partial' });
  const previews: PreviewFile[] = [await writeFramePreview(task.cacheDir, task.eventId, 0, first, 0)];
  let pos = 1;
  for (const c of r.windowMoments) if (c) previews.push(await writeFramePreview(task.cacheDir, task.eventId, pos++, c.frame, round(c.t, 2)));
  const top = r.top;
  previews.push(await writeHeatPreview(task.cacheDir, task.eventId, top ? top.frame : first, undefined, top ? top.blobs : ([] as Blob[]), [], 0, top ? round(top.t, 2) : 0));
  const end = r.times[r.times.length - 1] ?? 0;
  return {
    ok: true,
    eventId: task.eventId,
    score: r.score,
    verdict: r.verdict,
    features: { frames: r.times.length, durationS: round(end, 2), rawPeak: round(r.rawPeak, 4), seed: round(r.seed, 4) },
    detail: { times: r.times.map((t) => round(t, 2)), scores: r.scores.map((v) => round(v, 3)) },
    windows: r.windows.map((w) => ({ start_s: round(w.start_s, 2), end_s: round(w.end_s, 2), score: round(w.score, 4) })),
    previews,
    failures,
  };
}
