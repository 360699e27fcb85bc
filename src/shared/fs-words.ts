/**
 * Plain words for what the file system refused, and which disk a folder is on, so that a
 * message says "the file system is read-only" or "the disk holding /media/card (mounted at
 * /media/card) has 1.2 MB free" instead of an errno name. The errno names are POSIX's (Node
 * passes them through as `code`).
 */
import { statSync, statfsSync } from 'node:fs';
import path from 'node:path';

const WORDS: Record<string, string> = {
  EROFS: 'the file system is read-only',
  EACCES: 'permission denied',
  EPERM: 'the operation is not permitted there',
  ENOENT: 'a folder on the way does not exist',
  ENOTDIR: 'a part of the path is a file, not a folder',
  EISDIR: 'it is a folder',
  ENOSPC: 'the disk is full',
  EDQUOT: 'the disk quota is used up',
  EEXIST: 'something of that name is already there',
  EXDEV: 'it is on another disk',
  EMFILE: 'too many files are open',
  ENAMETOOLONG: 'the name is too long for the file system',
  EIO: 'the disk reported an input/output error',
  EBUSY: 'it is in use',
};

/** What `e` says in words, with its errno name after for searching ("permission denied, EACCES"). */
export function fsReason(e: unknown): string {
  const code = (e as NodeJS.ErrnoException | undefined)?.code;
  if (code && WORDS[code]) return `${WORDS[code]}, ${code}`;
  return code ?? (e instanceof Error ? e.message : String(e));
}

/** A byte count as people read it (decimal units, as disks are sold). */
export function bytesInWords(n: number): string {
  if (n < 1000) return `${n} bytes`;
  const units = ['kB', 'MB', 'GB', 'TB'];
  let v = n / 1000;
  let u = 0;
  while (v >= 1000 && u < units.length - 1) {
    v /= 1000;
    u++;
  }
  return `${v.toFixed(v < 10 ? 1 : 0)} ${units[u]}`;
}

/** The nearest existing folder at or above `p`. */
function existing(p: string): string {
  let d = path.resolve(p);
  for (;;) {
    try {
      if (statSync(d).isDirectory()) return d;
    } catch {
      /* not there: go up */
    }
    const up = path.dirname(d);
    if (up === d) return d;
    d = up;
  }
}

/** The disk a folder is on, named by where it is mounted (the highest folder on the same
 *  device), and its free space: "the disk mounted at /media/card", 1200000. */
export function diskOf(folder: string): { name: string; free: number | null } {
  const d = existing(folder);
  let mount = d;
  try {
    const dev = statSync(d).dev;
    for (let up = path.dirname(mount); up !== mount && statSync(up).dev === dev; up = path.dirname(mount)) mount = up;
    const s = statfsSync(d);
    return { name: `the disk mounted at ${mount}`, free: Number(s.bavail) * Number(s.bsize) };
  } catch {
    return { name: `the disk holding ${d}`, free: null };
  }
}
