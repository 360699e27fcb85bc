/**
 * The one place that finds ffmpeg and ffprobe. Tried in order, each checked by running
 * `-version`: the MOVESIFT_FFMPEG / MOVESIFT_FFPROBE environment variables, the optional
 * `ffmpeg-static` package, the `@ffmpeg-installer/ffmpeg` and `@ffprobe-installer/ffprobe`
 * packages (binaries shipped inside npm packages), then `ffmpeg`/`ffprobe` on PATH. When none
 * works, one error lists what was tried and how to fix it.
 */
import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { MediaErrorCode, mediaError } from './media-errors.js';

const require = createRequire(import.meta.url);

export interface Binaries {
  ffmpeg: string;
  ffprobe: string;
}

type Tool = 'ffmpeg' | 'ffprobe';

function fromPackage(name: string, pick: (m: unknown) => unknown): string | undefined {
  try {
    const p = pick(require(name));
    return typeof p === 'string' && p ? p : undefined;
  } catch {
    return undefined;
  }
}

function candidates(tool: Tool): Array<{ from: string; path: string | undefined }> {
  const env = tool === 'ffmpeg' ? process.env.MOVESIFT_FFMPEG : process.env.MOVESIFT_FFPROBE;
  const list: Array<{ from: string; path: string | undefined }> = [{ from: `MOVESIFT_${tool.toUpperCase()}`, path: env || undefined }];
  if (tool === 'ffmpeg') {
    list.push({ from: 'ffmpeg-static', path: fromPackage('ffmpeg-static', (m) => m) });
    list.push({ from: '@ffmpeg-installer/ffmpeg', path: fromPackage('@ffmpeg-installer/ffmpeg', (m) => (m as { path?: string }).path) });
  } else {
    list.push({ from: '@ffprobe-installer/ffprobe', path: fromPackage('@ffprobe-installer/ffprobe', (m) => (m as { path?: string }).path) });
  }
  list.push({ from: 'PATH', path: tool });
  return list;
}

function works(bin: string): boolean {
  const r = spawnSync(bin, ['-version'], { stdio: 'ignore', timeout: 15000 });
  return r.status === 0;
}

let cached: Binaries | undefined;

function resolveTool(tool: Tool, tried: string[]): string | undefined {
  for (const c of candidates(tool)) {
    if (!c.path) {
      tried.push(`${c.from}: not set or not installed`);
      continue;
    }
    if (works(c.path)) return c.path;
    tried.push(`${c.from}: ${c.path} did not run`);
  }
  return undefined;
}

/** Finds both binaries once per process; throws E_FFMPEG_MISSING naming every place tried. */
export function resolveBinaries(): Binaries {
  if (cached) return cached;
  const tried: string[] = [];
  const ffmpeg = resolveTool('ffmpeg', tried);
  const ffprobe = resolveTool('ffprobe', tried);
  if (!ffmpeg || !ffprobe) {
    throw mediaError(
      MediaErrorCode.ffmpegMissing,
      `video needs ffmpeg and ffprobe, and ${!ffmpeg ? 'ffmpeg' : 'ffprobe'} was not found. Tried: ${tried.join('; ')}. ` +
        'Fix: run `npm ci` (installs @ffmpeg-installer/ffmpeg and @ffprobe-installer/ffprobe), install ffmpeg on PATH, ' +
        'or set MOVESIFT_FFMPEG and MOVESIFT_FFPROBE to the binaries.',
    );
  }
  cached = { ffmpeg, ffprobe };
  return cached;
}

/** For tests: forget the cached result so a changed environment is seen. */
export function forgetBinaries(): void {
  cached = undefined;
}
