/**
 * The manifest an apply writes into the set-aside folder: one row per file it placed there,
 * with where it came from and its SHA-256, so the folder explains itself even without the
 * ledger. Cells that would start a spreadsheet formula are escaped (OWASP, "CSV Injection").
 */
import { promises as fs } from 'node:fs';
import path from 'node:path';
import { csvCell } from './report.js';


export async function writeManifest(to: string, applyId: number, rows: Array<{ candidate: { event_id: string; media_id: number; size: number }; source: string; dest: string; sha: string; method: string }>): Promise<string> {
  const file = path.join(to, `movesift-manifest-${applyId}.csv`);
  const lines = ['apply_id,event_id,media_id,original_path,set_aside_path,bytes,sha256,method'];
  for (const r of rows) lines.push([applyId, r.candidate.event_id, r.candidate.media_id, r.source, r.dest, r.candidate.size, r.sha, r.method].map(csvCell).join(','));
  await fs.writeFile(`${file}.part`, lines.join('\n') + '\n');
  await fs.rename(`${file}.part`, file);
  return file;
}
