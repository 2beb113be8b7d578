import type { RecordingColumn } from './types.js';

/**
 * Formats logged columns as CSV text: a header naming each column with its unit in brackets
 * (`time [s],voltage [V],current [A]`), then one row per sample, numbers in shortest
 * round-trip form, `\n` line ends.
 *
 * @param columns - columns of equal length
 * @returns the CSV text
 * @throws TypeError when the columns are empty, not Float64Arrays, of unequal length, or a name/unit contains `,`, `[`, `]` or a line break
 * @example
 * formatRecordingCsv([{ name: 'time', unit: 's', values: Float64Array.of(0, 1e-4) },
 *   { name: 'current', unit: 'A', values: Float64Array.of(0, 1.5) }]);
 * // => 'time [s],current [A]\n0,0\n0.0001,1.5\n'
 */
export function formatRecordingCsv(columns: readonly RecordingColumn[]): string {
  if (!Array.isArray(columns) || columns.length === 0) throw new TypeError('formatRecordingCsv: columns must be a non-empty array');
  const n = columns[0]!.values?.length;
  columns.forEach((c, j) => {
    if (!(c.values instanceof Float64Array)) throw new TypeError(`formatRecordingCsv: columns[${j}].values must be a Float64Array`);
    if (c.values.length !== n) {
      throw new TypeError(`formatRecordingCsv: columns[${j}] (${c.name}) has ${c.values.length} values, columns[0] has ${n}`);
    }
    for (const [what, text] of [['name', c.name], ['unit', c.unit]] as const) {
      if (typeof text !== 'string' || /[,[\]\r\n]/.test(text)) {
        throw new TypeError(`formatRecordingCsv: columns[${j}].${what} must be a string without , [ ] or line breaks (got ${JSON.stringify(text)})`);
      }
    }
  });
  const lines: string[] = [columns.map((c) => `${c.name} [${c.unit}]`).join(',')];
  for (let k = 0; k < (n ?? 0); k++) {
    let row = '';
    for (let j = 0; j < columns.length; j++) {
      if (j > 0) row += ',';
      row += String(columns[j]!.values[k]);
    }
    lines.push(row);
  }
  return lines.join('\n') + '\n';
}
