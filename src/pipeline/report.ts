/**
 * The `movesift.report/1` document (DESIGN.md, "Contracts"): every analysed event and every
 * recorded error, paths relative to the scanned folder. Fields may be added; the documented
 * ones never change meaning. CSV gives one row per event with the same fields.
 */
import { openLedger } from '../ledger/open-ledger.js';
import { reportErrors, reportEvents } from '../ledger/report-rows.js';

export interface ReportWindow {
  start_s: number;
  end_s: number;
  score: number;
}

export interface ReportEvent {
  id: string;
  kind: 'burst' | 'single' | 'clip';
  deployment: string;
  files: string[];
  start: string;
  end: string;
  verdict: 'likely-blank' | 'unsure' | 'motion';
  score: number;
  windows: ReportWindow[];
  decision: 'keep' | 'set-aside' | null;
  root: string;
}

export interface Report {
  schema: 'movesift.report/1';
  events: ReportEvent[];
  errors: Array<{ file: string; code: string; message: string; root: string }>;
}

export function buildReport(ledger: string): Report {
  const db = openLedger(ledger, { readonly: true });
  try {
    const events = reportEvents(db).map((r) => ({
      id: r.id,
      kind: r.kind,
      deployment: r.deployment,
      files: JSON.parse(r.files) as string[],
      start: r.start_time,
      end: r.end_time,
      verdict: r.verdict,
      score: Math.round(r.score * 10000) / 10000,
      windows: r.windows ? (JSON.parse(r.windows) as ReportWindow[]) : [],
      decision: r.decision,
      root: r.root,
    }));
    return { schema: 'movesift.report/1', events, errors: reportErrors(db) };
  } finally {
    db.close();
  }
}

/** A cell that a spreadsheet would run as a formula (=, +, -, @, tab, CR) is prefixed with a quote. */
export function csvCell(v: unknown): string {
  let s = v === null || v === undefined ? '' : String(v);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return rawCsvCell(s);
}

/** RFC 4180 quoting only, values untouched: for data packages read by programs, not spreadsheets. */
export function rawCsvCell(v: unknown): string {
  const s = v === null || v === undefined ? '' : String(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function reportCsv(r: Report): string {
  const head = ['id', 'kind', 'deployment', 'start', 'end', 'verdict', 'score', 'decision', 'files', 'windows'];
  const lines = [head.join(',')];
  for (const e of r.events) {
    lines.push([e.id, e.kind, e.deployment, e.start, e.end, e.verdict, e.score, e.decision ?? '', e.files.join(';'), e.windows.map((w) => `${w.start_s}-${w.end_s}`).join(';')].map(csvCell).join(','));
  }
  return lines.join('\n') + '\n';
}
