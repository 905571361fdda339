-- Invented history for tests/cli/test_history.sh (demo data, no real site).
-- The DDL must stay identical to what lib/store/src/migrations.cpp leaves in a new file (schema
-- version 3): the test StoreSchema.FixtureOfTheCliTestMatchesTheMigrations compares the two.
PRAGMA auto_vacuum = INCREMENTAL;
PRAGMA journal_mode = WAL;
BEGIN IMMEDIATE;
PRAGMA application_id = 1148669287;
CREATE TABLE events (
  id INTEGER PRIMARY KEY,
  ts_ms INTEGER NOT NULL,
  subject_type TEXT NOT NULL,
  subject_id TEXT NOT NULL,
  kind TEXT NOT NULL,
  json TEXT NOT NULL
);
CREATE INDEX events_by_subject_ts ON events (subject_id, ts_ms);
CREATE INDEX events_by_ts ON events (ts_ms);
CREATE INDEX events_by_kind_ts ON events (kind, ts_ms);
CREATE TABLE zone_state (
  zone TEXT PRIMARY KEY,
  band TEXT NOT NULL,
  alarm_active INTEGER NOT NULL,
  acknowledged INTEGER NOT NULL,
  shelved_until_ms INTEGER,
  valve TEXT NOT NULL,
  ts_ms INTEGER NOT NULL
);
CREATE TABLE loop_state (
  loop TEXT PRIMARY KEY,
  setpoint_c REAL NOT NULL,
  ts_ms INTEGER NOT NULL
);
CREATE TABLE zone_samples (
  minute_ms INTEGER NOT NULL,
  zone TEXT NOT NULL,
  min_margin_k REAL,
  max_dew_point_c REAL,
  worst_band TEXT NOT NULL,
  air_temp_c REAL,
  rh_pct REAL,
  surface_min_c REAL,
  supply_c REAL,
  surface_rh_pct REAL,
  PRIMARY KEY (minute_ms, zone)
) WITHOUT ROWID;
CREATE TABLE zone_hours (
  hour_ms INTEGER NOT NULL,
  zone TEXT NOT NULL,
  sample_minutes INTEGER NOT NULL,
  min_margin_k REAL,
  min_margin_at_ms INTEGER,
  max_margin_k REAL,
  mean_margin_k REAL,
  max_dew_point_c REAL,
  mean_dew_point_c REAL,
  min_surface_c REAL,
  mean_surface_c REAL,
  mean_air_temp_c REAL,
  mean_rh_pct REAL,
  mean_supply_c REAL,
  max_surface_rh_pct REAL,
  mean_surface_rh_pct REAL,
  safe_min INTEGER NOT NULL,
  tight_min INTEGER NOT NULL,
  alarm_min INTEGER NOT NULL,
  condensing_min INTEGER NOT NULL,
  unknown_min INTEGER NOT NULL,
  mould_min INTEGER NOT NULL,
  mould_head_min INTEGER NOT NULL,
  mould_tail_min INTEGER NOT NULL,
  mould_longest_min INTEGER NOT NULL,
  PRIMARY KEY (hour_ms, zone)
) WITHOUT ROWID;
CREATE TABLE store_marks (
  name TEXT PRIMARY KEY,
  value_ms INTEGER NOT NULL
) WITHOUT ROWID;
INSERT INTO store_marks (name, value_ms) VALUES ('hours_until', 0), ('minutes_from', 0);
PRAGMA user_version = 3;

-- 2026-07-13T23:59:59Z = 1783987199000; 2026-07-14T00:00:00Z = 1783987200000;
-- 2026-07-14T13:00:00Z = 1784034000000 (computed with GNU date -u -d).
INSERT INTO events (id, ts_ms, subject_type, subject_id, kind, json) VALUES
 (1, 1783987199000, 'site', '', 'service',
  '{"ts":"2026-07-13T23:59:59Z","site":"demo-site","kind":"service","action":"start","version":"0.1.0"}'),
 (2, 1784034000000, 'zone', 'level2-east', 'band',
  '{"ts":"2026-07-14T13:00:00Z","site":"demo-site","zone":"level2-east","kind":"band","from":"safe","to":"tight","margin_k":1.84,"dew_point_c":16.21}'),
 (3, 1784034060000, 'zone', 'level2-east', 'ack',
  '{"ts":"2026-07-14T13:01:00Z","site":"demo-site","zone":"level2-east","kind":"ack","by":"AB","note":"drip tray checked, \"dry\"\nwill recheck"}'),
 (4, 1784034060000, 'loop', 'loop-a', 'setpoint',
  '{"ts":"2026-07-14T13:01:00Z","site":"demo-site","loop":"loop-a","kind":"setpoint","from":17.5,"to":18.25,"reason":"dew point rose"}'),
 (5, 1784034120000, 'zone', 'level3-west', 'valve',
  '{"ts":"2026-07-14T13:02:00Z","site":"demo-site","zone":"level3-west","kind":"valve","from":"open","to":"closed","reason":"window open"}'),
 (6, 1784073600000, 'zone', 'level2-east', 'band',
  '{"ts":"2026-07-15T00:00:00Z","site":"demo-site","zone":"level2-east","kind":"band","from":"tight","to":"safe","margin_k":2.5,"dew_point_c":15.1}');

INSERT INTO zone_samples VALUES
 (1784034000000, 'level2-east', 1.84, 16.21, 'tight', 25.1, 55.0, 18.05, 17.2, NULL);
INSERT INTO zone_state VALUES ('level2-east', 'tight', 0, 1, NULL, 'open', 1784034060000);
INSERT INTO loop_state VALUES ('loop-a', 18.25, 1784034060000);
COMMIT;
