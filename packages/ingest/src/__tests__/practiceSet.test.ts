import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { readRecording } from '../index.js';
import type { ChannelRole, Recording } from '../index.js';

// The practice set in ../shared/reference/bench-practice/ holds invented recordings from an
// independent simulator (its README says so). Each case's truth.json lists every CSV column with
// its quantity, unit, factor to SI and a `meaning`; this test reads each file and checks the role
// and the SI minimum and maximum that this description implies. The expected extremes are computed
// here by a separate, minimal CSV reader (split on the delimiter, decimal comma → point) times the
// truth's factor, so the test does not lean on the code it checks.

const here = dirname(fileURLToPath(import.meta.url));
const ROOT = process.env.MOTORPRINT_PRACTICE_DIR ?? resolve(here, '../../../../../shared/reference/bench-practice');
const CASES = join(ROOT, 'cases');
const have = existsSync(CASES);
if (!have) console.warn(`skipping the practice-set reads: ${CASES} is absent (set MOTORPRINT_PRACTICE_DIR to its folder)`);

interface TruthColumn {
  name: string;
  quantity: 'time' | 'voltage' | 'current' | 'speed' | 'position' | 'torque' | 'temperature';
  unit: string;
  si_per_unit: number;
  meaning: string;
}

/** The role a truth column implies: its quantity, with voltages told apart by their meaning. */
function expectedRole(c: TruthColumn): ChannelRole {
  if (c.quantity !== 'voltage') return c.quantity;
  if (/^supply voltage/.test(c.meaning)) return 'supplyVoltage';
  if (/command/.test(c.meaning)) return 'commandVoltage';
  return 'voltage';
}

/** Minimal independent reader: strips a BOM, skips # lines, splits on the delimiter, unquotes. */
function rawColumns(text: string): { header: string[]; rows: string[][]; delimiter: string } {
  const lines = text.replace(/^\uFEFF/, '').split(/\r?\n/).filter((l) => l.trim() !== '' && !l.startsWith('#'));
  const header = lines[0]!;
  const delimiter = header.includes('\t') ? '\t' : header.includes(';') ? ';' : ',';
  const cells = (l: string): string[] => l.split(delimiter).map((c) => c.trim().replace(/^"(.*)"$/, '$1'));
  return { header: cells(header), rows: lines.slice(1).map(cells), delimiter };
}

const cases = have ? readdirSync(CASES).filter((d) => existsSync(join(CASES, d, 'truth.json'))).sort() : [];

describe.skipIf(!have)('every practice-set file reads with the roles and SI ranges its truth.json implies', () => {
  it('finds the 34 cases the set describes', () => {
    // The set's README: "Practice set: 34 invented bench recordings".
    expect(cases).toHaveLength(34);
  });

  it.each(cases.length ? cases : ['(none)'])('%s', async (id) => {
    const truth = JSON.parse(readFileSync(join(CASES, id, 'truth.json'), 'utf8')) as { columns: TruthColumn[] };
    const file = join(CASES, id, 'data.csv');
    const { recording } = await readRecording(file);
    const raw = rawColumns(readFileSync(file, 'utf8'));
    const isTable = !truth.columns.some((c) => c.quantity === 'time');
    expect(recording.layout).toBe(isTable ? 'table' : 'series');
    if (isTable) expect(recording.meta.timeBase).toBeNull();
    expect(recording.meta.rowsDroppedCount).toBe(0);
    expect(recording.meta.rowsKept).toBe(raw.rows.length);
    for (const tc of truth.columns) {
      const role = expectedRole(tc);
      const col = recording.meta.columns.find((c) => c.header === tc.name);
      expect(col, `${id}: column ${tc.name}`).toBeDefined();
      expect(col!.role, `${id}: role of ${tc.name}`).toBe(role);
      // A unit is read from the header wherever one is written; only a bare name (Vbus) falls back
      // to the default, and that default must be the truth's unit.
      if (col!.unitAssumed) expect(col!.canonicalUnit, `${id}: assumed unit of ${tc.name}`).toBe(tc.unit);
      else expect(/[[(_]/.test(tc.name), `${id}: ${tc.name} carries its unit`).toBe(true);
      // Expected SI extremes from the raw text and the truth's factor.
      const at = raw.header.indexOf(tc.name);
      let min = Infinity;
      let max = -Infinity;
      for (const row of raw.rows) {
        const x = Number(raw.delimiter === ',' ? row[at] : row[at]!.replace(',', '.')) * tc.si_per_unit;
        min = Math.min(min, x);
        max = Math.max(max, x);
      }
      const values = role === 'time' ? recording.time : (recording.channels as Recording['channels'])[role as Exclude<ChannelRole, 'time'>]!;
      let gotMin = Infinity;
      let gotMax = -Infinity;
      for (const x of values) {
        gotMin = Math.min(gotMin, x);
        gotMax = Math.max(gotMax, x);
      }
      // Products of the same decimal and factor may differ by rounding of the factor (mathjs vs truth).
      expectClose(gotMin, min, { rel: 1e-12, abs: 1e-15 }, `${id} ${tc.name} min [SI]`);
      expectClose(gotMax, max, { rel: 1e-12, abs: 1e-15 }, `${id} ${tc.name} max [SI]`);
    }
    // Nothing else was taken as a measured channel.
    const roles = recording.meta.columns.filter((c) => c.role !== 'extra').map((c) => c.role).sort();
    expect(roles).toEqual(truth.columns.map(expectedRole).sort());
  });
});
