/**
 * Joining the shard ledgers of a cluster scan (shard-plan.ts) into one ledger that review,
 * audit and export use as if one machine had scanned everything. Shards hold whole
 * deployments, so their rows never overlap: each is copied in with its integer keys renumbered
 * (roots matched by path; media, scans and analyses given new ids), its previews copied beside
 * the merged ledger, and its decisions kept with their origin ("shard K of plan P").
 *
 * - Idempotent: a shard merged again with the same content changes nothing; a shard scanned
 *   again (other content) replaces what it brought before. Decisions are append-only: those
 *   already taken in are not taken twice.
 * - Refused with a clear message: a ledger that is not a shard, shards of different plans or
 *   engine versions, a shard of another plan than the merged ledger's, a shard with a label
 *   calibration (a threshold fitted on one shard's labels would decide for every shard).
 * - Applies (with their journal of moves) and audits made on a shard come with it, marked with
 *   their origin, so `undo` and the audit report work on the merged ledger.
 * - The merged ledger is written under its lock (ledger-lock.ts), like a scan.
 */
import { createHash } from 'node:crypto';
import { existsSync, promises as fs } from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import { openLedger, type Ledger } from '../ledger/open-ledger.js';
import { acquireLedgerLock } from '../ledger/ledger-lock.js';
import { cacheDirOf } from './scan.js';
import { pipelineError, PipelineErrorCode } from './pipeline-errors.js';

export interface ShardOrigin {
  plan: string;
  index: number;
  shards: number;
  engine: string;
}

export interface MergeSummary {
  plan: string;
  shards: number;
  merged: number[];
  unchanged: number[];
  replaced: number[];
  /** Shards of the plan not in the merged ledger yet. */
  missing: number[];
  events: number;
  decisions: number;
}

/** What a shard ledger says it is: the shard recorded with its scans (scan.ts shardOf). */
function originOf(db: Database.Database, file: string): ShardOrigin {
  const scans = db.prepare<[], { params: string; engine_version: string }>("SELECT params, engine_version FROM scans WHERE status IN ('done', 'stopped') ORDER BY id").all();
  const shards = scans.map((s) => ({ shard: (JSON.parse(s.params) as { shard?: { plan: string; index: number; shards: number } }).shard, engine: s.engine_version }));
  if (!shards.length || shards.some((s) => !s.shard)) throw pipelineError(PipelineErrorCode.shardMismatch, `${file}: is not a shard ledger (it was not scanned with \`movesift scan --plan\`)`);
  const last = shards[shards.length - 1];
  if (shards.some((s) => s.shard!.plan !== last.shard!.plan || s.shard!.index !== last.shard!.index)) throw pipelineError(PipelineErrorCode.shardMismatch, `${file}: holds scans of more than one shard; scan each shard into its own ledger`);
  return { ...last.shard!, engine: last.engine };
}

/** What a shard held, in a few numbers that change whenever it does. */
function contentOf(db: Database.Database): string {
  const q = (sql: string): unknown => db.prepare(sql).get();
  return createHash('sha256')
    .update(JSON.stringify([q('SELECT max(id), group_concat(status), group_concat(finished_at) FROM scans'), q('SELECT count(*), max(id), sum(score) FROM analyses'), q('SELECT count(*), max(id) FROM decisions'), q('SELECT count(*) FROM scan_errors'), q('SELECT count(*) FROM media')]))
    .digest('hex')
    .slice(0, 16);
}

/** Removes from the merged ledger what an earlier merge of a shard brought (its deployments'
 *  media, events, analyses and errors), before the shard scanned again is taken in. */
function forget(db: Ledger, deployments: string[], origin: string): void {
  // What the shard's own applies and audits brought, first: their moves name its media.
  db.prepare('DELETE FROM moves WHERE apply_id IN (SELECT id FROM applies WHERE origin = ?)').run(origin);
  db.prepare('DELETE FROM applies WHERE origin = ?').run(origin);
  db.prepare('DELETE FROM audit_items WHERE audit_id IN (SELECT id FROM audits WHERE origin = ?)').run(origin);
  for (const d of deployments) {
    db.prepare('DELETE FROM events WHERE deployment_id = ?').run(d); // analyses, previews, windows, event_media cascade
    db.prepare('DELETE FROM scan_errors WHERE (root_id, rel_path) IN (SELECT root_id, rel_path FROM media WHERE deployment_id = ?)').run(d);
    db.prepare('DELETE FROM media WHERE deployment_id = ?').run(d);
    db.prepare('DELETE FROM deployment_calibrations WHERE deployment_id = ?').run(d);
  }
}

