/**
 * `undo`: every file an apply placed in the set-aside folder goes back where it came from, each
 * checked against the SHA-256 taken before it moved (a file changed while set aside is left
 * where it is and reported, never put back silently). A copy-only apply's copies are removed
 * once the originals are confirmed intact. Journalled like apply, so a crash is recovered.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { openLedger } from '../ledger/open-ledger.js';
import { createMoveStore } from '../ledger/move-store.js';
import { pipelineError, PipelineErrorCode } from './pipeline-errors.js';
import { recoverMoves, type Recovery } from './recover-moves.js';
import { acquireLedgerLock, type LedgerLock } from '../ledger/ledger-lock.js';
import { exists, moveVerified, sha256File } from './safe-move.js';

export interface UndoSummary {
  applies: number[];
  restored: number;
  problems: Array<{ file: string; code: string; message: string }>;
  recovered: Recovery;
}

/** `events`: put back only these events' files (an event kept after its files were set aside),
 *  from whichever apply moved them; the rest of each apply stays where it is. */
export async function undoApply(o: { ledger: string; applyId?: number; events?: readonly string[]; onFile?: (done: number, total: number, file: string) => void }): Promise<UndoSummary> {
  const db = openLedger(o.ledger);
  let lock: LedgerLock | undefined;
  try {
    lock = acquireLedgerLock(o.ledger, 'undo');
    const store = createMoveStore(db);
    if (o.applyId !== undefined && !store.apply(o.applyId)) throw pipelineError(PipelineErrorCode.unknownApply, `no apply ${o.applyId} in this ledger; \`movesift undo --list\` shows them`);
    const recovered = await recoverMoves(store);
    const rows = o.events ? store.movedOfEvents(o.events).filter((m) => o.applyId === undefined || m.apply_id === o.applyId) : store.moved(o.applyId);
    const summary: UndoSummary = { applies: [...new Set(rows.map((r) => r.apply_id))], restored: 0, problems: [], recovered };
    for (const [i, m] of rows.entries()) {
      o.onFile?.(i, rows.length, m.source);
      const problem = (code: string, message: string) => summary.problems.push({ file: m.dest, code, message });
      if (!(await exists(m.dest))) {
        problem(PipelineErrorCode.undoMissing, `${m.dest}: not in the set-aside folder any more; the journal keeps its SHA-256 (${m.sha256})`);
        continue;
      }
      if ((await sha256File(m.dest)) !== m.sha256) {
        problem(PipelineErrorCode.undoHashMismatch, `${m.dest}: changed since it was set aside; left where it is`);
        continue;
      }
      store.setState(m.id, 'restoring');
      try {
        if (m.method === 'copy-kept') {
          if (!(await exists(m.source)) || (await sha256File(m.source)) !== m.sha256) throw pipelineError(PipelineErrorCode.undoHashMismatch, `${m.source}: the original is missing or changed, so its copy ${m.dest} is kept`);
          await fs.unlink(m.dest);
        } else await moveVerified(m.dest, m.source, m.sha256, false);
        store.setState(m.id, 'restored');
        summary.restored++;
      } catch (e) {
        store.setState(m.id, 'moved');
        problem((e as { code?: string }).code ?? 'E_IO', (e as Error).message);
      }
    }
    for (const id of summary.applies) if (store.moved(id).length === 0) store.endApply(id, 'undone');
    // The folders apply made below its set-aside folder, where undo emptied them (rmdir refuses
    // any that still hold something; the set-aside folder itself is the person's and stays).
    for (const id of summary.applies) {
      const target = store.apply(id)?.target;
      if (!target) continue;
      const dirs = new Set(rows.filter((m) => m.apply_id === id).map((m) => path.dirname(m.dest)));
      for (let dir of [...dirs].sort((a, b) => b.length - a.length)) {
        while (dir.startsWith(target + path.sep) && dir !== target) {
          try {
            await fs.rmdir(dir);
          } catch {
            break;
          }
          dir = path.dirname(dir);
        }
      }
    }
    return summary;
  } finally {
    db.close();
    lock?.release();
  }
}
