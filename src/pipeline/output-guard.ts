/**
 * Where the tool may write a file it produces (a report, an export): never over a ledger (any
 * SQLite file: it holds decisions and the journal that undo needs), never over a medium this
 * ledger screened or moved into a set-aside folder, never into a ledger's previews; over any
 * other existing file only when the user said so (`--force`, or `force` in the request). Paths
 * are judged after links are resolved, so a link cannot lead a write onto a protected file.
 * Then the text is written to a part file beside it and renamed into place, so a reader never
 * sees half a file.
 */
import { closeSync, existsSync, openSync, readSync, realpathSync, renameSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { mediaKindOf } from '../media/find-media.js';
import { MovesiftError } from '../shared/errors.js';
import type { Ledger } from '../ledger/open-ledger.js';
import { isLedgerMedium, ledgerRoots, setAsidePaths } from '../ledger/export-rows.js';

export const OutputErrorCode = {
  /** The target exists and replacing it was not asked for. */
  exists: 'E_OUTPUT_EXISTS',
  /** The target is a ledger, a screened or set-aside medium, or a ledger's previews: never replaced. */
  protectedFile: 'E_OUTPUT_PROTECTED',
} as const;

/** Resolves links: the file itself when it exists, else its folder (as far as it exists) and its name. */
export function realTarget(file: string): string {
  const abs = path.resolve(file);
  if (existsSync(abs)) return realpathSync(abs);
  let dir = path.dirname(abs);
  const rest = [path.basename(abs)];
  while (!existsSync(dir) && path.dirname(dir) !== dir) {
    rest.unshift(path.basename(dir));
    dir = path.dirname(dir);
  }
  return path.join(existsSync(dir) ? realpathSync(dir) : dir, ...rest);
}

function isSqlite(file: string): boolean {
  const fd = openSync(file, 'r');
  try {
    const head = Buffer.alloc(16);
    return readSync(fd, head, 0, 16, 0) === 16 && head.toString('latin1') === 'SQLite format 3\0';
  } finally {
    closeSync(fd);
  }
}

export interface OutputContext {
  /** The ledger the output comes from (its path as opened). */
  ledger: string;
  db: Ledger;
  force: boolean;
}

/** Throws E_OUTPUT_PROTECTED or E_OUTPUT_EXISTS when `file` may not be written. */
export function checkOutput(file: string, o: OutputContext): void {
  const target = realTarget(file);
  const ledger = realTarget(o.ledger);
  const refuse = (why: string): never => {
    throw new MovesiftError(OutputErrorCode.protectedFile, `${file}: ${why}; it is never replaced. Choose another name.`);
  };
  if ([ledger, `${ledger}-wal`, `${ledger}-shm`, `${ledger}-journal`].includes(target)) refuse('is the ledger (its decisions and the journal undo needs)');
  const previews = `${ledger}.previews`;
  if (target === previews || target.startsWith(previews + path.sep)) refuse("is inside the ledger's previews");
  for (const root of ledgerRoots(o.db)) {
    const r = realTarget(root);
    if (target.startsWith(r + path.sep) && isLedgerMedium(o.db, root, path.relative(r, target).split(path.sep).join('/'))) refuse('is a medium this ledger screened');
  }
  if (setAsidePaths(o.db).some((d) => realTarget(d) === target)) refuse('is a medium an apply moved into a set-aside folder');
  if (!existsSync(target)) return;
  if (statSync(target).isDirectory()) throw new MovesiftError(OutputErrorCode.exists, `${file}: is a folder; give a file name`);
  if (isSqlite(target)) refuse('is a SQLite database (perhaps another ledger)');
  if (!o.force) throw new MovesiftError(OutputErrorCode.exists, `${file}: already exists; give --force to replace it, or choose another name`);
}

/** Checks `file` (checkOutput), then writes `text` to a part file beside it and renames it into place. */
export function writeOutput(file: string, text: string, o: OutputContext): void {
  checkOutput(file, o);
  const part = `${file}.part`;
  writeFileSync(part, text);
  renameSync(part, file);
}

/** For a file made without a ledger (a shard plan): the same refusals that need no ledger. A
 *  photo or clip by its name, a SQLite file and a folder are never replaced; another file only
 *  with `force`. Written to a part file and renamed into place. */
export function writePlainOutput(file: string, text: string, force: boolean): void {
  const target = realTarget(file);
  if (mediaKindOf(target)) throw new MovesiftError(OutputErrorCode.protectedFile, `${file}: is named like a photo or clip; it is never replaced. Choose another name.`);
  if (existsSync(target)) {
    if (statSync(target).isDirectory()) throw new MovesiftError(OutputErrorCode.exists, `${file}: is a folder; give a file name`);
    if (isSqlite(target)) throw new MovesiftError(OutputErrorCode.protectedFile, `${file}: is a SQLite database (perhaps a ledger); it is never replaced. Choose another name.`);
    if (!force) throw new MovesiftError(OutputErrorCode.exists, `${file}: already exists; give --force to replace it, or choose another name`);
  }
  const part = `${file}.part`;
  writeFileSync(part, text);
  renameSync(part, file);
}
