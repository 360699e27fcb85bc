/**
 * Discovery: walks scanned folders for images and videos. Hidden and system files are skipped
 * (dot-files, AppleDouble `._*` forks, Thumbs.db, desktop.ini); symbolic links are followed once,
 * and a folder already visited (by its real path) is never entered again, so a link loop ends.
 * Paths are reported relative to the scanned root with '/' separators on every platform.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { MediaErrorCode, mediaError } from './media-errors.js';

export const MediaKind = { image: 'image', video: 'video' } as const;
export type MediaKindName = (typeof MediaKind)[keyof typeof MediaKind];

const IMAGE_EXT = new Set(['.jpg', '.jpeg', '.png', '.tif', '.tiff', '.webp']);
const VIDEO_EXT = new Set(['.mp4', '.mov', '.avi', '.mkv', '.m4v', '.mts']);
const SYSTEM_NAMES = new Set(['thumbs.db', 'desktop.ini', 'ehthumbs.db']);

export interface FoundFile {
  root: string;
  /** Relative to root, '/'-separated. */
  rel: string;
  abs: string;
  kind: MediaKindName;
  /** Relative folder ('' for the root itself). */
  folder: string;
}

export function mediaKindOf(name: string): MediaKindName | undefined {
  const ext = path.extname(name).toLowerCase();
  if (IMAGE_EXT.has(ext)) return MediaKind.image;
  if (VIDEO_EXT.has(ext)) return MediaKind.video;
  return undefined;
}

export function isSkippedName(name: string): boolean {
  return name.startsWith('.') || SYSTEM_NAMES.has(name.toLowerCase()) || name.startsWith('$RECYCLE');
}

/** Walks one root. Throws E_FOLDER_MISSING when the root is not a readable folder. Folders in
 *  `exclude` (absolute paths: the ledger's own preview cache) are never entered. */
export async function findMedia(root: string, exclude: readonly string[] = []): Promise<FoundFile[]> {
  const absRoot = path.resolve(root);
  let st;
  try {
    st = await fs.stat(absRoot);
  } catch {
    throw mediaError(MediaErrorCode.folderMissing, `${root}: no such folder; check the path (a card may not be mounted)`);
  }
  if (!st.isDirectory()) throw mediaError(MediaErrorCode.folderMissing, `${root}: is a file, not a folder; give the folder that holds the media`);
  const out: FoundFile[] = [];
  const seen = new Set<string>();
  for (const x of exclude) {
    try {
      seen.add(await fs.realpath(x));
    } catch {
      seen.add(path.resolve(x)); // not created yet
    }
  }
  const walk = async (dir: string): Promise<void> => {
    let real: string;
    try {
      real = await fs.realpath(dir);
    } catch {
      return;
    }
    if (seen.has(real)) return;
    seen.add(real);
    let entries;
    try {
      entries = await fs.readdir(dir, { withFileTypes: true });
    } catch {
      return; // an unreadable sub-folder is skipped; its files cannot be listed to record
    }
    entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      if (isSkippedName(e.name)) continue;
      const abs = path.join(dir, e.name);
      let isDir = e.isDirectory();
      let isFile = e.isFile();
      if (e.isSymbolicLink()) {
        try {
          const t = await fs.stat(abs);
          isDir = t.isDirectory();
          isFile = t.isFile();
        } catch {
          continue; // a dangling link
        }
      }
      if (isDir) await walk(abs);
      else if (isFile) {
        const kind = mediaKindOf(e.name);
        if (!kind) continue;
        const rel = path.relative(absRoot, abs).split(path.sep).join('/');
        const folder = rel.includes('/') ? rel.slice(0, rel.lastIndexOf('/')) : '';
        out.push({ root: absRoot, rel, abs, kind, folder });
      }
    }
  };
  await walk(absRoot);
  return out;
}
