/**
 * The statements a scan writes with, prepared once. Multi-row writes are single transactions;
 * nothing here awaits.
 */
import type { Ledger } from './open-ledger.js';

export interface MediaRow {
  id?: number;
  root_id: number;
  rel_path: string;
  deployment_id: string;
  kind: 'image' | 'video';
  size: number;
  mtime_ms: number;
  fingerprint: string;
  capture_time: string;
  capture_sort_ms: number;
  capture_source: string;
  width: number;
  height: number;
  format: string | null;
  camera_make: string | null;
  camera_model: string | null;
  camera_serial: string | null;
  light: 'colour' | 'infrared' | null;
  duration_s: number | null;
  fps: number | null;
  codec: string | null;
  rotation: number | null;
}

export interface DeploymentRow {
  id: string;
  root_id: number;
  folder: string;
  location_name: string | null;
  latitude: number | null;
  longitude: number | null;
  camera_id: string | null;
  camera_model: string | null;
}

export interface ErrorRow {
  fingerprint: string | null;
  stage: 'read' | 'partial';
  code: string;
  message: string;
}

export interface EventPlan {
  id: string;
  deployment_id: string;
  kind: 'burst' | 'single' | 'clip';
  start_time: string;
  end_time: string;
  start_sort_ms: number;
  input_hash: string;
  media: number[];
}

export interface AnalysisRecord {
  event_id: string;
  scan_id: number;
  engine_version: string;
  param_hash: string;
  input_hash: string;
  analysis_width: number;
  analysis_height: number;
  score: number;
  verdict: string;
  features: string;
  detail: string;
  windows: Array<{ start_s: number; end_s: number; score: number }>;
  previews: Array<{ kind: 'frame' | 'heat'; position: number; path: string; width: number; height: number; time_s: number | null }>;
}

const MEDIA_COLUMNS = ['root_id', 'rel_path', 'deployment_id', 'kind', 'size', 'mtime_ms', 'fingerprint', 'capture_time', 'capture_sort_ms', 'capture_source', 'width', 'height', 'format', 'camera_make', 'camera_model', 'camera_serial', 'light', 'duration_s', 'fps', 'codec', 'rotation'] as const;

