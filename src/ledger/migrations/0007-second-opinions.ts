/**
 * Migration 7: second opinions on a verdict.
 * `analyses.rule` may now also be `classifier` (the change classifier called likely-blank an
 * event motion alone did not: classifier/combine.ts) or `learned` (the deployment's model learned
 * from people's decisions decided: classifier/learned-model.ts). SQLite cannot change a column's CHECK in
 * place; the column is dropped and added again (ALTER TABLE DROP COLUMN, SQLite 3.35 and later;
 * nothing else refers to it), its values kept in a temporary table across.
 * `learned_models` keeps each model learned from decisions: its deployment, its ONNX file and
 * the file's SHA-256, the model as JSON (inputs, weights, cut, out-of-fold metrics, the event ids
 * it learned from), who and when; the latest `active` one of a deployment decides its undecided
 * events in the scan's second pass.
 */
export const sql = `
CREATE TEMP TABLE kept_rules AS SELECT id, rule FROM analyses WHERE rule IS NOT NULL;
ALTER TABLE analyses DROP COLUMN rule;
ALTER TABLE analyses ADD COLUMN rule TEXT CHECK (rule IN ('model', 'deployment', 'classifier', 'learned'));
UPDATE analyses SET rule = (SELECT k.rule FROM kept_rules k WHERE k.id = analyses.id) WHERE id IN (SELECT id FROM kept_rules);
DROP TABLE kept_rules;
CREATE TABLE learned_models (
  id INTEGER PRIMARY KEY,
  deployment_id TEXT NOT NULL,
  onnx BLOB NOT NULL,
  sha256 TEXT NOT NULL,
  model TEXT NOT NULL,
  who TEXT NOT NULL,
  created_at TEXT NOT NULL,
  active INTEGER NOT NULL DEFAULT 1 CHECK (active IN (0, 1))
);
CREATE INDEX learned_models_deployment ON learned_models (deployment_id, active, id);
`;
