/** Schema identifier kept in the `store_info` table of every lot store. */
export const LOT_STORE_SCHEMA_ID = 'motorprint.lot-store/1';

/**
 * The SQL that creates the tables of a lot store (SQLite). One row in `lot_runs` per run of a lot;
 * `motors`, `checked_values`, `inputs` and `key_statistics` hang off it by `lot_run_id`. Rows are
 * only ever added. docs/lot.md describes every column.
 */
export const LOT_STORE_TABLES = `
CREATE TABLE IF NOT EXISTS store_info (
  key   TEXT PRIMARY KEY,
  value TEXT NOT NULL
);
CREATE TABLE IF NOT EXISTS lot_runs (
  id                 INTEGER PRIMARY KEY AUTOINCREMENT,
  started_at         TEXT NOT NULL,
  finished_at        TEXT NOT NULL,
  tool_name          TEXT NOT NULL,
  tool_version       TEXT NOT NULL,
  lot_folder         TEXT NOT NULL,
  jobs               INTEGER NOT NULL,
  spec_name          TEXT NOT NULL,
  spec_file          TEXT NOT NULL,
  spec_text          TEXT NOT NULL,
  spec_sha256        TEXT NOT NULL,
  decision_rule      TEXT NOT NULL,
  decision_rule_text TEXT NOT NULL,
  guard_band         TEXT NOT NULL,
  lot_verdict        TEXT NOT NULL CHECK (lot_verdict IN ('pass', 'not accepted')),
  motors             INTEGER NOT NULL,
  passed             INTEGER NOT NULL,
  failed             INTEGER NOT NULL,
  undecided          INTEGER NOT NULL,
  errors             INTEGER NOT NULL
);
CREATE TABLE IF NOT EXISTS motors (
  lot_run_id    INTEGER NOT NULL REFERENCES lot_runs(id),
  serial        TEXT NOT NULL,
  verdict       TEXT NOT NULL CHECK (verdict IN ('pass', 'fail', 'undecided', 'error')),
  reason        TEXT NOT NULL,
  model         TEXT NOT NULL,
  findings      TEXT NOT NULL,
  parameter_set TEXT,
  PRIMARY KEY (lot_run_id, serial)
);
CREATE TABLE IF NOT EXISTS checked_values (
  lot_run_id  INTEGER NOT NULL,
  serial      TEXT NOT NULL,
  key         TEXT NOT NULL,
  unit        TEXT NOT NULL,
  value       REAL,
  ci95_low    REAL,
  ci95_high   REAL,
  lower_limit REAL,
  upper_limit REAL,
  verdict     TEXT NOT NULL CHECK (verdict IN ('pass', 'fail', 'undecided')),
  reason      TEXT NOT NULL,
  PRIMARY KEY (lot_run_id, serial, key),
  FOREIGN KEY (lot_run_id, serial) REFERENCES motors(lot_run_id, serial)
);
CREATE TABLE IF NOT EXISTS inputs (
  lot_run_id   INTEGER NOT NULL,
  serial       TEXT NOT NULL,
  file         TEXT NOT NULL,
  kind         TEXT NOT NULL,
  kind_source  TEXT NOT NULL,
  sha256       TEXT NOT NULL,
  rows         INTEGER NOT NULL,
  rows_dropped INTEGER NOT NULL,
  PRIMARY KEY (lot_run_id, serial, file),
  FOREIGN KEY (lot_run_id, serial) REFERENCES motors(lot_run_id, serial)
);
CREATE TABLE IF NOT EXISTS key_statistics (
  lot_run_id  INTEGER NOT NULL REFERENCES lot_runs(id),
  key         TEXT NOT NULL,
  unit        TEXT NOT NULL,
  lower_limit REAL,
  upper_limit REAL,
  n           INTEGER NOT NULL,
  mean        REAL,
  sd          REAL,
  min         REAL,
  max         REAL,
  median      REAL,
  mad         REAL,
  cp          REAL,
  cpk         REAL,
  outliers    TEXT NOT NULL,
  notes       TEXT NOT NULL,
  PRIMARY KEY (lot_run_id, key)
);
`;
