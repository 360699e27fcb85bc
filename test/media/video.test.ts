/**
 * Video through ffprobe and the ffmpeg pipe. The clips are made here by ffmpeg itself (lavfi
 * testsrc), so their true durations and timestamps are known from how they were made.
 */
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { forgetBinaries, resolveBinaries } from '../../src/media/ffmpeg-binaries.js';
import { decodeVideo } from '../../src/media/decode-video.js';
import { probeVideo } from '../../src/media/probe-video.js';
import { tempDir } from '../helpers/cli.js';

const dir = tempDir('movesift-video-');
const make = (name: string, args: string[]): string => {
  const f = path.join(dir, name);
  const r = spawnSync(resolveBinaries().ffmpeg, ['-v', 'error', '-y', ...args, f]);
  expect(r.status, String(r.stderr)).toBe(0);
  return f;
};

describe('video', () => {
  it('probes size, rate, codec, duration and creation time', async () => {
    const f = make('cfr.mp4', ['-f', 'lavfi', '-i', 'testsrc=size=320x180:rate=25', '-t', '4', '-c:v', 'libx264', '-pix_fmt', 'yuv420p', '-metadata', 'creation_time=2024-05-01T10:00:00Z']);
    const v = await probeVideo(f, 'cfr.mp4');
    expect(v).toMatchObject({ width: 320, height: 180, fps: 25, codec: 'h264', rotation: 0, creation: { iso: '2024-05-01T10:00:00Z', source: 'video-creation-time' } });
    expect(v.durationS).toBeCloseTo(4, 1);
  });

  it('streams frames at the analysis rate with their presentation times', async () => {
    const f = make('cfr2.mp4', ['-f', 'lavfi', '-i', 'testsrc=size=320x180:rate=30', '-t', '3', '-c:v', 'libx264', '-pix_fmt', 'yuv420p']);
    const s = decodeVideo(f, 'cfr2.mp4', { width: 160, height: 90, fps: 4 });
    const times: number[] = [];
    for await (const { frame, t } of s.frames) {
      expect(frame.data.length).toBe(160 * 90 * 3);
      times.push(t);
    }
    expect(times).toEqual([0, 0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2, 2.25, 2.5, 2.75]);
    expect(s.problem()).toBeUndefined();
  });

  it('gives true times for a variable-frame-rate file', async () => {
    // 2 s at 25 fps, then 2 fps up to 3.6 s: 50 + 4 = 54 frames spanning 3.5 s. A reader that
    // counted frames at the nominal 25 fps would end them at 2.16 s.
    const f = make('vfr.mkv', ['-f', 'lavfi', '-i', 'testsrc=size=160x120:rate=25', '-t', '3.6', '-vf', "setpts='if(lt(N,50),N/25,2+(N-50)/2)/TB'", '-vsync', 'vfr', '-c:v', 'libx264', '-pix_fmt', 'yuv420p']);
    const s = decodeVideo(f, 'vfr.mkv', { width: 80, height: 60, fps: 2 });
    const times: number[] = [];
    for await (const { t } of s.frames) times.push(t);
    expect(times[times.length - 1]).toBeGreaterThanOrEqual(3);
    for (let i = 1; i < times.length; i++) expect(times[i] - times[i - 1]).toBeCloseTo(0.5, 5);
  });

  it('names every place it looked when no ffmpeg works', () => {
    const saved = { ...process.env };
    try {
      process.env.MOVESIFT_FFMPEG = '/nowhere/ffmpeg';
      forgetBinaries();
      const b = resolveBinaries(); // the override fails, the packaged binary is found next
      expect(b.ffmpeg).not.toBe('/nowhere/ffmpeg');
    } finally {
      process.env = saved;
      forgetBinaries();
    }
  });
});
