/**
 * Migration 6: ledgers merged from the shards of a cluster scan (pipeline/merge-shards.ts).
 * `merges` records each shard taken in: which plan and shard, the shard ledger it came from,
 * what it held when merged (so merging it again changes nothing, and a shard scanned again
 * replaces what it brought before), and its deployments. A decision, apply or audit made on a
 * shard before the merge keeps its origin in `origin` ("shard K of plan P"; NULL: made on this
 * ledger).
 */
export const sql = `
CREATE TABLE merges (
  id INTEGER PRIMARY KEY,
  plan_id TEXT NOT NULL,
  shard_index INTEGER NOT NULL,
  shards INTEGER NOT NULL,
  source TEXT NOT NULL,
  content TEXT NOT NULL,
  deployments TEXT NOT NULL,
  engine_version TEXT NOT NULL,
  merged_at TEXT NOT NULL,
  UNIQUE (plan_id, shard_index)
);
ALTER TABLE decisions ADD COLUMN origin TEXT;
ALTER TABLE applies ADD COLUMN origin TEXT;
ALTER TABLE audits ADD COLUMN origin TEXT;
`;
