/**
 * Migration 7: a verdict can be the change classifier's (classifier/combine.ts): `analyses.rule`
 * may now also be `classifier`, where the classifier called likely-blank an event that motion
 * alone did not. SQLite cannot change a column's CHECK in place; the column is dropped and
 * added again (ALTER TABLE DROP COLUMN, SQLite 3.35 and later; nothing else refers to it), its
 * values kept in a temporary table across.
 */
export const sql = `
CREATE TEMP TABLE kept_rules AS SELECT id, rule FROM analyses WHERE rule IS NOT NULL;
ALTER TABLE analyses DROP COLUMN rule;
ALTER TABLE analyses ADD COLUMN rule TEXT CHECK (rule IN ('model', 'deployment', 'classifier'));
UPDATE analyses SET rule = (SELECT k.rule FROM kept_rules k WHERE k.id = analyses.id) WHERE id IN (SELECT id FROM kept_rules);
DROP TABLE kept_rules;
`;
