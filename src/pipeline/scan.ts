/**
 * A scan: discover media under each root, take inventory, group events per deployment,
 * reconcile them with the ledger, then analyse every event that has no current analysis,
 * committing one transaction per event. Interrupted at any point, the next run picks up where
 * this one stopped: what is committed is complete, what is not is redone.
 */
import path from 'node:path';
import { findMedia, type Discovery, type FoundFile } from '../media/find-media.js';
import { openLedger } from '../ledger/open-ledger.js';
import { createScanStore, type EventPlan, type MediaRow } from '../ledger/scan-store.js';
import { MAX_EVENT_FRAMES, groupEvents, type Group } from './group-events.js';
import { ENGINE_VERSION, hashOf, paramHash, type AnalysisSettings } from './engine-version.js';
import { loadClassifier } from '../classifier/session.js';
import { createTaskWorkspace, runEventTask, type EventTask, type TaskFile, type TaskOutcome } from './analyse-task.js';
import { deploymentIdOf, readDeploymentsTable, type DeploymentFacts } from './deployments-table.js';
import { takeInventory } from './inventory.js';
import { analysisSize } from '../kernels/downscale.js';
import { createHash } from 'node:crypto';
import type { ScanProgress, ScanSummary } from './progress.js';
import { createWorkerPool } from './worker-pool.js';
import { safeOutcome } from './safe-outcome.js';
import { deploymentStrip } from './deployment-strip.js';
import { MIN_CONSENSUS_FRAMES } from '../kernels/data-strip.js';
import { calibrationNote, deploymentPass } from './deployment-pass.js';
import { isoPlusSeconds } from '../media/capture-time.js';
import { acquireLedgerLock, lockFileOf, type LedgerLock } from '../ledger/ledger-lock.js';

export interface ScanOptions {
  roots: string[];
  ledger: string;
  analysisWidth?: number;
  videoFps?: number;
  eventGapS?: number;
  flow?: boolean;
  /** A change classifier's manifest (classifier/manifest.ts), checked before anything is read. */
  classifier?: string;
  /** Let pass two raise each deployment's likely-blank cut (kernels/deployment-calibration.ts).
   *  Off by default: it trades low-scoring animals for false triggers (docs/held-out-validation.md). */
  deploymentCut?: boolean;
  deploymentsTable?: string;
  /** Only these deployments (a shard of a plan, shard-plan.ts), by `${root}\0${id}`; entries
   *  passed over in folders of no deployment go with the shard that says `unassigned`. */
  only?: { deployments: ReadonlySet<string>; unassigned: boolean };
  /** Which shard of which plan this scan is, recorded with it so that merge can check. */
  shardOf?: { plan: string; index: number; shards: number };
  /** Runs analyses; defaults to in-process (workers 1) or a worker-thread pool. Tests pass their own. */
  runner?: (task: EventTask) => Promise<TaskOutcome>;
  /** Worker threads for analysis; 1 runs in the calling thread. */
  workers?: number;
  signal?: AbortSignal;
  onProgress?: (p: ScanProgress) => void;
}

export type { ScanSummary };

export const DEFAULTS = { analysisWidth: 384, videoFps: 4, eventGapS: 5 } as const;

export function cacheDirOf(ledger: string): string {
  return `${path.resolve(ledger)}.previews`;
}

/** The ledger's own files (SQLite's beside it, the lock, the previews): passed over when the
 *  ledger lies in a scanned folder. Names as open-ledger.ts, ledger-lock.ts and cacheDirOf make them. */
const ledgerFiles = (ledger: string): string[] => {
  const f = path.resolve(ledger);
  return [f, `${f}-wal`, `${f}-shm`, `${f}-journal`, lockFileOf(f), cacheDirOf(f)];
};

const eventIdOf = (deployment: string, firstRel: string): string => 'e' + createHash('sha256').update(`${deployment}\0${firstRel}`).digest('hex').slice(0, 12);

