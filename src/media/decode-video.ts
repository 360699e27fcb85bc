/**
 * Streams a clip as RGB8 frames at the analysis size and rate: ffmpeg (driven by fluent-ffmpeg)
 * resamples by presentation timestamp (`fps` filter), scales, and pipes rawvideo; `showinfo`
 * reports each output frame's pts_time on stderr, which becomes the frame's time, so a
 * variable-frame-rate file gets true times. Frames are yielded one at a time with the pipe's
 * back-pressure: the clip is never held in memory.
 */
import ffmpeg from 'fluent-ffmpeg';
import { makeRgb, type RgbFrame } from '../kernels/frame.js';
import { resolveBinaries } from './ffmpeg-binaries.js';
import { MediaErrorCode, mediaError } from './media-errors.js';

export interface VideoFrame {
  frame: RgbFrame;
  t: number;
}

export interface VideoDecodeOptions {
  width: number;
  height: number;
  fps: number;
  signal?: AbortSignal;
}

export interface VideoStream {
  frames: AsyncGenerator<VideoFrame>;
  /** Set after the generator finishes: a decode error that cut the clip short, if any. */
  problem(): string | undefined;
}

const PTS_RE = /\bn:\s*(\d+)\b.*?\bpts_time:\s*(-?[\d.]+(?:e[-+]?\d+)?)/;

export function decodeVideo(abs: string, display: string, o: VideoDecodeOptions): VideoStream {
  const { ffmpeg: bin } = resolveBinaries();
  const frameBytes = o.width * o.height * 3;
  const pts = new Map<number, number>();
  let failure: string | undefined;
  let finished = false;
  let wake: (() => void) | undefined;
  const poke = (): void => {
    wake?.();
    wake = undefined;
  };
  const cmd = ffmpeg(abs)
    .setFfmpegPath(bin)
    .inputOptions(['-nostdin'])
    .noAudio()
    .videoFilters([`fps=${o.fps}`, `scale=${o.width}:${o.height}:flags=area`, 'showinfo'])
    .outputOptions(['-f', 'rawvideo', '-pix_fmt', 'rgb24', '-vsync', '0'])
    .on('stderr', (line: string) => {
      const m = PTS_RE.exec(line);
      if (m) {
        pts.set(Number(m[1]), Number(m[2]));
        poke();
      }
    })
    .on('error', (e: Error, _out: string | null, stderr: string | null) => {
      failure = (stderr || e.message).trim().split('\n').filter((l) => !PTS_RE.test(l)).slice(-2).join(' ');
      finished = true;
      poke();
    })
    .on('end', () => {
      finished = true;
      poke();
    });
  const abort = (): void => {
    cmd.kill('SIGKILL');
  };
  o.signal?.addEventListener('abort', abort, { once: true });
  const stream = cmd.pipe();
  const start = { t: Number.NaN };
  async function* frames(): AsyncGenerator<VideoFrame> {
    let k = 0;
    let buf = Buffer.alloc(frameBytes);
    let fill = 0;
    const ready: Buffer[] = [];
    const timeOf = (i: number): number | undefined => {
      const t = pts.get(i);
      if (t !== undefined) {
        pts.delete(i);
        if (Number.isNaN(start.t)) start.t = t;
        return t;
      }
      return finished ? (Number.isNaN(start.t) ? 0 : start.t) + i / o.fps : undefined;
    };
    try {
      for await (const chunk of stream as AsyncIterable<Buffer>) {
        let off = 0;
        while (off < chunk.length) {
          const take = Math.min(frameBytes - fill, chunk.length - off);
          chunk.copy(buf, fill, off, off + take);
          fill += take;
          off += take;
          if (fill === frameBytes) {
            ready.push(buf);
            buf = Buffer.alloc(frameBytes);
            fill = 0;
          }
        }
        while (ready.length) {
          let t = timeOf(k);
          while (t === undefined) {
            await new Promise<void>((r) => { wake = r; setTimeout(r, 50); });
            t = timeOf(k);
          }
          const data = ready.shift()!;
          yield { frame: makeRgb(o.width, o.height, new Uint8Array(data.buffer, data.byteOffset, frameBytes)), t: t - (Number.isNaN(start.t) ? 0 : start.t) };
          k++;
        }
      }
      while (!finished) await new Promise<void>((r) => { wake = r; setTimeout(r, 50); });
    } finally {
      o.signal?.removeEventListener('abort', abort);
      if (!finished) cmd.kill('SIGKILL');
    }
    if (failure && k === 0) throw mediaError(MediaErrorCode.videoDecode, `${display}: ffmpeg could not decode any frame: ${failure}`);
  }
  return { frames: frames(), problem: () => failure };
}