export async function mergeShards(shardFiles: readonly string[], into: string): Promise<MergeSummary> {
  if (!shardFiles.length) throw pipelineError(PipelineErrorCode.invalidPlan, 'merge: give the shard ledgers to merge');
  const target = path.resolve(into);
  // Every shard is read and checked before the merged ledger is touched.
  const shards = shardFiles.map((f) => {
    const file = path.resolve(f);
    if (file === target) throw pipelineError(PipelineErrorCode.shardMismatch, `${f}: is the merged ledger itself`);
    if (!existsSync(file)) throw pipelineError(PipelineErrorCode.shardMismatch, `${f}: no such shard ledger`);
    const db = openLedger(file, { readonly: true });
    try {
      const origin = originOf(db, f);
      const labelled = db.prepare<[], { n: number }>('SELECT count(*) AS n FROM calibrations WHERE applied = 1').get()!.n;
      if (labelled) throw pipelineError(PipelineErrorCode.shardMismatch, `${f}: has a label calibration in force; a threshold fitted on one shard's labels would decide for all of them. Calibrate on the merged ledger instead`);
      return { file, given: f, origin, content: contentOf(db) };
    } finally {
      db.close();
    }
  });
  const plan = shards[0].origin;
  for (const s of shards) {
    if (s.origin.plan !== plan.plan) throw pipelineError(PipelineErrorCode.shardMismatch, `${s.given}: is a shard of plan ${s.origin.plan}, the others of plan ${plan.plan}; merge shards of one plan`);
    if (s.origin.engine !== plan.engine) throw pipelineError(PipelineErrorCode.shardMismatch, `${s.given}: was screened by engine ${s.origin.engine}, ${shards[0].given} by ${plan.engine}; scan every shard with the same Movesift`);
  }
  const twice = shards.find((s, i) => shards.findIndex((t) => t.origin.index === s.origin.index) !== i);
  if (twice) throw pipelineError(PipelineErrorCode.shardMismatch, `shard ${twice.origin.index} is given twice (${twice.given})`);

  const db = openLedger(target, { create: true });
  let lock;
  try {
    lock = acquireLedgerLock(target, 'merge');
  } catch (e) {
    db.close();
    throw e;
  }
  const summary: MergeSummary = { plan: plan.plan, shards: plan.shards, merged: [], unchanged: [], replaced: [], missing: [], events: 0, decisions: 0 };
  try {
    const other = db.prepare<[string], { plan_id: string }>('SELECT plan_id FROM merges WHERE plan_id <> ? LIMIT 1').get(plan.plan);
    if (other) throw pipelineError(PipelineErrorCode.shardMismatch, `${into}: holds shards of plan ${other.plan_id}; these are of plan ${plan.plan}. Merge them into another ledger`);
    const engines = db.prepare<[], { engine_version: string }>('SELECT DISTINCT engine_version FROM merges').all();
    if (engines.some((e) => e.engine_version !== plan.engine)) throw pipelineError(PipelineErrorCode.shardMismatch, `${into}: holds shards screened by engine ${engines[0].engine_version}; these are of ${plan.engine}`);
    const cacheDir = cacheDirOf(target);
    for (const s of shards) {
      const prev = db.prepare<[string, number], { id: number; content: string; deployments: string }>('SELECT id, content, deployments FROM merges WHERE plan_id = ? AND shard_index = ?').get(plan.plan, s.origin.index);
      if (prev?.content === s.content) {
        summary.unchanged.push(s.origin.index);
        continue;
      }
      const previews: string[] = [];
      db.exec(`ATTACH DATABASE '${s.file.replaceAll("'", "''")}' AS s`);
      try {
        const origin = `shard ${s.origin.index} of plan ${plan.plan}`;
        db.transaction(() => {
          if (prev) {
            const old = JSON.parse(prev.deployments) as string[];
            // Media an apply moved are in the journal undo needs: the shard's old rows stay
            // until those files are put back.
            const moved = db.prepare<[string, string], { n: number }>(`SELECT count(*) AS n FROM moves mv JOIN media m ON m.id = mv.media_id JOIN applies a ON a.id = mv.apply_id
              WHERE m.deployment_id IN (SELECT value FROM json_each(?)) AND a.origin IS NOT ?`).get(JSON.stringify(old), origin)!.n;
            if (moved) throw pipelineError(PipelineErrorCode.shardMismatch, `shard ${s.origin.index} was scanned again, but ${moved} of its files are in this ledger's apply journal; run \`movesift undo\` on ${into} first, then merge it again`);
            forget(db, old, origin);
          }
          // Roots by path; every other integer key renumbered through a map of old to new.
          const rootMap = new Map<number, number>();
          for (const r of db.prepare<[], { id: number; path: string }>('SELECT id, path FROM s.roots').all()) {
            db.prepare('INSERT OR IGNORE INTO roots (path) VALUES (?)').run(r.path);
            rootMap.set(r.id, db.prepare<[string], { id: number }>('SELECT id FROM roots WHERE path = ?').get(r.path)!.id);
          }
          const scanMap = new Map<number, number>();
          for (const sc of db.prepare<[], { id: number; started_at: string; finished_at: string | null; status: string; roots: string; params: string; engine_version: string }>('SELECT * FROM s.scans ORDER BY id').all()) {
            scanMap.set(sc.id, Number(db.prepare('INSERT INTO scans (started_at, finished_at, status, roots, params, engine_version) VALUES (?, ?, ?, ?, ?, ?)').run(sc.started_at, sc.finished_at, sc.status, sc.roots, sc.params, sc.engine_version).lastInsertRowid));
          }
          const deployments = db.prepare<[], { id: string; root_id: number; folder: string; location_name: string | null; latitude: number | null; longitude: number | null; camera_id: string | null; camera_model: string | null }>('SELECT * FROM s.deployments').all();
          for (const d of deployments) {
            db.prepare(`INSERT INTO deployments (id, root_id, folder, location_name, latitude, longitude, camera_id, camera_model) VALUES (?, ?, ?, ?, ?, ?, ?, ?)
              ON CONFLICT (id) DO UPDATE SET root_id = excluded.root_id, folder = excluded.folder, location_name = excluded.location_name, latitude = excluded.latitude,
                longitude = excluded.longitude, camera_id = excluded.camera_id, camera_model = excluded.camera_model`).run(d.id, rootMap.get(d.root_id)!, d.folder, d.location_name, d.latitude, d.longitude, d.camera_id, d.camera_model);
          }
          const mediaMap = new Map<number, number>();
          const mediaCols = 'rel_path, deployment_id, kind, size, mtime_ms, fingerprint, capture_time, capture_sort_ms, capture_source, width, height, format, camera_make, camera_model, camera_serial, light, duration_s, fps, codec, rotation, present';
          const insertMedia = db.prepare(`INSERT INTO media (root_id, ${mediaCols}) SELECT ?, ${mediaCols} FROM s.media WHERE id = ?`);
          for (const m of db.prepare<[], { id: number; root_id: number }>('SELECT id, root_id FROM s.media ORDER BY id').all()) mediaMap.set(m.id, Number(insertMedia.run(rootMap.get(m.root_id)!, m.id).lastInsertRowid));
          db.prepare('INSERT INTO events (id, deployment_id, kind, start_time, end_time, start_sort_ms, input_hash) SELECT id, deployment_id, kind, start_time, end_time, start_sort_ms, input_hash FROM s.events').run();
          const insertEm = db.prepare('INSERT INTO event_media (event_id, position, media_id) VALUES (?, ?, ?)');
          for (const em of db.prepare<[], { event_id: string; position: number; media_id: number }>('SELECT * FROM s.event_media').all()) insertEm.run(em.event_id, em.position, mediaMap.get(em.media_id)!);
          const analysisCols = 'event_id, engine_version, param_hash, input_hash, analysis_width, analysis_height, score, verdict, features, detail, created_at, rule';
          for (const a of db.prepare<[], { id: number; scan_id: number | null }>('SELECT id, scan_id FROM s.analyses ORDER BY id').all()) {
            const id = Number(db.prepare(`INSERT INTO analyses (scan_id, ${analysisCols}) SELECT ?, ${analysisCols} FROM s.analyses WHERE id = ?`).run(a.scan_id === null ? null : (scanMap.get(a.scan_id) ?? null), a.id).lastInsertRowid);
            db.prepare('INSERT INTO windows (analysis_id, start_s, end_s, score) SELECT ?, start_s, end_s, score FROM s.windows WHERE analysis_id = ?').run(id, a.id);
            db.prepare('INSERT INTO previews (analysis_id, kind, position, path, width, height, time_s) SELECT ?, kind, position, path, width, height, time_s FROM s.previews WHERE analysis_id = ?').run(id, a.id);
            for (const p of db.prepare<[number], { path: string }>('SELECT path FROM s.previews WHERE analysis_id = ?').all(a.id)) previews.push(p.path);
          }
          for (const e of db.prepare<[], { root_id: number; rel_path: string; fingerprint: string | null; stage: string; code: string; message: string; scan_id: number | null; at: string }>('SELECT * FROM s.scan_errors').all()) {
            db.prepare(`INSERT INTO scan_errors (root_id, rel_path, fingerprint, stage, code, message, scan_id, at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)
              ON CONFLICT (root_id, rel_path) DO UPDATE SET fingerprint = excluded.fingerprint, stage = excluded.stage, code = excluded.code, message = excluded.message, scan_id = excluded.scan_id, at = excluded.at`)
              .run(rootMap.get(e.root_id)!, e.rel_path, e.fingerprint, e.stage, e.code, e.message, e.scan_id === null ? null : (scanMap.get(e.scan_id) ?? null), e.at);
          }
          for (const x of db.prepare<[], { root_id: number; rel_path: string; reason: string }>('SELECT * FROM s.scan_skipped').all()) db.prepare('INSERT OR REPLACE INTO scan_skipped (root_id, rel_path, reason) VALUES (?, ?, ?)').run(rootMap.get(x.root_id)!, x.rel_path, x.reason);
          db.prepare('INSERT OR REPLACE INTO deployment_calibrations SELECT * FROM s.deployment_calibrations').run();
          // Decisions made on the shard, with their origin; append-only, so each is taken once.
          const taken = new Set(db.prepare<[string], { k: string }>("SELECT event_id || '|' || at || '|' || coalesce(batch, '') AS k FROM decisions WHERE origin = ?").all(origin).map((r) => r.k));
          for (const d of db.prepare<[], { event_id: string; decision: string | null; source: string; who: string | null; at: string; score: number | null; verdict: string | null; engine_version: string | null; batch: string | null; note: string | null }>('SELECT * FROM s.decisions ORDER BY id').all()) {
            if (taken.has(`${d.event_id}|${d.at}|${d.batch ?? ''}`)) continue;
            db.prepare('INSERT INTO decisions (event_id, decision, source, who, at, score, verdict, engine_version, batch, note, origin) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').run(d.event_id, d.decision, d.source, d.who, d.at, d.score, d.verdict, d.engine_version, d.batch, d.note, origin);
            summary.decisions++;
          }
          // The shard's applies with their journal, and its audits with their answers.
          for (const a of db.prepare<[], { id: number; started_at: string; finished_at: string | null; target: string; mode: string; status: string; who: string | null; note: string | null }>('SELECT * FROM s.applies ORDER BY id').all()) {
            const id = Number(db.prepare('INSERT INTO applies (started_at, finished_at, target, mode, status, who, note, origin) VALUES (?, ?, ?, ?, ?, ?, ?, ?)').run(a.started_at, a.finished_at, a.target, a.mode, a.status, a.who, a.note, origin).lastInsertRowid);
            for (const m of db.prepare<[number], { media_id: number; event_id: string; source: string; dest: string; size: number; sha256: string; state: string; method: string | null; error: string | null; updated_at: string }>('SELECT * FROM s.moves WHERE apply_id = ? ORDER BY id').all(a.id)) {
              db.prepare('INSERT INTO moves (apply_id, media_id, event_id, source, dest, size, sha256, state, method, error, updated_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)').run(id, mediaMap.get(m.media_id)!, m.event_id, m.source, m.dest, m.size, m.sha256, m.state, m.method, m.error, m.updated_at);
            }
          }
          const auditKey = (a: { created_at: string; seed: number }): string => `${a.created_at}|${a.seed}`;
          const knownAudits = new Map(db.prepare<[string], { id: number; created_at: string; seed: number }>('SELECT id, created_at, seed FROM audits WHERE origin = ?').all(origin).map((a) => [auditKey(a), a.id]));
          for (const a of db.prepare<[], { id: number; created_at: string; who: string | null; seed: number; population: number; sample_size: number; tolerance: number; alpha: number; strata: string }>('SELECT * FROM s.audits ORDER BY id').all()) {
            // Answers are append-only: an audit merged before keeps its row, and only answers
            // given since are added.
            const id = knownAudits.get(auditKey(a)) ?? Number(db.prepare('INSERT INTO audits (created_at, who, seed, population, sample_size, tolerance, alpha, strata, origin) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)').run(a.created_at, a.who, a.seed, a.population, a.sample_size, a.tolerance, a.alpha, a.strata, origin).lastInsertRowid);
            db.prepare('INSERT OR IGNORE INTO audit_items (audit_id, position, event_id, stratum) SELECT ?, position, event_id, stratum FROM s.audit_items WHERE audit_id = ?').run(id, a.id);
            const have = new Set(db.prepare<[number], { k: string }>("SELECT event_id || '|' || at AS k FROM audit_answers WHERE audit_id = ?").all(id).map((r) => r.k));
            for (const ans of db.prepare<[number], { event_id: string; animal: number; who: string | null; at: string }>('SELECT * FROM s.audit_answers WHERE audit_id = ? ORDER BY id').all(a.id)) {
              if (!have.has(`${ans.event_id}|${ans.at}`)) db.prepare('INSERT INTO audit_answers (audit_id, event_id, animal, who, at) VALUES (?, ?, ?, ?, ?)').run(id, ans.event_id, ans.animal, ans.who, ans.at);
            }
          }
          summary.events += (db.prepare<[], { n: number }>('SELECT count(*) AS n FROM s.events').get()!).n;
          db.prepare(`INSERT INTO merges (plan_id, shard_index, shards, source, content, deployments, engine_version, merged_at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)
            ON CONFLICT (plan_id, shard_index) DO UPDATE SET source = excluded.source, content = excluded.content, deployments = excluded.deployments, engine_version = excluded.engine_version, merged_at = excluded.merged_at`)
            .run(plan.plan, s.origin.index, plan.shards, s.file, s.content, JSON.stringify(deployments.map((d) => d.id)), plan.engine, new Date().toISOString());
        })();
      } finally {
        db.exec('DETACH DATABASE s');
      }
      // Previews after the rows: a preview missing on disk is shown as missing; a row missing
      // for a preview on disk is never looked at.
      for (const rel of previews) {
        const from = path.join(cacheDirOf(s.file), rel);
        if (!existsSync(from)) continue;
        await fs.mkdir(path.dirname(path.join(cacheDir, rel)), { recursive: true });
        await fs.copyFile(from, path.join(cacheDir, rel));
      }
      (prev ? summary.replaced : summary.merged).push(s.origin.index);
    }
    const have = new Set(db.prepare<[string], { shard_index: number }>('SELECT shard_index FROM merges WHERE plan_id = ?').all(plan.plan).map((r) => r.shard_index));
    for (let k = 0; k < plan.shards; k++) if (!have.has(k)) summary.missing.push(k);
    return summary;
  } finally {
    db.close();
    lock.release();
  }
}
