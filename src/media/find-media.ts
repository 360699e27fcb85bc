/**
 * Discovery: walks scanned folders for images and videos, and accounts for every other entry it
 * meets with the reason it was passed over, so that each path under a scanned folder ends
 * screened, in the errors, or in this list, never in none. Hidden and system files are passed
 * over (dot-files, AppleDouble `._*` forks, Thumbs.db, desktop.ini, a hidden folder as one
 * entry); symbolic links are followed once, and a folder already visited (by its real path) is
 * never entered again, so a link loop ends. Only regular files are media: a FIFO named `.JPG`
 * would block a reader for ever, and a device is not a photo. Paths are relative to the scanned
 * root with '/' separators on every platform.
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

/** Why an entry under a scanned folder was not screened. The report lists these; the names are
 *  part of its documented shape (report.ts). */
export const SkipReason = {
  notMedia: 'not-media',
  hidden: 'hidden-or-system',
  notRegular: 'not-a-regular-file',
  brokenLink: 'broken-link',
  unreadableFolder: 'unreadable-folder',
  visited: 'folder-already-scanned',
  ledgerFiles: 'ledger-files',
} as const;
export type SkipReasonName = (typeof SkipReason)[keyof typeof SkipReason];

export interface SkippedEntry {
  root: string;
  rel: string;
  reason: SkipReasonName;
}

export interface Discovery {
  files: FoundFile[];
  skipped: SkippedEntry[];
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

/** Walks one root. Throws E_FOLDER_MISSING when the root is not a readable folder. Paths in
 *  `exclude` (the ledger's own files and preview folder, when it lies in a scanned folder) are
 *  passed over as the tool's own. */
export async function findMedia(root: string, exclude: readonly string[] = []): Promise<Discovery> {
  const absRoot = path.resolve(root);
  let st;
  try {
    st = await fs.stat(absRoot);
  } catch {
    throw mediaError(MediaErrorCode.folderMissing, `${root}: no such folder; check the path (a card may not be mounted)`);
  }
  if (!st.isDirectory()) throw mediaError(MediaErrorCode.folderMissing, `${root}: is a file, not a folder; give the folder that holds the media`);
  const files: FoundFile[] = [];
  const skipped: SkippedEntry[] = [];
  const relOf = (abs: string): string => path.relative(absRoot, abs).split(path.sep).join('/');
  const skip = (abs: string, reason: SkipReasonName): void => void skipped.push({ root: absRoot, rel: relOf(abs), reason });
  const seen = new Set<string>();
  const excluded = new Set<string>();
  for (const x of exclude) {
    excluded.add(path.resolve(x));
    try {
      excluded.add(await fs.realpath(x));
    } catch {
      /* not created yet */
    }
  }
  const walk = async (dir: string): Promise<void> => {
    let real: string;
    try {
      real = await fs.realpath(dir);
    } catch {
      return skip(dir, SkipReason.brokenLink);
    }
    if (excluded.has(real)) return skip(dir, SkipReason.ledgerFiles);
    if (seen.has(real)) return skip(dir, SkipReason.visited);
    seen.add(real);
    let entries;
    try {
      entries = await fs.readdir(dir, { withFileTypes: true });
    } catch {
      return skip(dir, SkipReason.unreadableFolder); // its files cannot be listed to record
    }
    entries.sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const abs = path.join(dir, e.name);
      if (isSkippedName(e.name)) {
        skip(abs, SkipReason.hidden);
        continue;
      }
      if (excluded.has(abs) || excluded.has(path.join(real, e.name))) {
        skip(abs, SkipReason.ledgerFiles);
        continue;
      }
      let isDir = e.isDirectory();
      let isFile = e.isFile();
      if (e.isSymbolicLink()) {
        try {
          const t = await fs.stat(abs);
          isDir = t.isDirectory();
          isFile = t.isFile();
        } catch {
          skip(abs, SkipReason.brokenLink); // dangling, or a loop of links (ELOOP)
          continue;
        }
      }
      if (isDir) await walk(abs);
      else if (!isFile) skip(abs, SkipReason.notRegular);
      else {
        const kind = mediaKindOf(e.name);
        if (!kind) {
          skip(abs, SkipReason.notMedia);
          continue;
        }
        const rel = relOf(abs);
        const folder = rel.includes('/') ? rel.slice(0, rel.lastIndexOf('/')) : '';
        files.push({ root: absRoot, rel, abs, kind, folder });
      }
    }
  };
  await walk(absRoot);
  return { files, skipped };
}
