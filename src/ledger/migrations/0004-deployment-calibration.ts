/**
 * Migration 4: the scan's second pass. `deployment_calibrations` holds, per deployment and light
 * mode, what the deployment's own event scores said (kernels/deployment-calibration.ts): how many
 * events took part, the bulk's median and spread, the cut in force and whether it was applied or
 * why not (`labels`: people's label calibration is in force and decides instead; `off`: the scan
 * did not ask for it). `analyses.rule` names which rule decided each verdict: the fitted model's (`model`) or
 * the deployment's (`deployment`); NULL for analyses written before this migration (the model's).
 */
export const sql = `
CREATE TABLE deployment_calibrations (
  deployment_id TEXT NOT NULL REFERENCES deployments(id) ON DELETE CASCADE,
  light TEXT NOT NULL,
  status TEXT NOT NULL CHECK (status IN ('applied', 'too-few', 'busy', 'labels', 'off')),
  events INTEGER NOT NULL,
  usable INTEGER NOT NULL,
  median REAL,
  spread REAL,
  cut REAL NOT NULL,
  fitted_blank REAL NOT NULL,
  engine_version TEXT NOT NULL,
  computed_at TEXT NOT NULL,
  PRIMARY KEY (deployment_id, light)
);
ALTER TABLE analyses ADD COLUMN rule TEXT CHECK (rule IN ('model', 'deployment'));
`;
