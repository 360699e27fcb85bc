/**
 * Moving one file without ever losing or overwriting one. On the same file system: a hard link
 * at the destination (which fails if anything is there) then the source's name removed, so the
 * file exists under at least one name at every instant; where links are not supported (FAT and
 * exFAT cards), a rename after checking the destination is free. Across file systems: copy to
 * a temporary name beside the destination, flush it to disk, check its SHA-256 against the
 * source's, give it its final name the same no-clobber way, and only then remove the source.
 */
import { createHash } from 'node:crypto';
import { constants, createReadStream, promises as fs } from 'node:fs';
import path from 'node:path';
import { diskOf } from '../shared/fs-words.js';
import { pipelineError, PipelineErrorCode } from './pipeline-errors.js';

export const PART_SUFFIX = '.movesift-part';

export async function sha256File(file: string): Promise<string> {
  const h = createHash('sha256');
  for await (const chunk of createReadStream(file)) h.update(chunk as Buffer);
  return h.digest('hex');
}

export async function exists(p: string): Promise<boolean> {
  try {
    await fs.lstat(p);
    return true;
  } catch {
    return false;
  }
}

async function fsyncPath(p: string): Promise<void> {
  const fh = await fs.open(p, 'r');
  try {
    await fh.sync();
  } catch {
    /* directories cannot be synced on every platform (Windows); the file itself was */
  } finally {
    await fh.close();
  }
}

/** Gives `from` the name `to`, refusing (E_APPLY_NAME_CLASH) when `to` exists. Same file system only. */
export async function renameNoClobber(from: string, to: string): Promise<void> {
  try {
    await fs.link(from, to);
    await fs.unlink(from);
    return;
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') throw pipelineError(PipelineErrorCode.nameClash, `${to}: a file of that name is already there; nothing was overwritten`);
    if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'EOPNOTSUPP' && code !== 'ENOSYS' && code !== 'EMLINK') throw e;
  }
  if (await exists(to)) throw pipelineError(PipelineErrorCode.nameClash, `${to}: a file of that name is already there; nothing was overwritten`);
  await fs.rename(from, to);
}

export type MoveMethod = 'rename' | 'copy' | 'copy-kept';

/**
 * Moves (or, with keepSource, copies) `from` to `to`, whose SHA-256 must be `sha`. Returns how.
 * Leaves either the source alone (on any failure before the final name is given) or the
 * destination complete; a temporary copy is removed on failure.
 */
export async function moveVerified(from: string, to: string, sha: string, keepSource: boolean): Promise<MoveMethod> {
  await fs.mkdir(path.dirname(to), { recursive: true });
  if (await exists(to)) throw pipelineError(PipelineErrorCode.nameClash, `${to}: a file of that name is already there; nothing was overwritten`);
  if (!keepSource) {
    const [a, b] = await Promise.all([fs.stat(from), fs.stat(path.dirname(to))]);
    if (a.dev === b.dev) {
      try {
        await renameNoClobber(from, to);
        await fsyncPath(path.dirname(to));
        return 'rename';
      } catch (e) {
        if ((e as NodeJS.ErrnoException).code !== 'EXDEV') throw e;
      }
    }
  }
  const tmp = to + PART_SUFFIX;
  try {
    await fs.copyFile(from, tmp, constants.COPYFILE_EXCL);
    await fsyncPath(tmp);
    const got = await sha256File(tmp);
    if (got !== sha) throw pipelineError(PipelineErrorCode.verifyFailed, `${to}: the copy's SHA-256 differs from the original's; the original was left in place`);
    await renameNoClobber(tmp, to);
    await fsyncPath(path.dirname(to));
  } catch (e) {
    await fs.rm(tmp, { force: true });
    if ((e as NodeJS.ErrnoException).code === 'ENOSPC') throw pipelineError(PipelineErrorCode.diskFull, `${path.dirname(to)}: ${diskOf(to).name} is full; ${from} was left in place`);
    if ((e as NodeJS.ErrnoException).code === 'EEXIST') throw pipelineError(PipelineErrorCode.nameClash, `${tmp}: a temporary file of that name is already there; nothing was overwritten`);
    throw e;
  }
  if (keepSource) return 'copy-kept';
  await fs.unlink(from);
  return 'copy';
}
