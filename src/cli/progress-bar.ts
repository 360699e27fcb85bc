/** Terminal progress for a scan: one line redrawn in place (files, rate, ETA); NDJSON instead
 *  with --json-progress; nothing but errors and the summary when stderr is not a terminal. */
import type { ScanProgress } from '../pipeline/progress.js';

const clock = (s: number): string => {
  if (!Number.isFinite(s)) return '--';
  const m = Math.floor(s / 60);
  return m >= 60 ? `${Math.floor(m / 60)}h${String(m % 60).padStart(2, '0')}m` : m ? `${m}m${String(Math.round(s % 60)).padStart(2, '0')}s` : `${Math.round(s)}s`;
};

export function progressPrinter(mode: 'json' | 'bar' | 'quiet', out: NodeJS.WriteStream = process.stderr): (p: ScanProgress) => void {
  if (mode === 'json') return (p) => process.stdout.write(JSON.stringify(p) + '\n');
  let last = 0;
  let drawn = false;
  return (p) => {
    if (p.type === 'error') {
      if (drawn) out.write('\r\x1b[K');
      drawn = false;
      out.write(`  ! ${p.code} ${p.message}\n`);
      return;
    }
    if (p.type === 'deployment' || p.type === 'calibration') {
      if (!p.note) return;
      if (drawn) out.write('\r\x1b[K');
      drawn = false;
      out.write(`  i ${p.note}\n`);
      return;
    }
    if (mode !== 'bar') return;
    if (p.type === 'phase') {
      if (drawn) out.write('\n');
      drawn = false;
      return;
    }
    if (p.type !== 'progress') {
      if (drawn) out.write('\n');
      drawn = false;
      return;
    }
    const now = Date.now();
    if (now - last < 100 && p.done < p.total) return;
    last = now;
    const width = 24;
    const fill = p.total ? Math.round((p.done / p.total) * width) : width;
    const what = p.phase === 'read' ? 'files read' : 'events screened';
    const rate = p.rate ? `  ${p.rate.toFixed(1)}/s  ETA ${clock(p.etaS ?? NaN)}` : '';
    out.write(`\r\x1b[K[${'#'.repeat(fill)}${'.'.repeat(width - fill)}] ${p.done}/${p.total} ${what}${rate}`);
    drawn = true;
  };
}
