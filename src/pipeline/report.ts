/**
 * The `movesift.report/1` document (DESIGN.md, "Contracts"): every analysed event, every
 * recorded error and every entry the scans passed over, paths relative to the scanned folder.
 * Each path under a scanned folder is in exactly one of `events[].files`, `errors` (stage
 * `read`: not screened) and `skipped`; a clip screened only in part (stage `partial`) is both in
 * its event and in `errors`, which says which part. Fields may be added; the documented
 * ones never change meaning. CSV gives one row per event with the same fields.
 */
import { openLedger } from '../ledger/open-ledger.js';
import { createDeploymentPassStore } from '../ledger/deployment-pass-store.js';
import { healthRows, reportErrors, reportEvents, reportSkipped, type HealthRow } from '../ledger/report-rows.js';
import { deploymentHealth, type NeighbourRecord } from '../kernels/deployment-health.js';
import type { DeploymentHealth } from '../shared/health.js';
import type { SceneSignature } from '../kernels/scene-signature.js';

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
  /** Which rule decided the verdict (kernels/deployment-calibration.ts): the fitted model's, or
   *  the deployment's own calibration. Clips and analyses older than the rule say `model`. */
  rule: 'model' | 'deployment' | 'classifier' | 'learned';
  windows: ReportWindow[];
  decision: 'keep' | 'set-aside' | null;
  root: string;
}

export interface ReportCalibration {
  deployment: string;
  light: string;
  status: 'applied' | 'too-few' | 'busy' | 'labels' | 'off';
  events: number;
  usable: number;
  /** Median and spread of logit(score) over the usable events. */
  median: number | null;
  spread: number | null;
  /** The blank threshold in force for the deployment, and the fitted one it started from. */
  cut: number;
  fittedBlank: number;
}

/** What went wrong with a deployment's camera (deployment-health.ts). */
export type ReportDeployment = DeploymentHealth;

export interface Report {
  schema: 'movesift.report/1';
  events: ReportEvent[];
  deployments: ReportDeployment[];
  /** Pass two's calibration per deployment and light mode (deployment-pass.ts). */
  calibrations: ReportCalibration[];
  errors: Array<{ file: string; stage: 'read' | 'partial'; code: string; message: string; root: string }>;
  /** Entries that are neither media nor errors, with why: not-media, hidden-or-system,
   *  not-a-regular-file, broken-link, unreadable-folder, folder-already-scanned, ledger-files. */
  skipped: Array<{ file: string; reason: string; root: string }>;
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
      rule: r.rule ?? 'model',
      windows: r.windows ? (JSON.parse(r.windows) as ReportWindow[]) : [],
      decision: r.decision,
      root: r.root,
    }));
    const r4 = (v: number | null) => (v === null ? null : Math.round(v * 10000) / 10000);
    const calibrations = createDeploymentPassStore(db).calibrations().map((c) => ({
      deployment: c.deployment_id, light: c.light, status: c.status as ReportCalibration['status'], events: c.events, usable: c.usable,
      median: r4(c.median), spread: r4(c.spread), cut: r4(c.cut)!, fittedBlank: r4(c.fitted_blank)!,
    }));
    return { schema: 'movesift.report/1', events, deployments: deploymentsHealth(healthRows(db)), calibrations, errors: reportErrors(db), skipped: reportSkipped(db) };
  } finally {
    db.close();
  }
}

/** Health of every deployment of a ledger (what `scan` prints at its end). */
export function ledgerHealth(ledger: string): ReportDeployment[] {
  const db = openLedger(ledger, { readonly: true });
  try {
    return deploymentsHealth(healthRows(db));
  } finally {
    db.close();
  }
}

/** Health per deployment, in deployment order (every deployment with an analysed image event). */
export function deploymentsHealth(rows: readonly HealthRow[]): ReportDeployment[] {
  const by = new Map<string, HealthRow[]>();
  for (const r of rows) {
    const list = by.get(r.deployment);
    if (list) list.push(r);
    else by.set(r.deployment, [r]);
  }
  return [...by].map(([id, list]) => ({
    id,
    health: deploymentHealth(
      list.map((r) => ({
        id: r.id,
        time: r.start_time,
        sortMs: r.start_sort_ms,
        file: r.file,
        light: r.light === 'infrared' ? 'ir' : r.light === 'colour' ? 'day' : null,
        scene: r.scene ? (JSON.parse(r.scene) as SceneSignature) : undefined,
        midFile: r.mid_file ?? undefined,
        neighbours: r.neighbours ? (JSON.parse(r.neighbours) as NeighbourRecord[]).filter((n) => typeof n.file === 'string') : undefined,
      })),
    ),
  }));
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
