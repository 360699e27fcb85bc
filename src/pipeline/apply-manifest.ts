/**
 * The manifest an apply writes into the set-aside folder: one row per file it placed there,
 * with where it came from and its SHA-256, so the folder explains itself even without the
 * ledger. Cells that would start a spreadsheet formula are escaped (OWASP, "CSV Injection").
 * It never replaces a file: another ledger's manifest of the same number keeps its name.
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { csvCell } from './report.js';
import { renameNoClobber } from './safe-move.js';
import { PipelineErrorCode } from './pipeline-errors.js';


export async function writeManifest(to: string, applyId: number, rows: Array<{ candidate: { event_id: string; media_id: number; size: number }; source: string; dest: string; sha: string; method: string }>): Promise<string> {
  const file = path.join(to, `movesift-manifest-${applyId}.csv`);
  const lines = ['apply_id,event_id,media_id,original_path,set_aside_path,bytes,sha256,method'];
  for (const r of rows) lines.push([applyId, r.candidate.event_id, r.candidate.media_id, r.source, r.dest, r.candidate.size, r.sha, r.method].map(csvCell).join(','));
  const part = path.join(to, `.movesift-manifest-${applyId}-${process.pid}.part`);
  await fs.writeFile(part, lines.join('\n') + '\n');
  // Another ledger's apply into the same folder may have written a manifest of the same number:
  // the next free name, never over it.
  for (let k = 1; ; k++) {
    const name = k === 1 ? file : path.join(to, `movesift-manifest-${applyId}-${k}.csv`);
    try {
      await renameNoClobber(part, name);
      return name;
    } catch (e) {
      if ((e as { code?: string }).code !== PipelineErrorCode.nameClash || k > 1000) throw e;
    }
  }
}
