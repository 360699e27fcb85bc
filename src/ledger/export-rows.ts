/**
 * What the exports read: every screened media file with its event, screening and the decision
 * that counts (who and when), the deployments with their facts and the time span of their
 * media, and the events.
 */
import type { Ledger } from './open-ledger.js';

export interface ExportMediaRow {
  media_id: number;
  root: string;
  rel_path: string;
  kind: 'image' | 'video';
  format: string | null;
  capture_time: string;
  deployment_id: string;
  event_id: string;
  event_kind: string;
  event_start: string;
  event_end: string;
  score: number;
  verdict: string;
  engine_version: string;
  decision: string | null;
  decided_by: string | null;
  decided_at: string | null;
  /** Where an apply moved it, when it is in a set-aside folder now. */
  set_aside_path: string | null;
}

export interface ExportDeploymentRow {
  id: string;
  root: string;
  folder: string;
  location_name: string | null;
  latitude: number | null;
  longitude: number | null;
  camera_id: string | null;
  camera_model: string | null;
  first_capture: string | null;
  last_capture: string | null;
}

export interface ExportEventRow {
  id: string;
  deployment_id: string;
  kind: string;
  start_time: string;
  end_time: string;
  score: number;
  verdict: string;
  engine_version: string;
  decision: string | null;
  decided_by: string | null;
  decided_at: string | null;
}

const DECISION = 'LEFT JOIN latest_decisions ld ON ld.event_id = e.id LEFT JOIN decisions d ON d.id = ld.decision_id';

export function exportMedia(db: Ledger): ExportMediaRow[] {
  return db
    .prepare<[], ExportMediaRow>(
      `SELECT m.id AS media_id, r.path AS root, m.rel_path, m.kind, m.format, m.capture_time, e.deployment_id, e.id AS event_id, e.kind AS event_kind,
         e.start_time AS event_start, e.end_time AS event_end, a.score, a.verdict, a.engine_version, d.decision, d.who AS decided_by, d.at AS decided_at,
         (SELECT mv.dest FROM moves mv WHERE mv.media_id = m.id AND mv.id = (SELECT max(id) FROM moves WHERE media_id = m.id) AND mv.state = 'moved' AND mv.method != 'copy-kept') AS set_aside_path
       FROM events e JOIN analyses a ON a.event_id = e.id JOIN event_media em ON em.event_id = e.id JOIN media m ON m.id = em.media_id JOIN roots r ON r.id = m.root_id ${DECISION}
       ORDER BY e.deployment_id, e.start_sort_ms, e.id, em.position`,
    )
    .all();
}

export function exportDeployments(db: Ledger): ExportDeploymentRow[] {
  return db
    .prepare<[], ExportDeploymentRow>(
      `SELECT dp.id, r.path AS root, dp.folder, dp.location_name, dp.latitude, dp.longitude, dp.camera_id, dp.camera_model,
         (SELECT min(capture_time) FROM media WHERE deployment_id = dp.id) AS first_capture, coalesce(max((SELECT max(capture_time) FROM media WHERE deployment_id = dp.id), (SELECT max(end_time) FROM events WHERE deployment_id = dp.id)), (SELECT max(capture_time) FROM media WHERE deployment_id = dp.id)) AS last_capture
       FROM deployments dp JOIN roots r ON r.id = dp.root_id
       WHERE EXISTS (SELECT 1 FROM events e JOIN analyses a ON a.event_id = e.id WHERE e.deployment_id = dp.id)
       ORDER BY dp.id`,
    )
    .all();
}

export function exportEvents(db: Ledger): ExportEventRow[] {
  return db
    .prepare<[], ExportEventRow>(
      `SELECT e.id, e.deployment_id, e.kind, e.start_time, e.end_time, a.score, a.verdict, a.engine_version, d.decision, d.who AS decided_by, d.at AS decided_at
       FROM events e JOIN analyses a ON a.event_id = e.id ${DECISION} ORDER BY e.deployment_id, e.start_sort_ms, e.id`,
    )
    .all();
}

export interface ClipWindowRow {
  event_id: string;
  root: string;
  rel_path: string;
  windows: string;
}

/** Clips with at least one activity window, and their windows as JSON. */
export function clipWindows(db: Ledger): ClipWindowRow[] {
  return db
    .prepare<[], ClipWindowRow>(
      `SELECT e.id AS event_id, r.path AS root, m.rel_path,
         (SELECT json_group_array(json_object('start_s', start_s, 'end_s', end_s, 'score', score)) FROM (SELECT * FROM windows w WHERE w.analysis_id = a.id ORDER BY w.start_s)) AS windows
       FROM events e JOIN analyses a ON a.event_id = e.id JOIN event_media em ON em.event_id = e.id JOIN media m ON m.id = em.media_id JOIN roots r ON r.id = m.root_id
       WHERE e.kind = 'clip' AND EXISTS (SELECT 1 FROM windows w WHERE w.analysis_id = a.id)
       ORDER BY e.deployment_id, e.start_sort_ms`,
    )
    .all();
}

/** Whether a file (as a root's path and a path below it) is a medium this ledger screened, or
 *  one an apply moved into a set-aside folder. */
export function isLedgerMedium(db: Ledger, root: string, rel: string): boolean {
  const screened = db.prepare<[string, string], { n: number }>('SELECT count(*) AS n FROM media m JOIN roots r ON r.id = m.root_id WHERE r.path = ? AND m.rel_path = ?').get(root, rel);
  return (screened?.n ?? 0) > 0;
}

/** Every scanned folder of the ledger. */
export function ledgerRoots(db: Ledger): string[] {
  return db.prepare<[], { path: string }>('SELECT path FROM roots').all().map((r) => r.path);
}

/** Every place an apply moved a medium to (absolute paths). */
export function setAsidePaths(db: Ledger): string[] {
  return db.prepare<[], { dest: string }>("SELECT DISTINCT dest FROM moves WHERE state IN ('moving', 'moved', 'restoring')").all().map((r) => r.dest);
}