export async function scan(o: ScanOptions): Promise<ScanSummary> {
  const t0 = Date.now();
  const settings: AnalysisSettings = { analysisWidth: o.analysisWidth ?? DEFAULTS.analysisWidth, videoFps: o.videoFps ?? DEFAULTS.videoFps, flow: !!o.flow };
  // A model that does not keep its contract is refused before the ledger is touched.
  const classifier = o.classifier ? path.resolve(o.classifier) : undefined;
  if (classifier) {
    const c = await loadClassifier(classifier);
    settings.classifier = hashOf([c.manifest.sha256, JSON.stringify(c.manifest.combine), String(c.manifest.cropsPerEvent)]);
    await c.release();
  }
  const gap = o.eventGapS ?? DEFAULTS.eventGapS;
  const emit = o.onProgress ?? (() => {});
  const table = o.deploymentsTable ? readDeploymentsTable(o.deploymentsTable) : new Map<string, DeploymentFacts>();
  const roots = o.roots.map((r) => path.resolve(r));
  emit({ type: 'phase', phase: 'discover' });
  const discovered: Discovery[] = [];
  for (const r of roots) discovered.push(await findMedia(r, ledgerFiles(o.ledger))); // a missing folder throws before the ledger is touched
  if (o.only) {
    // A shard scans whole deployments of the plan and nothing else (shard-plan.ts).
    const only = o.only;
    const mine = (root: string, folder: string): boolean => only.deployments.has(`${root}\0${deploymentIdOf(table, root, folder)}`);
    const folders = discovered.map((d) => new Set(d.files.map((f) => f.folder)));
    discovered.forEach((d, i) => {
      d.files = d.files.filter((f) => mine(roots[i], f.folder));
      d.skipped = d.skipped.filter((x) => {
        const folder = x.rel.includes('/') ? x.rel.slice(0, x.rel.lastIndexOf('/')) : '';
        return folders[i].has(folder) ? mine(roots[i], folder) : only.unassigned;
      });
    });
  }
  const found = discovered.map((d) => d.files);
  const db = openLedger(o.ledger, { create: true });
  let lock: LedgerLock;
  try {
    lock = acquireLedgerLock(o.ledger, 'scan');
  } catch (e) {
    db.close();
    throw e;
  }
  const store = createScanStore(db);
  const hash = paramHash(settings);
  const scanId = store.startScan(roots, { ...settings, eventGapS: gap, deploymentCut: !!o.deploymentCut, ...(o.shardOf ? { shard: o.shardOf } : {}) }, ENGINE_VERSION);
  const workers = Math.max(1, Math.floor(o.workers ?? 1));
  const pool = !o.runner && workers > 1 ? createWorkerPool(workers) : undefined;
  const workspace = createTaskWorkspace(); // the in-process analyses' (a pool's threads have their own)
  const runner = (t: EventTask): Promise<TaskOutcome> => (pool ? pool.run(t) : safeOutcome(t, o.runner ?? ((x) => runEventTask(x, workspace))));
  const cacheDir = cacheDirOf(o.ledger);
  const summary: ScanSummary = { scanId, stopped: false, files: 0, events: 0, analysed: 0, skipped: 0, errors: 0, verdicts: { 'likely-blank': 0, unsure: 0, motion: 0 }, seconds: 0, tookOverLock: lock.tookOver, passedOver: {} };
  for (const d of discovered) for (const x of d.skipped) summary.passedOver[x.reason] = (summary.passedOver[x.reason] ?? 0) + 1;
  try {
    const totalFiles = found.reduce((a, f) => a + f.length, 0);
    summary.files = totalFiles;
    emit({ type: 'phase', phase: 'read', total: totalFiles });
    const tasks: Array<{ task: EventTask; plan: EventPlan; rootId: number; rels: string[] }> = [];
    const awayKeys = new Set<string>();
    const touched = new Set<string>();
    let read = 0;
    for (let ri = 0; ri < roots.length; ri++) {
      const root = roots[ri];
      const rootId = store.ensureRoot(root);
      const deploymentOf = (f: FoundFile): string => deploymentIdOf(table, root, f.folder);
      const folders = new Map<string, string>();
      for (const f of found[ri]) folders.set(deploymentOf(f), f.folder);
      store.upsertDeployments([...folders].map(([id, folder]) => {
        const t = table.get(folder);
        return { id, root_id: rootId, folder, location_name: t?.locationName ?? null, latitude: t?.latitude ?? null, longitude: t?.longitude ?? null, camera_id: t?.cameraID ?? null, camera_model: t?.cameraModel ?? null };
      }));
      store.replaceSkipped(rootId, discovered[ri].skipped);
      const inv = await takeInventory(found[ri], rootId, deploymentOf, store, settings.analysisWidth, (f) => emit({ type: 'progress', phase: 'read', done: ++read, total: totalFiles, file: f.rel }), o.signal);
      if (o.signal?.aborted) break;
      db.transaction(() => {
        for (const e of inv.errors) store.putError(rootId, e.rel, e.error, scanId);
        const bad = new Set(inv.errors.map((e) => e.rel));
        for (const r of inv.rows) if (!bad.has(r.rel_path) && store.error(rootId, r.rel_path)?.stage === 'read') store.clearError(rootId, r.rel_path);
        store.pruneErrors(rootId, new Set(found[ri].map((f) => f.rel)));
      })();
      for (const e of inv.errors) emit({ type: 'error', file: e.rel, code: e.error.code, message: e.error.message });
      // Media an apply moved to a set-aside folder keep their place in their events: the scan
      // no longer finds them, but they were screened and decided, and undo may bring them back.
      const seen = new Set(inv.rows.map((r) => r.rel_path));
      for (const { id: _id, ...m } of store.movedAway(rootId)) {
        if (seen.has(m.rel_path)) continue;
        inv.rows.push(m);
        awayKeys.add(`${rootId}:${m.rel_path}`);
      }
      const ids = store.replaceRootMedia(rootId, inv.rows);
      const rows = inv.rows.map((r, i) => ({ ...r, id: ids[i] }));
      const byDeployment = new Map<string, typeof rows>();
      for (const r of rows) {
        const list = byDeployment.get(r.deployment_id);
        if (list) list.push(r);
        else byDeployment.set(r.deployment_id, [r]);
      }
      const plans: EventPlan[] = [];
      for (const dep of byDeployment.keys()) touched.add(dep);
      for (const [dep, media] of byDeployment) {
        const byId = new Map(media.map((m) => [m.id, m]));
        const groups = groupEvents(media.map((m) => ({ mediaId: m.id, rel: m.rel_path, kind: m.kind, sortMs: m.capture_sort_ms })), gap, MAX_EVENT_FRAMES);
        const images = groups.filter((g) => g.kind !== 'clip');
        const neighbourMap = imageNeighbours(images, byId);
        // The deployment's data strip by consensus of its triggers (deployment-strip.ts). It
        // joins each event's input hash: when a new card changes it, the events are screened again.
        const samples = images.map((g) => {
          const m = byId.get(g.items[g.items.length >> 1].mediaId)!;
          const size = analysisSize(m.width, m.height, Math.min(settings.analysisWidth, m.width));
          return { abs: path.join(root, m.rel_path), display: m.rel_path, width: size.width, height: size.height };
        });
        const consensus = images.length ? await deploymentStrip(samples) : { frames: 0 };
        if (images.length) {
          emit({
            type: 'deployment', deployment: dep, frames: consensus.frames, strip: consensus.strip,
            note: consensus.strip ? undefined : `${dep}: ${images.length} image trigger(s), too few (${MIN_CONSENSUS_FRAMES} needed) to find its data strip across triggers; each event's own strip detection is used`,
          });
        }
        const stripKey = consensus.strip ? [`strip:${consensus.strip.top},${consensus.strip.bottom}`] : [];
        for (const g of groups) {
          const items = g.items.map((it) => byId.get(it.mediaId)!);
          const id = eventIdOf(dep, items[0].rel_path);
          // The neighbours join the input hash as the strip does: a card added to the deployment
          // gives the events near its edge other neighbours, and only those are screened again.
          const near = neighbourMap.get(g) ?? [];
          const plan: EventPlan = {
            // A clip ends its duration after it starts (the capture time is its start).
            id, deployment_id: dep, kind: g.kind, start_time: items[0].capture_time,
            end_time: (g.kind === 'clip' && items[0].duration_s ? isoPlusSeconds(items[0].capture_time, items[0].duration_s) : undefined) ?? items[items.length - 1].capture_time,
            start_sort_ms: items[0].capture_sort_ms,
            input_hash: hashOf([...items.map((m) => `${m.rel_path}:${m.fingerprint}`), ...(g.kind === 'clip' ? [] : [...stripKey, ...near.flatMap((m) => [`near:${m.mid.rel_path}:${m.mid.fingerprint}`, ...(m.partner ? [`with:${m.partner.rel_path}:${m.partner.fingerprint}`] : [])])])]),
            media: items.map((m) => m.id),
          };
          plans.push(plan);
          const first = items[0];
          const size = analysisSize(first.width, first.height, Math.min(settings.analysisWidth, first.width));
          const taskFile = (m: StoredMedia): TaskFile => ({ abs: path.join(root, m.rel_path), display: m.rel_path });
          const neighbours = near.map((m) => ({ ...taskFile(m.mid), ...(m.partner ? { partner: taskFile(m.partner) } : {}) }));
          tasks.push({
            plan, rootId, rels: items.map((m) => m.rel_path),
            task: {
              eventId: id, kind: g.kind, files: items.map((m) => ({ abs: path.join(root, m.rel_path), display: m.rel_path })), neighbours, width: size.width, height: size.height,
              videoFps: settings.videoFps, durationS: g.kind === 'clip' ? (first.duration_s ?? undefined) : undefined, flow: settings.flow, cacheDir, deploymentStrip: consensus.strip, ...(classifier ? { classifier } : {}),
            },
          });
        }
      }
      store.reconcileEvents([...new Set([...byDeployment.keys(), ...store.deploymentsOfRoot(rootId)])], plans);
    }
    summary.events = tasks.length;
    // An event whose media are all set aside elsewhere keeps the analysis it was decided on.
    const away = (t: (typeof tasks)[number]): boolean => t.rels.every((r) => awayKeys.has(`${t.rootId}:${r}`));
    const todo = tasks.filter((t) => !store.isAnalysed(t.plan.id, hash, t.plan.input_hash) && !away(t));
    summary.skipped = tasks.length - todo.length;
    emit({ type: 'phase', phase: 'analyse', total: todo.length, skipped: summary.skipped });
    let done = 0;
    const started = Date.now();
    const concurrency = workers;
    let next = 0;
    const work = async (): Promise<void> => {
      while (next < todo.length && !o.signal?.aborted) {
        const t = todo[next++];
        const out = await runner(t.task);
        record(t, out);
        done++;
        const rate = done / Math.max(0.001, (Date.now() - started) / 1000);
        emit({ type: 'progress', phase: 'analyse', done, total: todo.length, file: t.rels[0], rate, etaS: (todo.length - done) / rate });
      }
    };
    const record = (t: (typeof tasks)[number], out: TaskOutcome): void => {
      const errs = out.failures.map((f) => ({ rel: f.display, error: { fingerprint: null, stage: f.stage, code: f.code, message: f.message } as const }));
      db.transaction(() => {
        for (const rel of t.rels) store.clearError(t.rootId, rel);
        for (const e of errs) {
          const m = store.media(t.rootId, e.rel);
          store.putError(t.rootId, e.rel, { ...e.error, fingerprint: m?.fingerprint ?? null }, scanId);
        }
        if (out.ok) {
          store.saveAnalysis({
            event_id: t.plan.id, scan_id: scanId, engine_version: ENGINE_VERSION, param_hash: hash, input_hash: t.plan.input_hash,
            analysis_width: t.task.width, analysis_height: t.task.height, score: out.score, verdict: out.verdict,
            features: JSON.stringify(out.features), detail: JSON.stringify(out.detail), windows: out.windows, previews: out.previews,
          });
        } else store.dropEvent(t.plan.id); // nothing of it could be read: its files carry the errors
      })();
      for (const e of errs) emit({ type: 'error', file: e.rel, code: e.error.code, message: e.error.message });
      if (out.ok) {
        summary.analysed++;
      }
    };
    await Promise.all(Array.from({ length: concurrency }, work));
    summary.stopped = !!o.signal?.aborted;
    // Pass two, over what pass one stored: also after a stop, on the events screened so far
    // (the next scan settles the rest).
    const pass = deploymentPass(db, [...touched], { raise: !!o.deploymentCut });
    for (const r of pass.rows) emit({ type: 'calibration', deployment: r.deployment, light: r.light, status: r.status, usable: r.usable, cut: r.cut, note: calibrationNote(r) });
    store.endScan(scanId, summary.stopped ? 'stopped' : 'done');
    for (const c of store.verdictCounts()) summary.verdicts[c.verdict] = c.n;
    summary.errors = store.errorCount();
    summary.seconds = (Date.now() - t0) / 1000;
    emit({ type: 'done', summary });
    return summary;
  } catch (e) {
    store.endScan(scanId, 'failed');
    throw e;
  } finally {
    await pool?.close();
    db.close();
    lock.release();
  }
}

