/**
 * Migration 2: what the review grid needs to page through 100,000 events at any depth in tens
 * of milliseconds. Indexes that match the grid's two orders (time, score), so a page is an index
 * walk rather than a sort; and `latest_decisions`, the decision that counts per event, kept by a
 * trigger on the append-only log (the log stays the record; this table is derived from it and
 * rebuilt here from it).
 */
export const sql = `
CREATE INDEX events_time ON events (start_sort_ms, deployment_id, id);
CREATE INDEX analyses_score ON analyses (score, event_id);
CREATE TABLE latest_decisions (
  event_id TEXT PRIMARY KEY,
  decision TEXT CHECK (decision IN ('keep', 'set-aside')),
  decision_id INTEGER NOT NULL
);
INSERT INTO latest_decisions (event_id, decision, decision_id)
  SELECT d.event_id, d.decision, d.id FROM decisions d WHERE d.id = (SELECT max(id) FROM decisions WHERE event_id = d.event_id);
CREATE TRIGGER decisions_latest AFTER INSERT ON decisions
BEGIN
  INSERT INTO latest_decisions (event_id, decision, decision_id) VALUES (NEW.event_id, NEW.decision, NEW.id)
  ON CONFLICT (event_id) DO UPDATE SET decision = excluded.decision, decision_id = excluded.decision_id
  WHERE excluded.decision_id > latest_decisions.decision_id;
END;
`;
