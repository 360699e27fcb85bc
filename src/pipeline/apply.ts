/**
 * `apply`: moves the media of set-aside events into the set-aside folder, keeping their paths
 * below a folder named after their scan root, and journals every move in the ledger before and
 * after it happens. Checked before anything moves: the folder is not inside a scanned folder
 * (a rescan would find the media again) nor the other way round, no destination name is taken,
 * and the disk has room for what must be copied. Each file must still be the one that was
 * screened (its fingerprint), or it is left in place and reported. A manifest CSV is written
 * into the set-aside folder. Nothing is ever deleted: a move either completes or leaves the
 * original where it was.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { realTarget } from './output-guard.js';
import { fingerprintFile } from '../media/fingerprint.js';
import { openLedger } from '../ledger/open-ledger.js';
import { createMoveStore, type MoveCandidate, type MoveStore } from '../ledger/move-store.js';
import { pipelineError, PipelineErrorCode } from './pipeline-errors.js';
import { exists, moveVerified, sha256File } from './safe-move.js';
import { recoverMoves, type Recovery } from './recover-moves.js';
import { acquireLedgerLock, type LedgerLock } from '../ledger/ledger-lock.js';
import { bytesInWords, diskOf, fsReason } from '../shared/fs-words.js';
import { writeManifest } from './apply-manifest.js';

export interface ApplyOptions {
  ledger: string;
  to: string;
  dryRun?: boolean;
  /** Copy instead of move: the originals stay where they are. */
  copy?: boolean;
  who?: string | null;
  onFile?: (done: number, total: number, file: string) => void;
  signal?: AbortSignal;
}

export interface PlannedMove {
  candidate: MoveCandidate;
  source: string;
  dest: string;
}

export interface ApplySummary {
  applyId: number | null;
  dryRun: boolean;
  planned: PlannedMove[];
  bytes: number;
  moved: number;
  skipped: Array<{ file: string; code: string; message: string }>;
  recovered: Recovery;
  manifest: string | null;
  stopped: boolean;
}

const inside = (child: string, parent: string): boolean => {
  const rel = path.relative(parent, child);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
};

/** Destination of each set-aside file: <to>/<root folder name>/<path below the root>. */
export function planMoves(candidates: MoveCandidate[], to: string): PlannedMove[] {
  const labels = new Map<string, string>();
  const used = new Set<string>();
  for (const root of [...new Set(candidates.map((c) => c.root))].sort()) {
    const base = path.basename(root) || 'root';
    let label = base;
    for (let k = 2; used.has(label); k++) label = `${base}-${k}`;
    used.add(label);
    labels.set(root, label);
  }
  return candidates.map((c) => ({ candidate: c, source: path.join(c.root, c.rel_path), dest: path.join(to, labels.get(c.root)!, c.rel_path) }));
}

/**
 * The set-aside folder must lie outside every scanned folder and not above one. Judged on real
 * paths (links resolved, as far as the folder exists yet), so a link cannot lead the set-aside
 * media back into a scanned tree; and judged for a dry run too, which must say what the real
 * apply would say.
 */
function checkTarget(store: MoveStore, to: string): void {
  const target = realTarget(to);
  for (const root of store.roots()) {
    const r = realTarget(root);
    if (inside(target, r)) throw pipelineError(PipelineErrorCode.targetInsideRoot, `${to}: is inside the scanned folder ${root}${target !== path.resolve(to) ? ` (through a link: it is ${target})` : ''}; a rescan would find the set-aside media again. Choose a folder outside it`);
    if (inside(r, target)) throw pipelineError(PipelineErrorCode.targetInsideRoot, `${to}: holds the scanned folder ${root}; choose a folder that is not above it`);
  }
}

/** A recursive mkdir that fails part way reports ENOENT for the folder it first tried, whatever
 *  stopped it above (a read-only file system, no permission); making the first missing folder
 *  alone tells the true cause. */
async function trueCause(to: string, e: unknown): Promise<unknown> {
  if ((e as NodeJS.ErrnoException).code !== 'ENOENT') return e;
  let first = to;
  while (!(await exists(path.dirname(first))) && path.dirname(first) !== first) first = path.dirname(first);
  try {
    await fs.mkdir(first);
    await fs.rmdir(first);
    return e;
  } catch (cause) {
    return cause;
  }
}