type StoredMedia = MediaRow & { id: number };
/**
 * Neighbours per image event. The background needs 3 of them kept (analyse-event.ts, a burst's
 * minKept), and a neighbour is dropped when its light or view differs too much; with only four,
 * two taken under other light left too few as often as not on held-out scene families (the
 * measurements are in docs/held-out-validation.md). Six leave room for that; eight gained
 * nothing more there and cost two more frames to read per event.
 */
const NEIGHBOURS = 6;

/** A neighbouring trigger as the engine reads it: its middle file, and for a burst its first
 *  file too (where the two differ, that trigger had a visitor: kernels/clean-plate.ts). */
interface NearTrigger {
  mid: StoredMedia;
  partner?: StoredMedia;
}

/** For each image event: the nearest image events (three before, three after, more on one side
 *  when the other runs out) with the same light mode, from which the engine builds that event's
 *  deployment background. One pass per deployment. */
function imageNeighbours(groups: Group[], byId: Map<number, StoredMedia>): Map<Group, NearTrigger[]> {
  const mid = (x: Group): StoredMedia => byId.get(x.items[x.items.length >> 1].mediaId)!;
  const near = (x: Group): NearTrigger => (x.items.length >= 2 ? { mid: mid(x), partner: byId.get(x.items[0].mediaId)! } : { mid: mid(x) });
  const byLight = new Map<string | null, Group[]>();
  for (const g of groups) {
    const light = mid(g).light;
    const list = byLight.get(light);
    if (list) list.push(g);
    else byLight.set(light, [g]);
  }
  const out = new Map<Group, NearTrigger[]>();
  for (const same of byLight.values()) {
    same.forEach((g, k) => {
      const list: NearTrigger[] = [];
      for (let d = 1; list.length < NEIGHBOURS && (k - d >= 0 || k + d < same.length); d++) {
        if (k - d >= 0) list.push(near(same[k - d]));
        if (list.length < NEIGHBOURS && k + d < same.length) list.push(near(same[k + d]));
      }
      out.set(g, list);
    });
  }
  return out;
}
