/**
 * One writer per ledger: a lock file beside it (`<ledger>.lock`, created with O_EXCL, so two
 * processes can never both create it) naming the process that holds it, taken by every operation
 * that writes at length or moves files (scan, apply, undo). A second one is refused with who
 * holds it and since when. A lock whose process is gone (same host, no such pid) is stale: it is
 * taken over, and the caller is told. Short writes (a decision, an audit answer) need no lock:
 * each is one SQLite transaction, which SQLite serialises itself.
 *
 * Why a file and not SQLite's own locking: an apply spends most of its time moving files between
 * short transactions, and a dry run or a second apply must see that it is running (a dry run
 * must never run move recovery under a live apply: pipeline/apply.ts).
 */
import { closeSync, openSync, readFileSync, unlinkSync, writeSync } from 'node:fs';
import os from 'node:os';
import { MovesiftError } from '../shared/errors.js';

export const LedgerLockCode = { busy: 'E_LEDGER_BUSY' } as const;

export interface LockHolder {
  pid: number;
  host: string;
  command: string;
  since: string;
}

export interface LedgerLock {
  release(): void;
  /** The stale lock this one replaced, when there was one. */
  tookOver?: LockHolder;
}

export const lockFileOf = (ledger: string): string => `${ledger}.lock`;

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    // EPERM: the process exists but belongs to someone else.
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

function readHolder(file: string): LockHolder | undefined {
  try {
    const h = JSON.parse(readFileSync(file, 'utf8')) as LockHolder;
    return typeof h.pid === 'number' && typeof h.host === 'string' ? h : undefined;
  } catch {
    return undefined;
  }
}

export function acquireLedgerLock(ledger: string, command: string): LedgerLock {
  const file = lockFileOf(ledger);
  const me: LockHolder = { pid: process.pid, host: os.hostname(), command, since: new Date().toISOString() };
  let tookOver: LockHolder | undefined;
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const fd = openSync(file, 'wx');
      try {
        writeSync(fd, JSON.stringify(me) + '\n');
      } finally {
        closeSync(fd);
      }
      let released = false;
      return {
        tookOver,
        release: () => {
          if (released) return;
          released = true;
          // Only our own lock: never one a later process took over.
          if (readHolder(file)?.pid === me.pid && readHolder(file)?.since === me.since) unlinkSync(file);
        },
      };
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST') throw e;
    }
    const h = readHolder(file);
    // Unreadable (a writer between create and write) or held by a live process: busy.
    if (h && h.host === me.host && h.pid !== me.pid && !alive(h.pid)) {
      tookOver = h;
      try {
        unlinkSync(file);
      } catch {
        // another process took it over first; try again
      }
      continue;
    }
    const who = h ? `${h.command} (process ${h.pid} on ${h.host}) since ${h.since}` : 'another Movesift process';
    throw new MovesiftError(LedgerLockCode.busy, `${ledger}: in use by ${who}; wait for it to finish (if that process is gone from another machine, delete ${file})`);
  }
  throw new MovesiftError(LedgerLockCode.busy, `${ledger}: its lock ${file} keeps changing hands; try again`);
}

/** Runs `f` holding the ledger's lock; the lock is released however `f` ends. */
export async function withLedgerLock<T>(ledger: string, command: string, f: (lock: LedgerLock) => Promise<T>): Promise<T> {
  const lock = acquireLedgerLock(ledger, command);
  try {
    return await f(lock);
  } finally {
    lock.release();
  }
}
