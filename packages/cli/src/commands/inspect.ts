import { classifyRecording } from '@motorprint/estimate';
import { describeRecording, IngestError, UNIT_SOURCE_WORDS, type Recording, type RecordingDescription } from '@motorprint/ingest';
import { parseSubcommandArgs } from '../args.js';
import { cliRole, INGEST_OPTION_HELP, INGEST_OPTIONS, ingestOptionsFrom, readInput } from '../readInputs.js';
import { describeFailure, withFlags } from '../describeFailure.js';
import { checkInputFiles, InputFileError } from '../inputFiles.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber, formatTable } from '../table.js';
import { EXIT, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const HELP = `motorprint inspect FILE... [--json] [--map ROLE=COLUMN] [--unit COLUMN=UNIT] [--counts-per-rev N]
                   [--drive-gain K] [--supply-voltage V] [--pwm-max N]

Shows what motorprint understood of each bench recording before anything is fitted: the CSV
dialect, each column's role and unit and where the unit was read (brackets, suffix, units row,
given, assumed…), rows read and rows dropped with their line numbers and reasons, the sample rate
and its jitter and the time span (or, for a table of operating points without time, the number of
points), a min / max / mean of every channel in SI, and the experiment kind the estimator's
classifier sees, with its reason (unknown when it cannot tell).

Options:
${INGEST_OPTION_HELP}
  --json                print one JSON document on stdout ({ "files": [...] })

Exit codes: 0 every file read; 1 a file not found or not readable ("file not found: PATH"), or not
understood (the message names file, line and column) — the other files are still shown; 2
command-line mistake.`;

/** What inspect shows for one file: the ingest description plus the experiment kind. */
export type InspectedFile = RecordingDescription & { kind: { kind: string; reason: string } };

/**
 * The experiment kind inspect shows, in the estimator's vocabulary: `steady-state` for a table of operating points;
 * otherwise the estimator's classifier on the recording's input voltage (terminal, else command,
 * else supply), and `unknown` with the reason when it cannot tell.
 */
export function experimentKindOf(recording: Recording): { kind: string; reason: string } {
  if (recording.layout === 'table') return { kind: 'steady-state', reason: 'a table of operating points (one row per point, no time column), fitted as steady-state points' };
  try {
    const g = classifyRecording(recording);
    const c = recording.channels;
    const source = c.voltage ? null : c.commandVoltage ? 'command' : c.supplyVoltage ? 'supply' : null;
    return { kind: g.kind, reason: source === null ? g.reason : `${g.reason} (from the ${source} voltage: no terminal voltage logged)` };
  } catch (err) {
    return { kind: 'unknown', reason: `the kind could not be told (${(err as Error).message.replace(/^\w+: /, '')})` };
  }
}

interface FileFailure {
  file: string;
  error: { code: string; message: string; line?: number; column?: string };
}

function failureOf(file: string, err: unknown): FileFailure {
  if (err instanceof InputFileError) return { file, error: { code: 'file-not-usable', message: err.message } };
  if (err instanceof IngestError) {
    const e: FileFailure['error'] = { code: err.code, message: `${err.message}${withFlags(err.fix)}` };
    if (err.line !== undefined) e.line = err.line;
    if (err.column !== undefined) e.column = err.column;
    return { file, error: e };
  }
  const code = (err as { code?: unknown }).code;
  return { file, error: { code: typeof code === 'string' ? code : 'unreadable', message: describeFailure(err) } };
}

function formatSeconds(s: number): string {
  if (!Number.isFinite(s)) return String(s);
  const a = Math.abs(s);
  if (a === 0) return '0 s';
  if (a < 1e-3) return `${formatNumber(s * 1e6)} µs`;
  if (a < 1) return `${formatNumber(s * 1e3)} ms`;
  return `${formatNumber(s)} s`;
}

function percent(x: number): string {
  return `${formatNumber(x * 100, 2)} %`;
}

/** Jitter below this share of the sample interval is rounding of the written times: shown as none. */
export const JITTER_NONE = 1e-6;

/** The jitter of a time base in words: "none" below {@link JITTER_NONE}, else σ and max in %. */
export function jitterText(jitterStd: number, jitterMax: number): string {
  if (jitterMax < JITTER_NONE) return 'jitter none (below 1e-6 of the interval)';
  return `jitter σ ${percent(jitterStd)}, max ${percent(jitterMax)} of the interval`;
}

function unitRead(c: RecordingDescription['columns'][number]): string {
  if (c.unit === null) return '—';
  const words = UNIT_SOURCE_WORDS[c.unitSource];
  return words ? `${c.unit} (${words})` : c.unit;
}

function roleText(c: RecordingDescription['columns'][number]): string {
  if (c.role === 'spread') return `sd of ${cliRole(c.spreadOf ?? '?')}`;
  return cliRole(c.role);
}

/** Human-readable block for one file. */
export function formatDescription(d: InspectedFile, paint: Paint): string {
  const out: string[] = [];
  out.push(paint.bold(d.file));
  out.push(`  sha256 ${d.sha256}, ${d.bytes} bytes`);
  const delim = d.dialect.delimiter === ',' ? 'comma' : d.dialect.delimiter === ';' ? 'semicolon' : d.dialect.delimiter === '\t' ? 'tab' : JSON.stringify(d.dialect.delimiter);
  out.push(
    `  dialect: ${delim}-separated, decimal ${d.dialect.decimalSeparator === ',' ? 'comma' : 'point'}, ` +
      `${d.dialect.lineEnding} line ends${d.dialect.bom ? ', UTF-8 BOM' : ''}${d.dialect.quoted ? ', quoted fields' : ''}, ` +
      `${d.dialect.commentLines} comment line(s), header on line ${d.dialect.headerLine}` +
      `${d.dialect.unitsLine !== null ? `, units row on line ${d.dialect.unitsLine}` : ''}` +
      `${d.dialect.shortNamesLine !== null ? `, short names on line ${d.dialect.shortNamesLine}` : ''}`,
  );
  out.push(`  experiment kind: ${paint.bold(d.kind.kind)} — ${d.kind.reason}`);
  out.push(
    `  rows: ${d.rows.read} read, ${d.rows.kept} kept, ` +
      `${d.rows.dropped > 0 ? paint.warn(`${d.rows.dropped} dropped`) : '0 dropped'}`,
  );
  for (const row of d.rows.droppedRows) {
    out.push(`    line ${row.line}${row.column !== undefined ? `, column "${row.column}"` : ''}: ${row.reason} — ${row.detail}`);
  }
  if (d.rows.dropped > d.rows.droppedRows.length) {
    out.push(`    … and ${d.rows.dropped - d.rows.droppedRows.length} more dropped rows (counted, not listed)`);
  }
  const s = d.sampling;
  const span = d.timeSpan;
  if (s === null || span === null) {
    out.push(`  layout: table of ${d.rows.kept} operating points (one row per point, no time column; row order as written)`);
  } else {
    out.push(
      `  sampling: ${formatNumber(s.sampleRate)} Hz (interval ${formatSeconds(s.sampleInterval)}), ` +
        `${jitterText(s.jitterStd, s.jitterMax)}` +
        `${s.gaps > 0 ? paint.warn(`, ${s.gaps} gap(s), longest ${formatSeconds(s.maxInterval)}`) : ''}`,
    );
    out.push(`  time span: ${formatNumber(span.start)} s to ${formatNumber(span.end)} s (${formatSeconds(span.duration)})`);
  }
  const fmt = (v: number | null | undefined) => (v === null || v === undefined ? '—' : formatNumber(v));
  const rows: string[][] = d.columns.map((c) => {
    const summary =
      c.role === 'spread' ? (c.spreadOf ? d.spread[c.spreadOf] : undefined) : c.role !== 'extra' && c.role !== 'time' ? d.channels[c.role] : undefined;
    const extra = c.role === 'extra' ? d.extra.find((e) => e.name === c.header) : undefined;
    const stats = summary ?? extra;
    const isTime = c.role === 'time' && span !== null;
    return [
      c.header,
      roleText(c),
      unitRead(c),
      c.siUnit ?? '—',
      isTime ? formatNumber(span.start) : fmt(stats?.min),
      isTime ? formatNumber(span.end) : fmt(stats?.max),
      isTime ? '' : fmt(stats?.mean),
    ];
  });
  for (const derived of d.derived) {
    const summary = d.channels[derived.role as keyof typeof d.channels];
    rows.push([
      `(${cliRole(derived.role)} from ${derived.from})`, cliRole(derived.role), 'derived', summary?.unit ?? '—',
      fmt(summary?.min), fmt(summary?.max), fmt(summary?.mean),
    ]);
  }
  out.push(
    formatTable(['column', 'role', 'unit read', 'SI unit', 'min', 'max', 'mean'], rows, ['left', 'left', 'left', 'left', 'right', 'right', 'right'])
      .split('\n')
      .map((l) => `  ${l}`)
      .join('\n'),
  );
  for (const derived of d.derived) {
    if (derived.quantisationStep !== undefined && derived.speedNoiseSigma !== undefined) {
      out.push(
        `  ${derived.role} derived from ${derived.from}: ${derived.method}; quantisation step ${formatNumber(derived.quantisationStep)}, ` +
          `implied speed noise σ ≈ ${formatNumber(derived.speedNoiseSigma)} rad/s`,
      );
    } else {
      out.push(`  ${cliRole(derived.role)} derived from ${derived.from}: ${derived.description}`);
    }
  }
  if (d.issues.length > 0) {
    out.push('  notes:');
    for (const issue of d.issues) {
      const where = [issue.line !== undefined ? `line ${issue.line}` : '', issue.column !== undefined ? `column "${issue.column}"` : '']
        .filter(Boolean)
        .join(', ');
      const tag = issue.severity === 'warning' ? paint.warn('warning') : paint.dim('info');
      out.push(`    ${tag} ${issue.code}${where ? ` (${where})` : ''}: ${issue.message}${withFlags(issue.fix)}`);
    }
  }
  return out.join('\n');
}

async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('inspect', args, {
    json: { type: 'boolean' },
    ...INGEST_OPTIONS,
  });
  if (positionals.length === 0) throw new UsageError('give at least one CSV file to inspect', 'inspect');
  const options = ingestOptionsFrom('inspect', values);
  const paint = paintFor(io);
  const results: (InspectedFile | FileFailure)[] = [];
  let failed = 0;
  for (const file of positionals) {
    try {
      await checkInputFiles(io.cwd, [file]);
      const result = await readInput(io.cwd, file, options);
      results.push({ ...describeRecording(result), kind: experimentKindOf(result.recording) });
    } catch (err) {
      failed++;
      results.push(failureOf(file, err));
    }
  }
  if (values.json) {
    io.stdout(`${JSON.stringify({ schema: 'motorprint.inspect-list/1', files: results }, null, 2)}\n`);
  } else {
    const blocks = results.filter((r): r is InspectedFile => !('error' in r)).map((d) => formatDescription(d, paint));
    if (blocks.length > 0) io.stdout(`${blocks.join('\n\n')}\n`);
  }
  for (const r of results) {
    if ('error' in r) io.stderr(`${paint.error('error:')} ${failureText(r)}\n`);
  }
  return failed > 0 ? EXIT.dataProblem : EXIT.ok;
}

function failureText(f: FileFailure): string {
  if (f.error.code === 'file-not-usable') return f.error.message;
  const where = [f.file, f.error.line !== undefined ? `line ${f.error.line}` : '', f.error.column !== undefined ? `column "${f.error.column}"` : '']
    .filter(Boolean)
    .join(', ');
  return `${where}: ${f.error.message.startsWith(f.file) ? f.error.message.slice(f.file.length).replace(/^[:,]\s*/, '') : f.error.message} [${f.error.code}]`;
}

/** `motorprint inspect`: shows what ingest understood of each file. */
export const inspectCommand: Subcommand = {
  name: 'inspect',
  summary: 'show what was read from bench recordings (columns, units, dropped rows, sampling, kind)',
  help: HELP,
  run,
};
