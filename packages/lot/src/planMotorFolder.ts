import { LotError } from './LotError.js';
import type { MotorPlan, PlannedRun, RunKind } from './types.js';

/** Name of the optional table in a motor folder that lists its recordings and their kinds. */
export const RUNS_TABLE = 'runs.csv';

const KINDS: readonly RunKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];

/** One entry of a motor folder. */
export interface FolderEntry {
  /** File or folder name. */
  name: string;
  /** True for a regular file. */
  isFile: boolean;
}

/** Splits one CSV line into trimmed cells; double quotes may enclose a cell (`""` inside is a quote). */
function splitCsvLine(line: string): string[] | null {
  const cells: string[] = [];
  let i = 0;
  for (;;) {
    while (line[i] === ' ' || line[i] === '\t') i++;
    let cell = '';
    if (line[i] === '"') {
      i++;
      for (;;) {
        if (i >= line.length) return null;
        if (line[i] === '"') {
          if (line[i + 1] === '"') { cell += '"'; i += 2; continue; }
          i++;
          break;
        }
        cell += line[i++];
      }
      while (line[i] === ' ' || line[i] === '\t') i++;
      if (i < line.length && line[i] !== ',') return null;
    } else {
      const end = line.indexOf(',', i);
      cell = (end < 0 ? line.slice(i) : line.slice(i, end)).trim();
      i = end < 0 ? line.length : end;
    }
    cells.push(cell);
    if (i >= line.length) return cells;
    i++; // the comma
  }
}

/**
 * Plans the fit of one motor from the entries of its folder: which recordings to read, with which
 * declared kinds, and which files are left out (each with its reason). Without a `runs.csv` every
 * `.csv` file is a recording and its kind is guessed from the data; with one, the files it lists
 * are the recordings, with the kinds it declares (an empty kind is guessed). A problem with the
 * folder or its `runs.csv` goes into `problem` (the motor becomes an error; the lot goes on).
 *
 * `runs.csv` format: a header line `file,kind` (either order), then one line per recording; blank
 * lines and lines starting with `#` are skipped; `kind` is one of locked-rotor, step, coast-down,
 * steady-state, prbs, multisine, loaded, or empty.
 *
 * @param serial - the folder name (the motor's serial)
 * @param folder - the folder path to read from and to show (e.g. `lot/T24-0003`)
 * @param entries - the folder's entries
 * @param runsTable - the text of its `runs.csv`, or null when it has none
 * @returns the plan
 * @example
 * planMotorFolder('T24-0001', 'lot/T24-0001', [{ name: 'step.csv', isFile: true }, { name: 'step.truth.json', isFile: true }], null);
 * // => { serial: 'T24-0001', runs: [{ path: 'lot/T24-0001/step.csv', file: 'T24-0001/step.csv', kind: null }],
 * //      ignored: [{ file: 'T24-0001/step.truth.json', reason: 'not a .csv file' }], problem: null, … }
 */
export function planMotorFolder(serial: string, folder: string, entries: readonly FolderEntry[], runsTable: string | null): MotorPlan {
  const sep = folder.endsWith('/') || folder.endsWith('\\') ? '' : '/';
  const shown = (name: string) => `${serial}/${name}`;
  const plan: MotorPlan = { serial, folder, runs: [], ignored: [], problem: null };
  const sorted = [...entries].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
  const isCsv = (e: FolderEntry) => e.isFile && e.name.toLowerCase().endsWith('.csv') && e.name !== RUNS_TABLE;
  if (runsTable === null) {
    for (const e of sorted) {
      if (isCsv(e)) plan.runs.push({ path: `${folder}${sep}${e.name}`, file: shown(e.name), kind: null });
      else plan.ignored.push({ file: shown(e.name), reason: e.isFile ? 'not a .csv file' : 'a folder (recordings sit directly in the motor folder)' });
    }
    if (plan.runs.length === 0) plan.problem = `${serial}: no recordings (.csv files) in the motor folder`;
    return plan;
  }
  const tableName = shown(RUNS_TABLE);
  try {
    const lines = runsTable.replace(/^\uFEFF/, '').split(/\r?\n/);
    let header: { file: number; kind: number } | null = null;
    const listed = new Set<string>();
    lines.forEach((raw, index) => {
      const line = index + 1;
      if (raw.trim() === '' || raw.trimStart().startsWith('#')) return;
      const cells = splitCsvLine(raw);
      if (cells === null) throw new LotError('runs-table-invalid', tableName, 'a quoted cell is not closed', { line });
      if (header === null) {
        const names = cells.map((c) => c.toLowerCase());
        const unknown = names.filter((c) => c !== 'file' && c !== 'kind');
        if (unknown.length > 0 || !names.includes('file') || !names.includes('kind') || names.length !== 2) {
          throw new LotError('runs-table-invalid', tableName, `the header must be "file,kind" (got "${raw.trim()}")`, { line });
        }
        header = { file: names.indexOf('file'), kind: names.indexOf('kind') };
        return;
      }
      if (cells.length !== 2) throw new LotError('runs-table-invalid', tableName, `expected 2 cells (file,kind), got ${cells.length}`, { line });
      const file = cells[header.file]!;
      const kind = cells[header.kind]!;
      if (file === '') throw new LotError('runs-table-invalid', tableName, 'the file cell is empty', { line });
      if (file.includes('/') || file.includes('\\')) {
        throw new LotError('runs-table-invalid', tableName, `"${file}": name a file in the motor folder itself, without a path`, { line });
      }
      if (kind !== '' && !(KINDS as readonly string[]).includes(kind)) {
        throw new LotError('runs-table-invalid', tableName, `"${kind}" is not a kind; use one of ${KINDS.join(', ')}, or leave it empty to have it guessed`, { line });
      }
      if (listed.has(file)) throw new LotError('runs-table-invalid', tableName, `"${file}" is listed twice`, { line });
      const entry = entries.find((e) => e.name === file);
      if (entry === undefined || !entry.isFile) {
        throw new LotError('runs-table-invalid', tableName, `"${file}" is ${entry === undefined ? 'not in the motor folder' : 'a folder, not a file'}`, { line });
      }
      listed.add(file);
      const run: PlannedRun = { path: `${folder}${sep}${file}`, file: shown(file), kind: kind === '' ? null : (kind as RunKind) };
      plan.runs.push(run);
    });
    if (header === null) throw new LotError('runs-table-invalid', tableName, 'the table is empty: it needs the header "file,kind" and one line per recording');
    if (plan.runs.length === 0) throw new LotError('runs-table-invalid', tableName, 'the table lists no recordings');
    for (const e of sorted) {
      if (e.name === RUNS_TABLE || listed.has(e.name)) continue;
      plan.ignored.push({ file: shown(e.name), reason: isCsv(e) ? `not listed in ${RUNS_TABLE}` : e.isFile ? 'not a .csv file' : 'a folder' });
    }
  } catch (error) {
    if (!(error instanceof LotError)) throw error;
    plan.runs = [];
    plan.problem = error.message;
  }
  return plan;
}
