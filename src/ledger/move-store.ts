/**
 * The statements apply and undo work with: which media are set aside and still in place, the
 * journal of applies and moves (every state change its own small transaction, committed before
 * the next file-system step), and what a crash left half-way.
 */
import type { Ledger } from './open-ledger.js';

export interface MoveCandidate {
  media_id: number;
  event_id: string;
  root: string;
  rel_path: string;
  size: number;
  fingerprint: string;
}

export interface MoveRow {
  id: number;
  apply_id: number;
  media_id: number;
  event_id: string;
  source: string;
  dest: string;
  size: number;
  sha256: string;
  state: 'planned' | 'moving' | 'moved' | 'restoring' | 'restored' | 'failed';
  method: 'rename' | 'copy' | 'copy-kept' | null;
}

export interface ApplyRow {
  id: number;
  started_at: string;
  finished_at: string | null;
  target: string;
  mode: 'move' | 'copy';
  status: 'running' | 'done' | 'stopped' | 'undone';
  who: string | null;
}

const now = (): string => new Date().toISOString();
/** The latest journal row per media file. */
const LATEST_MOVE = 'SELECT mv.* FROM moves mv WHERE mv.id = (SELECT max(id) FROM moves WHERE media_id = mv.media_id)';

export function createMoveStore(db: Ledger) {
  const candidates = db.prepare<[], MoveCandidate>(
    `SELECT m.id AS media_id, em.event_id, r.path AS root, m.rel_path, m.size, m.fingerprint
     FROM latest_decisions d
     JOIN event_media em ON em.event_id = d.event_id
     JOIN media m ON m.id = em.media_id
     JOIN roots r ON r.id = m.root_id
     LEFT JOIN (${LATEST_MOVE}) lm ON lm.media_id = m.id
     WHERE d.decision = 'set-aside'
       AND NOT EXISTS (SELECT 1 FROM scan_errors se WHERE se.root_id = m.root_id AND se.rel_path = m.rel_path)
       AND (lm.id IS NULL OR lm.state IN ('restored', 'failed'))
     ORDER BY r.path, m.rel_path`,
  );
  const stmts = {
    roots: db.prepare<[], { path: string }>('SELECT path FROM roots ORDER BY path'),
    startApply: db.prepare("INSERT INTO applies (started_at, target, mode, status, who) VALUES (?, ?, ?, 'running', ?)"),
    endApply: db.prepare('UPDATE applies SET finished_at = ?, status = ? WHERE id = ?'),
    apply: db.prepare<[number], ApplyRow>('SELECT * FROM applies WHERE id = ?'),
    applies: db.prepare<[], ApplyRow & { moved: number; bytes: number }>(
      "SELECT a.*, (SELECT count(*) FROM moves WHERE apply_id = a.id AND state = 'moved') AS moved, (SELECT coalesce(sum(size), 0) FROM moves WHERE apply_id = a.id AND state = 'moved') AS bytes FROM applies a ORDER BY a.id",
    ),
    insertMove: db.prepare("INSERT INTO moves (apply_id, media_id, event_id, source, dest, size, sha256, state, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, 'planned', ?)"),
    setState: db.prepare('UPDATE moves SET state = ?, method = coalesce(?, method), error = ?, updated_at = ? WHERE id = ?'),
    unfinished: db.prepare<[], MoveRow>("SELECT * FROM moves WHERE state IN ('planned', 'moving', 'restoring') ORDER BY id"),
    movedOf: db.prepare<[number], MoveRow>("SELECT * FROM moves WHERE apply_id = ? AND state = 'moved' ORDER BY id"),
    movedAll: db.prepare<[], MoveRow>("SELECT * FROM moves WHERE state = 'moved' ORDER BY id"),
    movedOfEvent: db.prepare<[string], MoveRow>("SELECT * FROM moves WHERE event_id = ? AND state = 'moved' ORDER BY id"),
  };
  return {
    candidates: () => candidates.all(),
    roots: () => stmts.roots.all().map((r) => r.path),
    startApply: (target: string, mode: 'move' | 'copy', who: string | null) => Number(stmts.startApply.run(now(), target, mode, who).lastInsertRowid),
    endApply: (id: number, status: ApplyRow['status']) => void stmts.endApply.run(now(), status, id),
    apply: (id: number) => stmts.apply.get(id),
    applies: () => stmts.applies.all(),
    planMove: (applyId: number, c: MoveCandidate, source: string, dest: string, sha: string) => Number(stmts.insertMove.run(applyId, c.media_id, c.event_id, source, dest, c.size, sha, now()).lastInsertRowid),
    setState: (id: number, state: MoveRow['state'], method: MoveRow['method'] = null, error: string | null = null) => void stmts.setState.run(state, method, error, now(), id),
    unfinished: () => stmts.unfinished.all(),
    moved: (applyId?: number) => (applyId === undefined ? stmts.movedAll.all() : stmts.movedOf.all(applyId)),
    /** Files of these events that an apply moved and nothing has put back yet. */
    movedOfEvents: (eventIds: readonly string[]) => eventIds.flatMap((id) => stmts.movedOfEvent.all(id)),
  };
}

export type MoveStore = ReturnType<typeof createMoveStore>;
