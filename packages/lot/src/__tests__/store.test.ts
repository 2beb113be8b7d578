import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import initSqlJs from 'sql.js';
import { appendLotRun } from '../appendLotRun.js';
import { checkLotStore } from '../checkLotStore.js';
import { decisionRule } from '../decisionRule.js';
import { judgeLot } from '../judgeLot.js';
import { LotError } from '../LotError.js';
import { parseLotSpec } from '../parseLotSpec.js';
import type { LotRunRecord, MotorOutcome } from '../types.js';

// Invented spec and outcomes in the demo scenario (no fit needed to test the store).
const specText = '{"name":"Tern 24 (invented)","limits":{"R":{"nominal":1.9,"tolerancePercent":5},"J":{"min":9.5e-6,"max":1.25e-5}}}';
const spec = parseLotSpec(specText, 'spec.json');
function outcome(serial: string, R: number | null, J = 1.1e-5): MotorOutcome {
  if (R === null) {
    return { serial, status: 'error', reason: `${serial}/step.csv: no time column`, values: {}, inputs: [], model: '', findings: [], ignoredFiles: [], parameterSet: null, threadId: 0 };
  }
  return {
    serial, status: 'fitted', reason: '', model: 'lumped linear DC motor (invented)', findings: ['winding-heating (warning)'], ignoredFiles: [], parameterSet: null, threadId: 1,
    values: { R: { value: R, ci95: [R - 0.001, R + 0.001], unit: 'Ω', note: '' }, J: { value: J, ci95: [J * 0.999, J * 1.001], unit: 'kg·m²', note: '' } },
    inputs: [{ file: `${serial}/step.csv`, kind: 'step', kindSource: 'guessed', sha256: 'a'.repeat(64), rows: 2401, rowsDropped: 0 }],
  };
}
const serials = ['T24-9001', 'T24-9002', "T24-9003 'quoted'", 'T24-9004'];
function record(startedAt: string): LotRunRecord {
  const judgement = judgeLot(spec, [outcome(serials[0]!, 1.9), outcome(serials[1]!, 2.2), outcome(serials[2]!, 1.995), outcome(serials[3]!, null)]);
  return {
    startedAt, finishedAt: startedAt, tool: { name: 'motorprint', version: 'test' }, lotFolder: 'lot', jobs: 2,
    specFile: 'spec.json', specText, spec, rule: decisionRule(), judgement,
  };
}

const dir = mkdtempSync(join(tmpdir(), 'motorprint-store-'));
let first: { bytes: Uint8Array; lotRunId: number };
let second: { bytes: Uint8Array; lotRunId: number };
beforeAll(async () => {
  first = await appendLotRun(null, record('2025-03-01T10:00:00Z'), 'lots.sqlite');
  second = await appendLotRun(first.bytes, record('2025-03-02T10:00:00Z'), 'lots.sqlite');
  writeFileSync(join(dir, 'lots.sqlite'), second.bytes);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('appendLotRun', () => {
  it('creates a store, and a second run adds a new lot run without touching the first', async () => {
    expect(first.lotRunId).toBe(1);
    expect(second.lotRunId).toBe(2);
    expect(await checkLotStore(second.bytes, 'lots.sqlite')).toBe(2);
    const SQL = await initSqlJs();
    const db = new SQL.Database(second.bytes);
    const q = (sql: string) => db.exec(sql)[0]?.values ?? [];
    expect(q('SELECT id, started_at, lot_verdict, motors, passed, failed, undecided, errors, decision_rule FROM lot_runs ORDER BY id')).toEqual([
      [1, '2025-03-01T10:00:00Z', 'not accepted', 4, 1, 1, 1, 1, 'guarded-95'],
      [2, '2025-03-02T10:00:00Z', 'not accepted', 4, 1, 1, 1, 1, 'guarded-95'],
    ]);
    expect(q('SELECT serial, verdict FROM motors WHERE lot_run_id = 1 ORDER BY serial')).toEqual([
      ['T24-9001', 'pass'], ['T24-9002', 'fail'], ["T24-9003 'quoted'", 'undecided'], ['T24-9004', 'error'],
    ]);
    expect(q("SELECT key, value, ci95_low, ci95_high, lower_limit, upper_limit, verdict FROM checked_values WHERE lot_run_id = 2 AND serial = 'T24-9002' ORDER BY key")).toEqual([
      ['J', 1.1e-5, 1.1e-5 * 0.999, 1.1e-5 * 1.001, 9.5e-6, 1.25e-5, 'pass'],
      ['R', 2.2, 2.2 - 0.001, 2.2 + 0.001, 1.805, 1.995, 'fail'], // limits 1.9 ± 5 % as parseLotSpec resolves them (12 significant digits)
    ]);
    expect(q('SELECT count(*) FROM inputs')).toEqual([[6]]); // 3 fitted motors × 1 input × 2 runs
    expect(q("SELECT key, n FROM key_statistics WHERE lot_run_id = 1 ORDER BY key")).toEqual([['J', 3], ['R', 3]]);
    expect(q("SELECT value FROM store_info WHERE key = 'schema'")).toEqual([['motorprint.lot-store/1']]);
    expect(q('SELECT spec_text FROM lot_runs WHERE id = 1')).toEqual([[specText]]);
    db.close();
  });

  it('refuses bytes that are not SQLite, and a SQLite file that is not a lot store', async () => {
    await expect(appendLotRun(new TextEncoder().encode('serial,verdict\nA,pass\n'.repeat(50)), record('x'), 'old.csv')).rejects.toThrow(/old\.csv: is not a SQLite database/);
    const SQL = await initSqlJs();
    const other = new SQL.Database();
    other.exec('CREATE TABLE parts (id INTEGER)');
    const bytes = other.export();
    other.close();
    const error = await appendLotRun(bytes, record('x'), 'parts.sqlite').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(LotError);
    expect((error as LotError).message).toBe('parts.sqlite: is a SQLite file but not a motorprint lot store (its tables: parts); use another store file');
    expect(await checkLotStore(null, 'new.sqlite')).toBe(0);
  });

  it('writes a file that another SQLite reader opens, finding every serial of every run', (ctx) => {
    const file = join(dir, 'lots.sqlite');
    const sql = 'SELECT lot_run_id, serial, verdict FROM motors ORDER BY lot_run_id, serial;';
    let rows: string[] | null = null;
    let reader = '';
    if (spawnSync('sqlite3', ['-version']).status === 0) {
      reader = 'sqlite3 command';
      rows = execFileSync('sqlite3', ['-readonly', '-separator', '|', file, sql], { encoding: 'utf8' }).trim().split('\n');
    } else if (spawnSync('python3', ['-c', 'import sqlite3']).status === 0) {
      reader = "python3's sqlite3 module";
      const py = 'import sqlite3, sys\ncon = sqlite3.connect("file:" + sys.argv[1] + "?mode=ro", uri=True)\n' +
        'for r in con.execute(sys.argv[2]): print("|".join(str(c) for c in r))';
      rows = execFileSync('python3', ['-c', py, file, sql], { encoding: 'utf8' }).trim().split('\n');
    }
    if (rows === null) {
      console.warn('lot store reader check skipped: neither the sqlite3 command nor python3 with its sqlite3 module is installed (apt-get install sqlite3)');
      ctx.skip();
      return;
    }
    expect(rows, reader).toEqual([1, 2].flatMap((id) => [
      `${id}|T24-9001|pass`, `${id}|T24-9002|fail`, `${id}|T24-9003 'quoted'|undecided`, `${id}|T24-9004|error`,
    ]));
  });
});
