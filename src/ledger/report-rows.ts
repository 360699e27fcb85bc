/** Read queries behind `movesift report`: analysed events with their files, windows and the
 *  latest decision; and the recorded errors. */
import type { Ledger } from './open-ledger.js';

export interface ReportEventRow {
  id: string;
  kind: 'burst' | 'single' | 'clip';
  deployment: string;
  root: string;
  start_time: string;
  end_time: string;
  verdict: 'likely-blank' | 'unsure' | 'motion';
  score: number;
  rule: 'model' | 'deployment' | 'classifier' | 'learned' | null;
  files: string;
  windows: string | null;
  decision: 'keep' | 'set-aside' | null;
  decided_by: string | null;
  decided_at: string | null;
}

export interface ReportErrorRow {
  file: string;
  root: string;
  stage: 'read' | 'partial';
  code: string;
  message: string;
}

export function reportEvents(db: Ledger): ReportEventRow[] {
  return db
    .prepare<[], ReportEventRow>(
      `SELECT e.id, e.kind, e.deployment_id AS deployment, r.path AS root, e.start_time, e.end_time, a.verdict, a.score, a.rule,
         (SELECT json_group_array(rel_path) FROM (SELECT m.rel_path FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id ORDER BY em.position)) AS files,
         (SELECT json_group_array(json_object('start_s', start_s, 'end_s', end_s, 'score', score)) FROM (SELECT * FROM windows w WHERE w.analysis_id = a.id ORDER BY w.start_s)) AS windows,
         d.decision, d.who AS decided_by, d.at AS decided_at
       FROM events e
       JOIN analyses a ON a.event_id = e.id
       JOIN deployments dp ON dp.id = e.deployment_id
       JOIN roots r ON r.id = dp.root_id
       LEFT JOIN latest_decisions ld ON ld.event_id = e.id
       LEFT JOIN decisions d ON d.id = ld.decision_id
       ORDER BY e.deployment_id, e.start_sort_ms, e.id`,
    )
    .all();
}

export function reportErrors(db: Ledger): ReportErrorRow[] {
  return db
    .prepare<[], ReportErrorRow>('SELECT s.rel_path AS file, r.path AS root, s.stage, s.code, s.message FROM scan_errors s JOIN roots r ON r.id = s.root_id ORDER BY r.path, s.rel_path')
    .all();
}

export interface ReportSkippedRow {
  file: string;
  root: string;
  reason: string;
}

/** What the scans passed over, with the reason (media/find-media.ts SkipReason). */
export function reportSkipped(db: Ledger): ReportSkippedRow[] {
  return db.prepare<[], ReportSkippedRow>('SELECT s.rel_path AS file, r.path AS root, s.reason FROM scan_skipped s JOIN roots r ON r.id = s.root_id ORDER BY r.path, s.rel_path').all();
}

export interface HealthRow {
  id: string;
  deployment: string;
  start_time: string;
  start_sort_ms: number;
  file: string;
  light: 'colour' | 'infrared' | null;
  /** The middle file (what other triggers name as their neighbour). */
  mid_file: string | null;
  scene: string | null;
  neighbours: string | null;
}

/** Per analysed image event: what deployment-health.ts judges (capture time, first file, the
 *  light of its middle file, the scene signature the analysis recorded). */
export function healthRows(db: Ledger): HealthRow[] {
  return db
    .prepare<[], HealthRow>(
      `SELECT e.id, e.deployment_id AS deployment, e.start_time, e.start_sort_ms,
         (SELECT m.rel_path FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id ORDER BY em.position LIMIT 1) AS file,
         (SELECT m.light FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id AND em.position = (SELECT count(*) FROM event_media c WHERE c.event_id = e.id) / 2) AS light,
         (SELECT m.rel_path FROM event_media em JOIN media m ON m.id = em.media_id WHERE em.event_id = e.id AND em.position = (SELECT count(*) FROM event_media c WHERE c.event_id = e.id) / 2) AS mid_file,
         json_extract(a.detail, '$.scene') AS scene, json_extract(a.detail, '$.neighbours') AS neighbours
       FROM events e JOIN analyses a ON a.event_id = e.id
       WHERE e.kind <> 'clip'
       ORDER BY e.deployment_id, e.start_sort_ms, e.id`,
    )
    .all();
}
