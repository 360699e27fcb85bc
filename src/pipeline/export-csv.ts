/**
 * The CSV export: one row per screened media file with its event, times, deployment, the
 * screener's score and verdict, and the decision that counts with who made it and when. Cells
 * that a spreadsheet would run as a formula are escaped (csvCell).
 */
import type { ExportMediaRow } from '../ledger/export-rows.js';
import { csvCell } from './report.js';

export const CSV_COLUMNS = ['media_id', 'file', 'root', 'set_aside_path', 'kind', 'capture_time', 'deployment', 'event', 'event_kind', 'event_start', 'event_end', 'score', 'verdict', 'engine_version', 'decision', 'decided_by', 'decided_at'] as const;

export function mediaCsv(rows: ExportMediaRow[]): string {
  const lines = [CSV_COLUMNS.join(',')];
  for (const r of rows) {
    lines.push(
      [r.media_id, r.rel_path, r.root, r.set_aside_path, r.kind, r.capture_time, r.deployment_id, r.event_id, r.event_kind, r.event_start, r.event_end, r.score, r.verdict, r.engine_version, r.decision, r.decided_by, r.decided_at]
        .map(csvCell)
        .join(','),
    );
  }
  return lines.join('\n') + '\n';
}
