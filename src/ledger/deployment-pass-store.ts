/**
 * What the scan's second pass reads and writes: every analysed image event of a deployment with
 * its score, context and the light of its middle file (as neighbours are chosen); the verdict
 * and the rule that decided it (of undecided events: a verdict a person acted on stays as they
 * saw it, as label calibration leaves it); the deployment's calibration row. The label-calibrated blank
 * threshold, when people's decisions set one (pipeline/calibrate.ts), is the base it builds on.
 */
import type { Ledger } from './open-ledger.js';
import type { DeploymentCalibration } from '../kernels/deployment-calibration.js';

export interface PassEventRow {
  id: string;
  score: number;
  verdict: string;
  rule: string | null;
  /** The analysis's EventContext as JSON, null when it has none. */
  context: string | null;
  /** The change classifier's opinion and rule as the scan stored them (JSON), null without one. */
  classifier: string | null;
  /** The best track's feature row (JSON), what a model learned from decisions reads. */
  best: string | null;
  light: 'colour' | 'infrared' | null;
  /** 1 when a person's decision stands on the event: its verdict is left as they saw it. */
  decided: number;
}

export interface CalibrationRow extends DeploymentCalibration {
  deployment: string;
  light: string;
  fittedBlank: number;
  engineVersion: string;
}

export function createDeploymentPassStore(db: Ledger) {
  const s = {
    events: db.prepare<[string], PassEventRow>(
      `SELECT e.id, a.score, a.verdict, a.rule, json_extract(a.features, '$.context') AS context, json_extract(a.features, '$.classifier') AS classifier, json_extract(a.features, '$.best') AS best,
         (SELECT m.light FROM event_media em JOIN media m ON m.id = em.media_id
           WHERE em.event_id = e.id AND em.position = (SELECT count(*) FROM event_media c WHERE c.event_id = e.id) / 2) AS light,
         (ld.decision IS NOT NULL) AS decided
       FROM events e JOIN analyses a ON a.event_id = e.id LEFT JOIN latest_decisions ld ON ld.event_id = e.id
       WHERE e.deployment_id = ? AND e.kind != 'clip' ORDER BY e.start_sort_ms, e.id`,
    ),
    setVerdict: db.prepare('UPDATE analyses SET verdict = ?, rule = ? WHERE event_id = ? AND (verdict != ? OR rule IS NOT ?)'),
    clear: db.prepare('DELETE FROM deployment_calibrations WHERE deployment_id = ?'),
    put: db.prepare(
      `INSERT INTO deployment_calibrations (deployment_id, light, status, events, usable, median, spread, cut, fitted_blank, engine_version, computed_at)
       VALUES (@deployment, @light, @status, @events, @usable, @median, @spread, @cut, @fittedBlank, @engineVersion, @at)`,
    ),
    all: db.prepare<[], { deployment_id: string; light: string; status: string; events: number; usable: number; median: number | null; spread: number | null; cut: number; fitted_blank: number; engine_version: string; computed_at: string }>(
      'SELECT * FROM deployment_calibrations ORDER BY deployment_id, light',
    ),
    labelThreshold: db.prepare<[], { threshold: number }>('SELECT threshold FROM calibrations WHERE applied = 1 ORDER BY id DESC LIMIT 1'),
  };
  return {
    events: (deployment: string) => s.events.all(deployment),
    /** Replaces a deployment's calibration rows and sets its events' verdicts, in one
     *  transaction; returns how many verdicts or rules changed. */
    settle: db.transaction((deployment: string, rows: CalibrationRow[], verdicts: Array<{ id: string; verdict: string; rule: string }>): number => {
      s.clear.run(deployment);
      const at = new Date().toISOString();
      for (const r of rows) s.put.run({ deployment: r.deployment, light: r.light, status: r.status, events: r.events, usable: r.usable, median: r.median ?? null, spread: r.spread ?? null, cut: r.cut, fittedBlank: r.fittedBlank, engineVersion: r.engineVersion, at });
      return verdicts.reduce((n, v) => n + s.setVerdict.run(v.verdict, v.rule, v.id, v.verdict, v.rule).changes, 0);
    }),
    calibrations: () => s.all.all(),
    labelThreshold: (): number | undefined => s.labelThreshold.get()?.threshold,
  };
}