export function createScanStore(db: Ledger) {
  const now = (): string => new Date().toISOString();
  const s = {
    rootId: db.prepare<[string], { id: number }>('SELECT id FROM roots WHERE path = ?'),
    addRoot: db.prepare('INSERT INTO roots (path) VALUES (?)'),
    upsertDeployment: db.prepare(`INSERT INTO deployments (id, root_id, folder, location_name, latitude, longitude, camera_id, camera_model)
      VALUES (@id, @root_id, @folder, @location_name, @latitude, @longitude, @camera_id, @camera_model)
      ON CONFLICT (id) DO UPDATE SET root_id = excluded.root_id, folder = excluded.folder, location_name = excluded.location_name,
        latitude = excluded.latitude, longitude = excluded.longitude, camera_id = excluded.camera_id, camera_model = excluded.camera_model`),
    media: db.prepare<[number, string], MediaRow & { id: number }>('SELECT * FROM media WHERE root_id = ? AND rel_path = ?'),
    upsertMedia: db.prepare(`INSERT INTO media (${MEDIA_COLUMNS.join(', ')}, present) VALUES (${MEDIA_COLUMNS.map((c) => '@' + c).join(', ')}, 1)
      ON CONFLICT (root_id, rel_path) DO UPDATE SET ${MEDIA_COLUMNS.filter((c) => c !== 'root_id' && c !== 'rel_path').map((c) => `${c} = excluded.${c}`).join(', ')}, present = 1
      RETURNING id`),
    absentAll: db.prepare('UPDATE media SET present = 0 WHERE root_id = ?'),
    present: db.prepare('UPDATE media SET present = 1 WHERE id = ?'),
    error: db.prepare<[number, string], ErrorRow>('SELECT fingerprint, stage, code, message FROM scan_errors WHERE root_id = ? AND rel_path = ?'),
    putError: db.prepare(`INSERT INTO scan_errors (root_id, rel_path, fingerprint, stage, code, message, scan_id, at) VALUES (?, ?, ?, ?, ?, ?, ?, ?)
      ON CONFLICT (root_id, rel_path) DO UPDATE SET fingerprint = excluded.fingerprint, stage = excluded.stage, code = excluded.code,
        message = excluded.message, scan_id = excluded.scan_id, at = excluded.at`),
    clearError: db.prepare('DELETE FROM scan_errors WHERE root_id = ? AND rel_path = ?'),
    errorsOfRoot: db.prepare<[number], { rel_path: string }>('SELECT rel_path FROM scan_errors WHERE root_id = ?'),
    eventsOfDeployment: db.prepare<[string], { id: string; input_hash: string; kind: string; start_time: string; end_time: string; start_sort_ms: number; media: string }>(
      `SELECT e.id, e.input_hash, e.kind, e.start_time, e.end_time, e.start_sort_ms, group_concat(em.media_id, ',') AS media
       FROM events e JOIN event_media em ON em.event_id = e.id WHERE e.deployment_id = ? GROUP BY e.id`),
    orderedMedia: db.prepare<[string], { media_id: number }>('SELECT media_id FROM event_media WHERE event_id = ? ORDER BY position'),
    deleteEvent: db.prepare('DELETE FROM events WHERE id = ?'),
    insertEvent: db.prepare('INSERT INTO events (id, deployment_id, kind, start_time, end_time, start_sort_ms, input_hash) VALUES (@id, @deployment_id, @kind, @start_time, @end_time, @start_sort_ms, @input_hash)'),
    insertEventMedia: db.prepare('INSERT INTO event_media (event_id, position, media_id) VALUES (?, ?, ?)'),
    analysisOf: db.prepare<[string], { param_hash: string; input_hash: string }>('SELECT param_hash, input_hash FROM analyses WHERE event_id = ?'),
    deleteAnalysis: db.prepare('DELETE FROM analyses WHERE event_id = ?'),
    insertAnalysis: db.prepare(`INSERT INTO analyses (event_id, scan_id, engine_version, param_hash, input_hash, analysis_width, analysis_height, score, verdict, features, detail, created_at)
      VALUES (@event_id, @scan_id, @engine_version, @param_hash, @input_hash, @analysis_width, @analysis_height, @score, @verdict, @features, @detail, @created_at)`),
    insertWindow: db.prepare('INSERT INTO windows (analysis_id, start_s, end_s, score) VALUES (?, ?, ?, ?)'),
    insertPreview: db.prepare('INSERT INTO previews (analysis_id, kind, position, path, width, height, time_s) VALUES (?, ?, ?, ?, ?, ?, ?)'),
    startScan: db.prepare("INSERT INTO scans (started_at, status, roots, params, engine_version) VALUES (?, 'running', ?, ?, ?)"),
    endScan: db.prepare('UPDATE scans SET finished_at = ?, status = ? WHERE id = ?'),
    verdictCounts: db.prepare<[], { verdict: string; n: number }>('SELECT verdict, count(*) AS n FROM analyses GROUP BY verdict'),
    errorCount: db.prepare<[], { n: number }>('SELECT count(*) AS n FROM scan_errors'),
    clearSkipped: db.prepare('DELETE FROM scan_skipped WHERE root_id = ?'),
    putSkipped: db.prepare('INSERT OR REPLACE INTO scan_skipped (root_id, rel_path, reason) VALUES (?, ?, ?)'),
    deploymentsOfRoot: db.prepare<[number], { id: string }>('SELECT id FROM deployments WHERE root_id = ?'),
    // Media an apply moved into a set-aside folder (and no undo brought back): still the
    // ledger's, though a scan of the root no longer finds them.
    movedAway: db.prepare<[number], MediaRow & { id: number }>(
      "SELECT m.* FROM media m WHERE m.root_id = ? AND (SELECT mv.state || ':' || coalesce(mv.method, '') FROM moves mv WHERE mv.media_id = m.id ORDER BY mv.id DESC LIMIT 1) IN ('moved:rename', 'moved:copy')",
    ),
  };

  return {
    ensureRoot(p: string): number {
      const row = s.rootId.get(p);
      if (row) return row.id;
      return Number(s.addRoot.run(p).lastInsertRowid);
    },
    upsertDeployments: db.transaction((rows: DeploymentRow[]) => {
      for (const r of rows) s.upsertDeployment.run(r);
    }),
    media: (rootId: number, rel: string) => s.media.get(rootId, rel),
    /** Writes the media rows of one root and marks every other media row of that root absent. */
    replaceRootMedia: db.transaction((rootId: number, rows: MediaRow[]): number[] => {
      s.absentAll.run(rootId);
      return rows.map((r) => (s.upsertMedia.get(r) as { id: number }).id);
    }),
    error: (rootId: number, rel: string) => s.error.get(rootId, rel),
    putError(rootId: number, rel: string, e: ErrorRow, scanId: number): void {
      s.putError.run(rootId, rel, e.fingerprint, e.stage, e.code, e.message, scanId, now());
    },
    clearError: (rootId: number, rel: string) => void s.clearError.run(rootId, rel),
    /** Forgets errors of files no longer found under the root. */
    pruneErrors: db.transaction((rootId: number, found: Set<string>) => {
      for (const r of s.errorsOfRoot.all(rootId)) if (!found.has(r.rel_path)) s.clearError.run(rootId, r.rel_path);
    }),
    /** Makes the stored events of the given deployments equal to the plan: unchanged events
     *  (same id, same media in order, same inputs) keep their analysis, others are replaced. */
    reconcileEvents: db.transaction((deployments: string[], plans: EventPlan[]) => {
      const wanted = new Map(plans.map((p) => [p.id, p]));
      const keep = new Set<string>();
      for (const d of deployments) {
        for (const e of s.eventsOfDeployment.all(d)) {
          const p = wanted.get(e.id);
          const same = p && p.input_hash === e.input_hash && p.kind === e.kind && p.start_time === e.start_time && p.end_time === e.end_time && p.media.join(',') === s.orderedMedia.all(e.id).map((r) => r.media_id).join(',');
          if (same) keep.add(e.id);
          else s.deleteEvent.run(e.id);
        }
      }
      for (const p of plans) {
        if (keep.has(p.id)) continue;
        s.deleteEvent.run(p.id); // an id that moved to another deployment
        s.insertEvent.run(p);
        p.media.forEach((m, i) => s.insertEventMedia.run(p.id, i, m));
      }
    }),
    isAnalysed(eventId: string, paramHash: string, inputHash: string): boolean {
      const a = s.analysisOf.get(eventId);
      return !!a && a.param_hash === paramHash && a.input_hash === inputHash;
    },
    /** One event's analysis, windows and previews: one transaction. */
    saveAnalysis: db.transaction((a: AnalysisRecord) => {
      s.deleteAnalysis.run(a.event_id);
      const id = Number(s.insertAnalysis.run({ ...a, created_at: now() }).lastInsertRowid);
      for (const w of a.windows) s.insertWindow.run(id, w.start_s, w.end_s, w.score);
      for (const p of a.previews) s.insertPreview.run(id, p.kind, p.position, p.path, p.width, p.height, p.time_s);
    }),
    dropEvent: (eventId: string) => void s.deleteEvent.run(eventId),
    startScan: (roots: string[], params: unknown, engine: string): number => Number(s.startScan.run(now(), JSON.stringify(roots), JSON.stringify(params), engine).lastInsertRowid),
    verdictCounts: () => s.verdictCounts.all(),
    errorCount: () => s.errorCount.get()!.n,
    /** Replaces what the scan of a root passed over (find-media.ts). */
    replaceSkipped: db.transaction((rootId: number, entries: ReadonlyArray<{ rel: string; reason: string }>) => {
      s.clearSkipped.run(rootId);
      for (const e of entries) s.putSkipped.run(rootId, e.rel, e.reason);
    }),
    deploymentsOfRoot: (rootId: number) => s.deploymentsOfRoot.all(rootId).map((r) => r.id),
    movedAway: (rootId: number) => s.movedAway.all(rootId),
    endScan: (id: number, status: 'done' | 'stopped' | 'failed') => void s.endScan.run(now(), status, id),
  };
}

export type ScanStore = ReturnType<typeof createScanStore>;
