/**
 * Video facts through ffprobe: duration, frame rate, display size (after rotation), codec,
 * rotation and creation time. A file ffprobe cannot parse (no index, not a video) is an error
 * with a stable code, never a crash.
 */
import { execFile } from 'node:child_process';
import { closeSync, openSync, readSync } from 'node:fs';
import { resolveBinaries } from './ffmpeg-binaries.js';
import { MediaErrorCode, mediaError, type MediaError } from './media-errors.js';
import { parseVideoCreationTime, type CaptureTime } from './capture-time.js';

export interface VideoInfo {
  durationS: number;
  fps: number;
  /** Display size, rotation applied. */
  width: number;
  height: number;
  codec: string;
  rotation: number;
  creation?: CaptureTime;
  make?: string;
  model?: string;
}

interface ProbeStream {
  codec_type?: string;
  codec_name?: string;
  width?: number;
  height?: number;
  avg_frame_rate?: string;
  r_frame_rate?: string;
  duration?: string;
  nb_frames?: string;
  tags?: Record<string, string>;
  side_data_list?: Array<{ rotation?: number }>;
}

const rate = (r: string | undefined): number => {
  if (!r) return 0;
  const [a, b] = r.split('/').map(Number);
  return b ? a / b : a || 0;
};

export function parseProbe(json: string, display: string): VideoInfo {
  let doc: { streams?: ProbeStream[]; format?: { duration?: string; tags?: Record<string, string> } };
  try {
    doc = JSON.parse(json);
  } catch {
    throw mediaError(MediaErrorCode.videoProbe, `${display}: ffprobe gave no readable answer`);
  }
  const v = doc.streams?.find((s) => s.codec_type === 'video' && (s.width ?? 0) > 0);
  if (!v) throw mediaError(MediaErrorCode.notMedia, `${display}: holds no video stream`);
  const rotTag = Number(v.tags?.rotate ?? 0);
  const rotSide = Number(v.side_data_list?.find((d) => d.rotation !== undefined)?.rotation ?? 0);
  const rotation = ((Math.round(rotTag || -rotSide) % 360) + 360) % 360;
  const swap = rotation === 90 || rotation === 270;
  const durationS = Number(doc.format?.duration ?? v.duration ?? 0);
  const tags = { ...doc.format?.tags, ...v.tags };
  return {
    durationS: Number.isFinite(durationS) ? durationS : 0,
    fps: rate(v.avg_frame_rate) || rate(v.r_frame_rate),
    width: swap ? v.height! : v.width!,
    height: swap ? v.width! : v.height!,
    codec: v.codec_name ?? 'unknown',
    rotation,
    creation: parseVideoCreationTime(tags.creation_time),
    make: tags['com.apple.quicktime.make'] ?? tags.make,
    model: tags['com.apple.quicktime.model'] ?? tags.model,
  };
}

/** Container signatures: ISO BMFF (MP4, MOV, M4V) boxes, RIFF (AVI), EBML (MKV), MPEG-TS
 *  sync bytes (MTS, 192-byte packets with a 4-byte time code first). */
export function looksLikeVideo(head: Buffer): boolean {
  const box = head.subarray(4, 8).toString('latin1');
  if (['ftyp', 'moov', 'mdat', 'free', 'wide', 'skip', 'pnot'].includes(box)) return true;
  if (head.subarray(0, 4).toString('latin1') === 'RIFF') return true;
  if (head.readUInt32BE(0) === 0x1a45dfa3) return true;
  return head[0] === 0x47 || head[4] === 0x47;
}

export function probeError(display: string, stderr: string, head?: Buffer): MediaError {
  const first = stderr.trim().split('\n').pop() ?? '';
  if (head && head.length >= 8 && !looksLikeVideo(head)) return mediaError(MediaErrorCode.notMedia, `${display}: not a readable video despite its name`);
  if (/moov atom not found|could not find codec parameters|truncat/i.test(stderr)) {
    return mediaError(MediaErrorCode.videoProbe, `${display}: the video's index is missing or broken (often a recording cut off by a flat battery): ${first}`);
  }
  if (/invalid data found when processing input/i.test(stderr)) {
    return mediaError(MediaErrorCode.notMedia, `${display}: not a readable video despite its name`);
  }
  return mediaError(MediaErrorCode.videoProbe, `${display}: ffprobe could not read it: ${first}`);
}

export function probeVideo(abs: string, display: string): Promise<VideoInfo> {
  const { ffprobe } = resolveBinaries();
  return new Promise((resolve, reject) => {
    execFile(ffprobe, ['-v', 'error', '-print_format', 'json', '-show_format', '-show_streams', abs], { maxBuffer: 16 << 20, timeout: 120000 }, (err, stdout, stderr) => {
      if (err) {
        let head: Buffer | undefined;
        try {
          const fd = openSync(abs, 'r');
          head = Buffer.alloc(12);
          readSync(fd, head, 0, 12, 0);
          closeSync(fd);
        } catch {
          head = undefined;
        }
        return reject(probeError(display, String(stderr || err.message), head));
      }
      try {
        resolve(parseProbe(stdout, display));
      } catch (e) {
        reject(e);
      }
    });
  });
}
