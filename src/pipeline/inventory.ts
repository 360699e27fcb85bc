/**
 * The read pass of a scan: for every file found, its size, time and fingerprint; for new or
 * changed files, metadata (EXIF or ffprobe) and, for images, a decode at the analysis size, done
 * exactly as the analysis will do it (media/decode-image.ts), that proves the file decodes (a
 * damaged JPEG fails here, before it could join an event; a smaller proof decode is not enough:
 * at 1/8 scale the JPEG decoder reads only DC coefficients and passes corrupt AC data) and tells
 * colour day images from infrared night ones. A smaller decode would cost no less: both run at
 * a reduced DCT scale. Unchanged files reuse their stored row; files whose last
 * read failed and are unchanged keep their error without another try.
 */
import path from 'node:path';
import type { FoundFile } from '../media/find-media.js';
import { fingerprintFile } from '../media/fingerprint.js';
import { fromFsError, MediaErrorCode, mediaError } from '../media/media-errors.js';
import { readImageInfo } from '../media/read-image-info.js';
import { decodeImage } from '../media/decode-image.js';
import { analysisSize } from '../kernels/downscale.js';
import { probeVideo } from '../media/probe-video.js';
import { fileTime } from '../media/capture-time.js';
import type { ErrorRow, MediaRow, ScanStore } from '../ledger/scan-store.js';

export interface InventoryResult {
  rows: MediaRow[];
  errors: Array<{ rel: string; error: ErrorRow }>;
  reused: number;
}

/** Mean (max - min) channel spread at or below this reads as monochrome: an infrared night
 *  image. Daylight scenes sit well above it (common practice; measured on our generator's day
 *  and night scenes and on the real infrared fixture, which reads 0). */
const MONO_SPREAD = 6;

/** Decodes the image as its analysis will (the same size, the same call) and reads its light. */
async function lightOf(abs: string, display: string, width: number, height: number, analysisWidth: number): Promise<'colour' | 'infrared'> {
  const size = analysisSize(width, height, Math.min(analysisWidth, width));
  const frame = await decodeImage(abs, display, size.width, size.height);
  let spread = 0;
  const n = size.width * size.height;
  const d = frame.data;
  for (let i = 0; i < n; i++) spread += Math.max(d[i * 3], d[i * 3 + 1], d[i * 3 + 2]) - Math.min(d[i * 3], d[i * 3 + 1], d[i * 3 + 2]);
  return spread / n <= MONO_SPREAD ? 'infrared' : 'colour';
}

async function mapLimit<T>(items: readonly T[], limit: number, fn: (item: T, i: number) => Promise<void>): Promise<void> {
  let next = 0;
  const run = async (): Promise<void> => {
    while (next < items.length) {
      const i = next++;
      await fn(items[i], i);
    }
  };
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, run));
}

export async function takeInventory(
  files: readonly FoundFile[],
  rootId: number,
  deploymentOf: (f: FoundFile) => string,
  store: ScanStore,
  /** The scan's analysis width: images are proven to decode at the size they will be analysed at. */
  analysisWidth: number,
  onFile: (f: FoundFile) => void,
  signal?: AbortSignal,
): Promise<InventoryResult> {
  const rows: Array<MediaRow | undefined> = new Array(files.length);
  const errors: Array<{ rel: string; error: ErrorRow }> = [];
  let reused = 0;
  await mapLimit(files, 6, async (f, i) => {
    if (signal?.aborted) return;
    const display = f.rel;
    let facts;
    try {
      facts = await fingerprintFile(f.abs);
    } catch (e) {
      const err = fromFsError(display, e);
      errors.push({ rel: f.rel, error: { fingerprint: null, stage: 'read', code: err.code, message: err.message } });
      onFile(f);
      return;
    }
    const deployment = deploymentOf(f);
    const stored = store.media(rootId, f.rel);
    const prevError = store.error(rootId, f.rel);
    if (prevError && prevError.stage === 'read' && prevError.fingerprint === facts.fingerprint) {
      errors.push({ rel: f.rel, error: prevError });
      onFile(f);
      return;
    }
    if (stored && stored.fingerprint === facts.fingerprint && stored.size === facts.size && !prevError) {
      rows[i] = { ...stored, deployment_id: deployment, mtime_ms: facts.mtimeMs };
      delete (rows[i] as { id?: number }).id;
      delete (rows[i] as { present?: number }).present;
      reused++;
      onFile(f);
      return;
    }
    try {
      if (facts.size === 0) throw mediaError(MediaErrorCode.emptyFile, `${display}: the file is empty (0 bytes); it was probably not written completely`);
      const base = { root_id: rootId, rel_path: f.rel, deployment_id: deployment, size: facts.size, mtime_ms: facts.mtimeMs, fingerprint: facts.fingerprint };
      if (f.kind === 'image') {
        const info = await readImageInfo(f.abs, display, facts.mtimeMs);
        const light = await lightOf(f.abs, display, info.width, info.height, analysisWidth);
        rows[i] = {
          ...base, kind: 'image', capture_time: info.capture.iso, capture_sort_ms: info.capture.sortMs, capture_source: info.capture.source,
          width: info.width, height: info.height, format: info.format, camera_make: info.camera.make ?? null, camera_model: info.camera.model ?? null,
          camera_serial: info.camera.serial ?? null, light, duration_s: null, fps: null, codec: null, rotation: null,
        };
      } else {
        const v = await probeVideo(f.abs, display);
        const t = v.creation ?? fileTime(facts.mtimeMs);
        rows[i] = {
          ...base, kind: 'video', capture_time: t.iso, capture_sort_ms: t.sortMs, capture_source: t.source, width: v.width, height: v.height,
          format: path.extname(f.rel).slice(1).toLowerCase(), camera_make: v.make ?? null, camera_model: v.model ?? null, camera_serial: null,
          light: null, duration_s: v.durationS, fps: v.fps, codec: v.codec, rotation: v.rotation,
        };
      }
    } catch (e) {
      const err = (e as { code?: string }).code ? (e as { code: string; message: string }) : fromFsError(display, e);
      if (err.code === MediaErrorCode.ffmpegMissing) throw e; // not the file's fault: stop and say how to fix
      errors.push({ rel: f.rel, error: { fingerprint: facts.fingerprint, stage: 'read', code: err.code, message: err.message } });
    }
    onFile(f);
  });
  return { rows: rows.filter((r): r is MediaRow => !!r), errors, reused };
}