async function preflight(store: MoveStore, plan: PlannedMove[], to: string, copy: boolean): Promise<void> {
  for (const p of plan) if (await exists(p.dest)) throw pipelineError(PipelineErrorCode.nameClash, `${p.dest}: a file of that name is already in the set-aside folder; nothing was moved or overwritten`);
  // The folders made here are removed again if the apply is refused below, so a refusal leaves
  // nothing behind (fs.mkdir reports the first folder it made).
  let made: string | undefined;
  const unmake = async (): Promise<void> => {
    for (let d = to; made && d.startsWith(made); d = path.dirname(d)) {
      await fs.rmdir(d).catch(() => undefined);
      if (d === made) break;
    }
  };
  try {
    made = await fs.mkdir(to, { recursive: true });
    // Write access is tried, not inferred from permission bits (root, read-only mounts, ACLs).
    const probe = path.join(to, `.movesift-probe-${process.pid}`);
    await fs.writeFile(probe, '');
    await fs.rm(probe);
  } catch (e) {
    await unmake();
    throw pipelineError(PipelineErrorCode.targetUnwritable, `${to}: cannot write there (${fsReason(await trueCause(to, e))}); nothing was moved. Choose a folder you can write to`);
  }
  const target = await fs.stat(to);
  let needed = 0;
  for (const p of plan) {
    const st = await fs.stat(p.source).catch(() => undefined);
    if (st && (copy || st.dev !== target.dev)) needed += st.size;
  }
  if (needed > 0) {
    const fsStat = await fs.statfs(to);
    const free = Number(fsStat.bavail) * Number(fsStat.bsize);
    if (free < needed) {
      const disk = diskOf(to);
      await unmake();
      throw pipelineError(PipelineErrorCode.diskFull, `${to}: the ${copy ? 'copies' : 'moves from another disk'} need ${bytesInWords(needed)} but ${disk.name} has ${bytesInWords(free)} free; nothing was moved. Free some space or choose a folder on another disk`);
    }
  }
}

export async function applyDecisions(o: ApplyOptions): Promise<ApplySummary> {
  const to = path.resolve(o.to);
  const db = openLedger(o.ledger);
  // A dry run only reads: no lock, and no move recovery, which would settle the journal rows of
  // an apply running now in another process (it deleted a live apply's part file once).
  let lock: LedgerLock | undefined;
  try {
    lock = o.dryRun ? undefined : acquireLedgerLock(o.ledger, 'apply');
    const store = createMoveStore(db);
    const recovered = o.dryRun ? { finished: 0, reversed: 0, problems: [] } : await recoverMoves(store);
    const plan = planMoves(store.candidates(), to);
    const bytes = plan.reduce((a, p) => a + p.candidate.size, 0);
    const summary: ApplySummary = { applyId: null, dryRun: !!o.dryRun, planned: plan, bytes, moved: 0, skipped: [], recovered, manifest: null, stopped: false };
    checkTarget(store, to);
    if (o.dryRun || plan.length === 0) return summary;
    await preflight(store, plan, to, !!o.copy);
    const applyId = store.startApply(to, o.copy ? 'copy' : 'move', o.who ?? null);
    summary.applyId = applyId;
    const done: Array<PlannedMove & { sha: string; method: string }> = [];
    try {
      for (const [i, p] of plan.entries()) {
        if (o.signal?.aborted) {
          summary.stopped = true;
          break;
        }
        o.onFile?.(i, plan.length, p.candidate.rel_path);
        const facts = await fingerprintFile(p.source).catch(() => undefined);
        if (!facts) {
          summary.skipped.push({ file: p.source, code: PipelineErrorCode.sourceMissing, message: `${p.source}: not found; it was left out` });
          continue;
        }
        if (facts.fingerprint !== p.candidate.fingerprint) {
          summary.skipped.push({ file: p.source, code: PipelineErrorCode.sourceChanged, message: `${p.source}: changed since it was screened; it was left in place (rescan, review, then apply again)` });
          continue;
        }
        const sha = await sha256File(p.source);
        const id = store.planMove(applyId, p.candidate, p.source, p.dest, sha);
        store.setState(id, 'moving');
        try {
          const method = await moveVerified(p.source, p.dest, sha, !!o.copy);
          store.setState(id, 'moved', method);
          done.push({ ...p, sha, method });
          summary.moved++;
        } catch (e) {
          store.setState(id, 'failed', null, `${(e as { code?: string }).code ?? 'E_IO'}: ${(e as Error).message}`);
          throw e;
        }
      }
    } catch (e) {
      store.endApply(applyId, 'stopped');
      summary.manifest = await writeManifest(to, applyId, done);
      throw e;
    }
    store.endApply(applyId, summary.stopped ? 'stopped' : 'done');
    summary.manifest = await writeManifest(to, applyId, done);
    return summary;
  } finally {
    db.close();
    lock?.release();
  }
}
