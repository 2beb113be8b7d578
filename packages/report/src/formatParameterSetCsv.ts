import type { ParameterSet } from './types.js';
import { tuningRows } from './tuningRows.js';

function cell(v: string): string {
  return /[",\r\n]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}
function n(x: number | null): string {
  return x === null ? '' : String(x);
}

/**
 * The parameter set as CSV (RFC 4180 quoting, `\n` line ends): one row per constant, the
 * resistance at the reference temperature, one row per derived figure, and one per loop-tuning gain
 * when the set has them (`tuning.currentLoop.Kp`, …). Columns: name, value, unit, low, high,
 * identifiable, note. Numbers at full precision; empty cells for missing ones (the identifiable
 * cell of R at the reference temperature is empty when it was not computed; the note says why).
 *
 * @param set - the parameter set
 * @returns CSV text with a header row
 * @throws TypeError when `set` is not a parameter set
 * @example
 * formatParameterSetCsv(set).split('\n')[0]; // => 'name,value,unit,low,high,identifiable,note'
 */
export function formatParameterSetCsv(set: ParameterSet): string {
  if (set === null || typeof set !== 'object' || set.schema !== 'motorprint.parameter-set/1') {
    throw new TypeError('formatParameterSetCsv: set must be a parameter set with schema "motorprint.parameter-set/1"');
  }
  const rows: string[][] = [['name', 'value', 'unit', 'low', 'high', 'identifiable', 'note']];
  for (const [name, e] of Object.entries(set.parameters)) {
    if (e === undefined) continue;
    rows.push([name, n(e.value), e.unit, n(e.ci95?.[0] ?? null), n(e.ci95?.[1] ?? null), String(e.identifiable), e.note]);
  }
  const r = set.resistanceAtReference;
  rows.push([`R_ref(${r.referenceTemperature} °C)`, n(r.value), r.unit, n(r.ci95?.[0] ?? null), n(r.ci95?.[1] ?? null),
    r.value === null ? '' : String(set.parameters.R.identifiable), r.note]);
  for (const [name, f] of Object.entries(set.derived)) {
    const note = [f.label, f.formula, f.note].filter((s) => s !== '').join('; ');
    rows.push([name, n(f.value), f.unit, n(f.ci95?.[0] ?? null), n(f.ci95?.[1] ?? null), String(f.identifiable), note]);
  }
  if (set.tuning !== undefined) {
    const t = tuningRows(set.tuning);
    for (const g of t.rows) rows.push([`tuning.${g.key}`, n(g.value), g.unit, n(g.ci95?.[0] ?? null), n(g.ci95?.[1] ?? null), String(g.ci95 !== null), `${g.label}; ${g.formula}; ${t.settings}`]);
  }
  return `${rows.map((row) => row.map(cell).join(',')).join('\n')}\n`;
}
