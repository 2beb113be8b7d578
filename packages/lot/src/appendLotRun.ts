import { createHash } from 'node:crypto';
import initSqlJs, { type SqlValue } from 'sql.js';
import { openLotStore } from './openLotStore.js';
import { LOT_STORE_SCHEMA_ID, LOT_STORE_TABLES } from './storeSchema.js';
import type { LotRunRecord } from './types.js';

function finite(x: number | null | undefined): number | null {
  return x !== null && x !== undefined && Number.isFinite(x) ? x : null;
}

/**
 * Adds one lot run to a lot store (a SQLite database, schema `motorprint.lot-store/1`, tables in
 * `storeSchema.ts` and docs/lot.md) and returns the new file contents. An existing store is read
 * and extended — earlier runs are never changed — and an empty or missing one is created. The
 * caller reads and writes the file (writing it atomically: a temporary file, then a rename).
 *
 * @param existing - the current file's bytes, or null when there is none yet
 * @param record - the run: times, tool, lot folder, spec (text and resolved), decision rule, judged lot
 * @param file - the store's file name, for messages
 * @returns the new database bytes and the id of the added lot run
 * @throws LotError `store-invalid` when `existing` is not SQLite or not a lot store of this schema
 * @example
 * const { bytes, lotRunId } = await appendLotRun(null, record, 'lots.sqlite');
 * lotRunId; // => 1
 */
export async function appendLotRun(existing: Uint8Array | null, record: LotRunRecord, file: string): Promise<{ bytes: Uint8Array; lotRunId: number }> {
  const SQL = await initSqlJs();
  const db = openLotStore(SQL, existing, file);
  try {
    db.exec('PRAGMA foreign_keys = ON;');
    db.exec('BEGIN;');
    db.exec(LOT_STORE_TABLES);
    db.run('INSERT OR IGNORE INTO store_info (key, value) VALUES (?, ?)', ['schema', LOT_STORE_SCHEMA_ID]);
    const j = record.judgement;
    db.run(
      `INSERT INTO lot_runs (started_at, finished_at, tool_name, tool_version, lot_folder, jobs, spec_name, spec_file, spec_text, spec_sha256,
        decision_rule, decision_rule_text, guard_band, lot_verdict, motors, passed, failed, undecided, errors)
       VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`,
      [record.startedAt, record.finishedAt, record.tool.name, record.tool.version, record.lotFolder, record.jobs, record.spec.name,
        record.specFile, record.specText, createHash('sha256').update(record.specText, 'utf8').digest('hex'),
        record.rule.id, record.rule.text, record.rule.guardBand, j.verdict, j.motors.length, j.counts.pass, j.counts.fail, j.counts.undecided, j.counts.error],
    );
    const lotRunId = Number(db.exec('SELECT last_insert_rowid()')[0]!.values[0]![0]);
    const motor = db.prepare('INSERT INTO motors (lot_run_id, serial, verdict, reason, model, findings, parameter_set) VALUES (?, ?, ?, ?, ?, ?, ?)');
    const value = db.prepare(`INSERT INTO checked_values (lot_run_id, serial, key, unit, value, ci95_low, ci95_high, lower_limit, upper_limit, verdict, reason)
      VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`);
    const input = db.prepare('INSERT INTO inputs (lot_run_id, serial, file, kind, kind_source, sha256, rows, rows_dropped) VALUES (?, ?, ?, ?, ?, ?, ?, ?)');
    const stat = db.prepare(`INSERT INTO key_statistics (lot_run_id, key, unit, lower_limit, upper_limit, n, mean, sd, min, max, median, mad, cp, cpk, outliers, notes)
      VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)`);
    try {
      for (const m of j.motors) {
        const o = m.outcome;
        motor.run([lotRunId, m.serial, m.verdict, m.reason, o.model, JSON.stringify(o.findings), o.parameterSet === null ? null : JSON.stringify(o.parameterSet)]);
        for (const k of m.keys) {
          const row: SqlValue[] = [lotRunId, m.serial, k.key, k.unit, finite(k.value), finite(k.ci95?.[0]), finite(k.ci95?.[1]),
            finite(k.lower), finite(k.upper), k.verdict, k.reason];
          value.run(row);
        }
        for (const f of o.inputs) input.run([lotRunId, m.serial, f.file, f.kind, f.kindSource, f.sha256, f.rows, f.rowsDropped]);
      }
      for (const s of j.statistics) {
        stat.run([lotRunId, s.key, s.unit, finite(s.lower), finite(s.upper), s.n, finite(s.mean), finite(s.sd), finite(s.min), finite(s.max),
          finite(s.median), finite(s.mad), finite(s.cp), finite(s.cpk), JSON.stringify(s.outliers), s.notes.join('; ')]);
      }
    } finally {
      motor.free(); value.free(); input.free(); stat.free();
    }
    db.exec('COMMIT;');
    return { bytes: db.export(), lotRunId };
  } finally {
    db.close();
  }
}
