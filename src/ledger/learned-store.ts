/**
 * Statements of learning from decisions (classifier/learned-model.ts): the reviewed events of a deployment
 * with what a model learns from, and the learned models kept (migration 7, `learned_models`).
 */
import type { Ledger } from './open-ledger.js';

export interface ReviewedRow {
  id: string;
  decision: 'keep' | 'set-aside';
  score: number;
  /** features.best (JSON array) and features.classifier.score, as the scan stored them. */
  best: string | null;
  opinion: number | null;
}

export interface LearnedRow {
  id: number;
  deployment_id: string;
  sha256: string;
  model: string;
  who: string;
  created_at: string;
}

export function createLearnedStore(db: Ledger) {
  const s = {
    reviewed: db.prepare<[string], ReviewedRow>(
      `SELECT e.id, ld.decision, a.score, json_extract(a.features, '$.best') AS best, json_extract(a.features, '$.classifier.score') AS opinion
       FROM events e JOIN analyses a ON a.event_id = e.id JOIN latest_decisions ld ON ld.event_id = e.id
       WHERE e.deployment_id = ? AND e.kind != 'clip' ORDER BY e.start_sort_ms, e.id`,
    ),
    deployments: db.prepare<[], { id: string }>("SELECT DISTINCT deployment_id AS id FROM events WHERE kind != 'clip' ORDER BY deployment_id"),
    retire: db.prepare('UPDATE learned_models SET active = 0 WHERE deployment_id = ? AND active = 1'),
    put: db.prepare('INSERT INTO learned_models (deployment_id, onnx, sha256, model, who, created_at) VALUES (?, ?, ?, ?, ?, ?)'),
    active: db.prepare<[string], LearnedRow>('SELECT id, deployment_id, sha256, model, who, created_at FROM learned_models WHERE deployment_id = ? AND active = 1 ORDER BY id DESC LIMIT 1'),
    onnx: db.prepare<[number], { onnx: Buffer }>('SELECT onnx FROM learned_models WHERE id = ?'),
  };
  return {
    reviewed: (deployment: string) => s.reviewed.all(deployment),
    deployments: () => s.deployments.all().map((r) => r.id),
    /** Keeps a model as the deployment's active one (the one before is kept, inactive). */
    keep: db.transaction((deployment: string, onnx: Uint8Array, sha256: string, model: string, who: string): number => {
      s.retire.run(deployment);
      return Number(s.put.run(deployment, Buffer.from(onnx), sha256, model, who, new Date().toISOString()).lastInsertRowid);
    }),
    /** Stops using the deployment's model (kept in the table for the record); true if one was active. */
    forget: (deployment: string): boolean => s.retire.run(deployment).changes > 0,
    active: (deployment: string) => s.active.get(deployment),
    onnx: (id: number) => s.onnx.get(id)?.onnx,
  };
}
