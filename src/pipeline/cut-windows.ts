/**
 * Activity windows as short files: each window of each clip cut out with ffmpeg. By default a
 * stream copy, which cannot start between keyframes: the input is sought to the window start
 * with -ss before -i, and ffmpeg starts the copy at the keyframe at or before it, so a cut may
 * begin up to one keyframe interval early (never late: nothing of the window is lost). Where it
 * really begins, the keyframe at or before the window (read with ffprobe), is recorded as the
 * file's `file_start_s`: a time read in the file plus it is the time in the source clip. With
 * exact, the window is re-encoded (H.264, CRF 18) and starts and ends where it says. Beside the
 * files: an index CSV and a sheet with a row per window for MaxN counting (the greatest number
 * of individuals of a species seen in one frame, the standard count of baited video surveys).
 */
import { spawn } from 'node:child_process';
import { existsSync, promises as fs } from 'node:fs';
import path from 'node:path';
import { resolveBinaries } from '../media/ffmpeg-binaries.js';
import { csvCell } from './report.js';
import { renameNoClobber } from './safe-move.js';
import { OutputErrorCode } from './output-guard.js';
import { MovesiftError } from '../shared/errors.js';

export interface ClipWindows {
  eventId: string;
  source: string;
  display: string;
  windows: Array<{ start_s: number; end_s: number; score: number }>;
}

export interface CutFile {
  eventId: string;
  source: string;
  window: number;
  start_s: number;
  end_s: number;
  score: number;
  file: string;
  /** Source time of the file's first frame: the window start (exact) or the keyframe at or before it. */
  file_start_s: number;
}

/** Keyframe times of the first video stream, from ffprobe (only keyframes are decoded). */
function keyframeTimes(ffprobe: string, source: string): Promise<number[]> {
  return new Promise((resolve, reject) => {
    const p = spawn(ffprobe, ['-v', 'error', '-select_streams', 'v:0', '-skip_frame', 'nokey', '-show_entries', 'frame=pts_time', '-of', 'csv=p=0', source], { stdio: ['ignore', 'pipe', 'pipe'] });
    let out = '';
    let err = '';
    p.stdout.on('data', (d) => (out += d));
    p.stderr.on('data', (d) => (err += d));
    p.on('error', reject);
    p.on('close', (code) => (code === 0 ? resolve(out.split(/[\s,]+/).filter(Boolean).map(Number).filter(Number.isFinite).sort((a, b) => a - b)) : reject(new Error(`ffprobe exited ${code}: ${err.trim().split('\n').slice(-2).join(' ')}`))));
  });
}

const stamp = (s: number): string => {
  const h = Math.floor(s / 3600), m = Math.floor((s % 3600) / 60), sec = s - 3600 * h - 60 * m;
  return `${String(h).padStart(2, '0')}:${String(m).padStart(2, '0')}:${sec.toFixed(2).padStart(5, '0')}`;
};

function run(bin: string, args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const p = spawn(bin, args, { stdio: ['ignore', 'ignore', 'pipe'] });
    let err = '';
    p.stderr.on('data', (d) => (err += d));
    p.on('error', reject);
    p.on('close', (code) => (code === 0 ? resolve() : reject(new Error(`ffmpeg exited ${code}: ${err.trim().split('\n').slice(-3).join(' ')}`))));
  });
}

/** Writes a file that must not exist yet: to a part name, then linked into place. */
async function writeNew(file: string, text: string): Promise<void> {
  const part = `${file}.${process.pid}.part`;
  await fs.writeFile(part, text);
  await renameNoClobber(part, file);
}

export async function cutWindows(clips: ClipWindows[], out: string, exact: boolean, onFile?: (f: CutFile) => void): Promise<CutFile[]> {
  const { ffmpeg, ffprobe } = resolveBinaries();
  // A folder holding an earlier cut is refused: its MaxN sheet may carry a volunteer's counts.
  for (const f of ['maxn-sheet.csv', 'windows-index.csv']) {
    if (existsSync(path.join(out, f))) throw new MovesiftError(OutputErrorCode.exists, `${out}: holds an earlier cut (${f}; its MaxN sheet may carry your counts), and nothing there is replaced. Choose a new folder`);
  }
  await fs.mkdir(out, { recursive: true });
  const files: CutFile[] = [];
  for (const c of clips) {
    const keys = exact || !c.windows.length ? [] : await keyframeTimes(ffprobe, c.source);
    const stem = path.basename(c.display, path.extname(c.display)).replace(/[^\w.-]+/g, '_');
    for (const [i, w] of c.windows.entries()) {
      const ext = exact ? '.mp4' : path.extname(c.display).toLowerCase() || '.mp4';
      const name = `${stem}_${c.eventId}_w${String(i + 1).padStart(2, '0')}_${w.start_s.toFixed(1)}-${w.end_s.toFixed(1)}s${ext}`;
      const file = path.join(out, name);
      const part = path.join(out, `.movesift-part-${name}`);
      const args = exact
        ? ['-v', 'error', '-y', '-i', c.source, '-ss', w.start_s.toFixed(3), '-to', w.end_s.toFixed(3), '-c:v', 'libx264', '-crf', '18', '-preset', 'medium', '-pix_fmt', 'yuv420p', '-c:a', 'aac', '-movflags', '+faststart', part]
        : ['-v', 'error', '-y', '-ss', w.start_s.toFixed(3), '-i', c.source, '-t', (w.end_s - w.start_s).toFixed(3), '-c', 'copy', '-avoid_negative_ts', 'make_zero', part];
      await run(ffmpeg, args);
      await renameNoClobber(part, file);
      // The copy starts on the last keyframe at or before the window (1 ms for the rounding of -ss).
      const fileStart = exact ? w.start_s : keys.filter((k) => k <= w.start_s + 1e-3).pop() ?? 0;
      const f = { eventId: c.eventId, source: c.display, window: i + 1, start_s: w.start_s, end_s: w.end_s, score: w.score, file: name, file_start_s: Math.round(fileStart * 1000) / 1000 };
      files.push(f);
      onFile?.(f);
    }
  }
  const index = ['source_clip,event,window,start_s,end_s,score,file,file_start_s,mode', ...files.map((f) => [f.source, f.eventId, f.window, f.start_s, f.end_s, f.score, f.file, f.file_start_s, exact ? 'exact' : 'keyframe'].map(csvCell).join(','))];
  await writeNew(path.join(out, 'windows-index.csv'), index.join('\n') + '\n');
  // time_of_max_n is a time in the source clip: a time read in the cut file plus file_start_s.
  const maxn = ['source_clip,window,start,end,start_s,end_s,file,file_start_s,species,max_n,time_of_max_n,observer,notes', ...files.map((f) => [f.source, f.window, stamp(f.start_s), stamp(f.end_s), f.start_s, f.end_s, f.file, f.file_start_s, '', '', '', '', ''].map(csvCell).join(','))];
  await writeNew(path.join(out, 'maxn-sheet.csv'), maxn.join('\n') + '\n');
  return files;
}
