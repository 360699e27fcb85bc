/**
 * Migration 3: acting on decisions. `applies` and `moves` journal every move of a set-aside file
 * (written before the file is touched and again after), so a crash mid-apply is finished or
 * reversed by the next run and an undo knows every file's way home and its SHA-256. `audits`,
 * `audit_items` and the append-only `audit_answers` keep each random check of set-aside events:
 * how it was drawn (seed, strata), what was drawn, and who answered what, when. `calibrations`
 * records each likely-blank threshold fitted from people's labels, and which verdicts it changed.
 */
export const sql = `
CREATE TABLE applies (
  id INTEGER PRIMARY KEY,
  started_at TEXT NOT NULL,
  finished_at TEXT,
  target TEXT NOT NULL,
  mode TEXT NOT NULL CHECK (mode IN ('move', 'copy')),
  status TEXT NOT NULL CHECK (status IN ('running', 'done', 'stopped', 'undone')),
  who TEXT,
  note TEXT
);
CREATE TABLE moves (
  id INTEGER PRIMARY KEY,
  apply_id INTEGER NOT NULL REFERENCES applies(id),
  media_id INTEGER NOT NULL REFERENCES media(id),
  event_id TEXT NOT NULL,
  source TEXT NOT NULL,
  dest TEXT NOT NULL,
  size INTEGER NOT NULL,
  sha256 TEXT NOT NULL,
  state TEXT NOT NULL CHECK (state IN ('planned', 'moving', 'moved', 'restoring', 'restored', 'failed')),
  method TEXT CHECK (method IN ('rename', 'copy', 'copy-kept')),
  error TEXT,
  updated_at TEXT NOT NULL,
  UNIQUE (apply_id, media_id)
);
CREATE INDEX moves_media ON moves (media_id, id);
CREATE INDEX moves_state ON moves (state);
CREATE TABLE audits (
  id INTEGER PRIMARY KEY,
  created_at TEXT NOT NULL,
  who TEXT,
  seed INTEGER NOT NULL,
  population INTEGER NOT NULL,
  sample_size INTEGER NOT NULL,
  tolerance REAL NOT NULL,
  alpha REAL NOT NULL,
  strata TEXT NOT NULL
);
CREATE TABLE audit_items (
  audit_id INTEGER NOT NULL REFERENCES audits(id),
  position INTEGER NOT NULL,
  event_id TEXT NOT NULL,
  stratum INTEGER NOT NULL,
  PRIMARY KEY (audit_id, position),
  UNIQUE (audit_id, event_id)
);
CREATE TABLE audit_answers (
  id INTEGER PRIMARY KEY,
  audit_id INTEGER NOT NULL REFERENCES audits(id),
  event_id TEXT NOT NULL,
  animal INTEGER NOT NULL CHECK (animal IN (0, 1)),
  who TEXT,
  at TEXT NOT NULL
);
CREATE INDEX audit_answers_item ON audit_answers (audit_id, event_id, id);
CREATE TABLE calibrations (
  id INTEGER PRIMARY KEY,
  at TEXT NOT NULL,
  who TEXT,
  target_recall REAL NOT NULL,
  threshold REAL NOT NULL,
  animals INTEGER NOT NULL,
  recall_lower REAL NOT NULL,
  applied INTEGER NOT NULL,
  changed INTEGER NOT NULL
);
CREATE TRIGGER audit_answers_append_only_update BEFORE UPDATE ON audit_answers
BEGIN SELECT RAISE(ABORT, 'audit answers are append-only'); END;
CREATE TRIGGER audit_answers_append_only_delete BEFORE DELETE ON audit_answers
BEGIN SELECT RAISE(ABORT, 'audit answers are append-only'); END;
`;
