/**
 * Migration 1: the screening ledger. Paths are relative to their scan root. Every table a
 * crash could leave half-written is written one transaction per event by the pipeline; the
 * decisions log is append-only (triggers refuse UPDATE and DELETE).
 */
export const sql = `
CREATE TABLE roots (
  id INTEGER PRIMARY KEY,
  path TEXT NOT NULL UNIQUE
);
CREATE TABLE scans (
  id INTEGER PRIMARY KEY,
  started_at TEXT NOT NULL,
  finished_at TEXT,
  status TEXT NOT NULL CHECK (status IN ('running', 'done', 'stopped', 'failed')),
  roots TEXT NOT NULL,
  params TEXT NOT NULL,
  engine_version TEXT NOT NULL
);
CREATE TABLE deployments (
  id TEXT PRIMARY KEY,
  root_id INTEGER NOT NULL REFERENCES roots(id),
  folder TEXT NOT NULL,
  location_name TEXT,
  latitude REAL,
  longitude REAL,
  camera_id TEXT,
  camera_model TEXT,
  UNIQUE (root_id, folder)
);
CREATE TABLE media (
  id INTEGER PRIMARY KEY,
  root_id INTEGER NOT NULL REFERENCES roots(id),
  rel_path TEXT NOT NULL,
  deployment_id TEXT NOT NULL REFERENCES deployments(id),
  kind TEXT NOT NULL CHECK (kind IN ('image', 'video')),
  size INTEGER NOT NULL,
  mtime_ms INTEGER NOT NULL,
  fingerprint TEXT NOT NULL,
  capture_time TEXT NOT NULL,
  capture_sort_ms INTEGER NOT NULL,
  capture_source TEXT NOT NULL,
  width INTEGER NOT NULL,
  height INTEGER NOT NULL,
  format TEXT,
  camera_make TEXT,
  camera_model TEXT,
  camera_serial TEXT,
  light TEXT CHECK (light IN ('colour', 'infrared')),
  duration_s REAL,
  fps REAL,
  codec TEXT,
  rotation INTEGER,
  present INTEGER NOT NULL DEFAULT 1,
  UNIQUE (root_id, rel_path)
);
CREATE INDEX media_deployment ON media (deployment_id, capture_sort_ms);
CREATE TABLE events (
  id TEXT PRIMARY KEY,
  deployment_id TEXT NOT NULL REFERENCES deployments(id),
  kind TEXT NOT NULL CHECK (kind IN ('burst', 'single', 'clip')),
  start_time TEXT NOT NULL,
  end_time TEXT NOT NULL,
  start_sort_ms INTEGER NOT NULL,
  input_hash TEXT NOT NULL
);
CREATE INDEX events_deployment ON events (deployment_id, start_sort_ms);
CREATE TABLE event_media (
  event_id TEXT NOT NULL REFERENCES events(id) ON DELETE CASCADE,
  position INTEGER NOT NULL,
  media_id INTEGER NOT NULL REFERENCES media(id),
  PRIMARY KEY (event_id, position)
);
CREATE INDEX event_media_media ON event_media (media_id);
CREATE TABLE analyses (
  id INTEGER PRIMARY KEY,
  event_id TEXT NOT NULL UNIQUE REFERENCES events(id) ON DELETE CASCADE,
  scan_id INTEGER REFERENCES scans(id),
  engine_version TEXT NOT NULL,
  param_hash TEXT NOT NULL,
  input_hash TEXT NOT NULL,
  analysis_width INTEGER NOT NULL,
  analysis_height INTEGER NOT NULL,
  score REAL NOT NULL CHECK (score >= 0 AND score <= 1),
  verdict TEXT NOT NULL CHECK (verdict IN ('likely-blank', 'unsure', 'motion')),
  features TEXT NOT NULL,
  detail TEXT NOT NULL,
  created_at TEXT NOT NULL
);
CREATE INDEX analyses_verdict ON analyses (verdict, score);
CREATE TABLE windows (
  analysis_id INTEGER NOT NULL REFERENCES analyses(id) ON DELETE CASCADE,
  start_s REAL NOT NULL,
  end_s REAL NOT NULL,
  score REAL NOT NULL
);
CREATE INDEX windows_analysis ON windows (analysis_id);
CREATE TABLE previews (
  analysis_id INTEGER NOT NULL REFERENCES analyses(id) ON DELETE CASCADE,
  kind TEXT NOT NULL CHECK (kind IN ('frame', 'heat')),
  position INTEGER NOT NULL,
  path TEXT NOT NULL,
  width INTEGER NOT NULL,
  height INTEGER NOT NULL,
  time_s REAL,
  PRIMARY KEY (analysis_id, kind, position)
);
CREATE TABLE scan_errors (
  id INTEGER PRIMARY KEY,
  root_id INTEGER NOT NULL REFERENCES roots(id),
  rel_path TEXT NOT NULL,
  fingerprint TEXT,
  stage TEXT NOT NULL CHECK (stage IN ('read', 'partial')),
  code TEXT NOT NULL,
  message TEXT NOT NULL,
  scan_id INTEGER REFERENCES scans(id),
  at TEXT NOT NULL,
  UNIQUE (root_id, rel_path)
);
CREATE TABLE decisions (
  id INTEGER PRIMARY KEY,
  event_id TEXT NOT NULL,
  decision TEXT CHECK (decision IN ('keep', 'set-aside')),
  source TEXT NOT NULL,
  who TEXT,
  at TEXT NOT NULL,
  score REAL,
  verdict TEXT,
  engine_version TEXT,
  batch TEXT,
  note TEXT
);
CREATE INDEX decisions_event ON decisions (event_id, id);
CREATE TRIGGER decisions_append_only_update BEFORE UPDATE ON decisions
BEGIN SELECT RAISE(ABORT, 'decisions are append-only'); END;
CREATE TRIGGER decisions_append_only_delete BEFORE DELETE ON decisions
BEGIN SELECT RAISE(ABORT, 'decisions are append-only'); END;
`;
