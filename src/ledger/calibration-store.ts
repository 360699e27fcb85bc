/**
 * What calibration reads and writes: every analysed event with its score, the decision that
 * counts and the latest audit answer on it; the re-verdict of undecided events (one
 * transaction); and the calibrations log.
 */
import type { Ledger } from './open-ledger.js';

export interface LabelledEventRow {
  id: string;
  kind: string;
  score: number;
  /** The analysis's EventContext as JSON (score.ts blankScore reads it; older analyses lack
   *  the later fields), null when it has none. */
  context: string | null;
  verdict: string;
  decision: string | null;
  audit_animal: number | null;
}

export function createCalibrationStore(db: Ledger) {
  const s = {
    events: db.prepare<[], LabelledEventRow>(
      `SELECT e.id, e.kind, a.score, a.verdict, ld.decision,
         json_extract(a.features, '$.context') AS context,
         (SELECT x.animal FROM audit_answers x WHERE x.event_id = e.id ORDER BY x.id DESC LIMIT 1) AS audit_animal
       FROM events e JOIN analyses a ON a.event_id = e.id LEFT JOIN latest_decisions ld ON ld.event_id = e.id`,
    ),
    deployments: db.prepare<[], { id: string }>('SELECT id FROM deployments ORDER BY id'),
    setVerdict: db.prepare('UPDATE analyses SET verdict = ? WHERE event_id = ? AND verdict != ?'),
    log: db.prepare('INSERT INTO calibrations (at, who, target_recall, threshold, animals, recall_lower, applied, changed) VALUES (?, ?, ?, ?, ?, ?, ?, ?)'),
  };
  return {
    events: () => s.events.all(),
    deployments: () => s.deployments.all().map((r) => r.id),
    /** Sets the verdicts of undecided events; returns how many changed. */
    reverdict: db.transaction((verdicts: Array<{ id: string; verdict: string }>): number => verdicts.reduce((n, v) => n + s.setVerdict.run(v.verdict, v.id, v.verdict).changes, 0)),
    log: (r: { who: string | null; target: number; threshold: number; animals: number; lower: number; applied: boolean; changed: number }) =>
      void s.log.run(new Date().toISOString(), r.who, r.target, r.threshold, r.animals, r.lower, r.applied ? 1 : 0, r.changed),
  };
}
