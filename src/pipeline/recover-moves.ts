/**
 * What a crash left half-way, finished or reversed from the journal and the disk. Each move
 * row says where the file was going and its SHA-256; the disk says where it is:
 * - only at the source: the move never happened; the row is closed as failed (the file is a
 *   candidate again);
 * - at the destination only, with the right hash: the move happened; the row says so;
 * - at both (a copy whose source was not yet removed, or a hard link not yet unlinked): the
 *   destination is checked and the move finished (or, for a copy-only apply, kept as a copy);
 * - a temporary copy beside the destination is removed.
 * An undo caught half-way is treated the same way in the other direction.
 */
import { promises as fs } from 'node:fs';
import type { MoveRow, MoveStore } from '../ledger/move-store.js';
import { exists, PART_SUFFIX, sha256File } from './safe-move.js';

export interface Recovery {
  finished: number;
  reversed: number;
  problems: string[];
}

export async function recoverMoves(store: MoveStore): Promise<Recovery> {
  const r: Recovery = { finished: 0, reversed: 0, problems: [] };
  for (const m of store.unfinished()) {
    if (m.state === 'planned') {
      store.setState(m.id, 'failed', null, 'interrupted before the move; the file was not touched');
      r.reversed++;
    } else if (m.state === 'moving') await settle(store, m, m.source, m.dest, 'moved', r);
    else if (m.state === 'restoring') await settle(store, m, m.dest, m.source, 'restored', r);
  }
  return r;
}

async function settle(store: MoveStore, m: MoveRow, from: string, to: string, arrived: 'moved' | 'restored', r: Recovery): Promise<void> {
  await fs.rm(to + PART_SUFFIX, { force: true });
  const [atFrom, atTo] = await Promise.all([exists(from), exists(to)]);
  const copyOnly = arrived === 'moved' && (await store.apply(m.apply_id))?.mode === 'copy';
  const notArrived = arrived === 'moved' ? 'failed' : 'moved';
  if (atTo && (await sha256File(to)) !== m.sha256) {
    r.problems.push(`${to}: does not match the journal's SHA-256; left as it is, look at it by hand`);
    store.setState(m.id, notArrived, null, 'interrupted; the destination does not match the SHA-256');
    return;
  }
  if (atTo && atFrom && !copyOnly) {
    await fs.unlink(from);
    store.setState(m.id, arrived, m.method ?? 'copy');
    r.finished++;
  } else if (atTo) {
    store.setState(m.id, arrived, copyOnly ? 'copy-kept' : (m.method ?? 'rename'));
    r.finished++;
  } else if (atFrom) {
    store.setState(m.id, notArrived, null, 'interrupted; the file was not moved');
    r.reversed++;
  } else {
    r.problems.push(`${from}: neither there nor at ${to}; the journal keeps its SHA-256 (${m.sha256})`);
    store.setState(m.id, notArrived, null, 'interrupted; the file is at neither place');
  }
}
