import { randomBytes } from 'node:crypto';
import { mkdir, readdir, readFile, rename, rm, stat, writeFile } from 'node:fs/promises';
import { availableParallelism } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import {
  appendLotRun, checkLotStore, decisionRule, fitLot, judgeLot, LotError, OUTLIER_THRESHOLD, parseLotSpec, planMotorFolder, renderLotReport, RUNS_TABLE,
  type KeyJudgement, type LotJudgement, type LotSpec, type MotorPlan, type SpecLimit,
} from '@motorprint/lot';
import { formatInterval } from '@motorprint/report';
import { parseSubcommandArgs } from '../args.js';
import { CAUTIONS } from '../cautions.js';
import { inCliTerms } from '../cliTerms.js';
import { fileErrorText, outputPathProblem } from '../inputFiles.js';
import { INGEST_OPTION_HELP, INGEST_OPTION_SYNOPSIS, INGEST_OPTIONS, ingestOptionsFrom } from '../readInputs.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber as formatFinite, formatTable } from '../table.js';
import { EXIT, TOOL_VERSION, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const HELP = `motorprint lot DIR --spec SPEC.json [--db FILE.sqlite] [--jobs N] [--json] [--report FILE.html]
              ${INGEST_OPTION_SYNOPSIS.replace(' [--supply-voltage', '\n              [--supply-voltage')}

Incoming inspection of a lot: fits every motor of DIR, judges each checked constant or derived
figure against the spec with its 95 % interval, and prints the verdicts and the lot statistics.

DIR holds one folder per motor; the folder name is the motor's serial. A motor folder holds that
motor's recordings (CSV). Their kinds are guessed from the data, or declared in an optional
${RUNS_TABLE} in the folder with the header "file,kind" and one line per recording (an empty kind is
guessed; files it does not list are not fitted, and are named in the output).

SPEC.json (format: docs/lot-spec.schema.json):
  { "name": "Tern 24 incoming check", "ratedVoltage": 24,
    "limits": { "R": { "nominal": 1.9, "tolerancePercent": 5 }, "Kt": { "min": 0.0499, "max": 0.0541 } } }
  A key is a constant (R, L, Kt, Ke, J, b, Tc; SI units) or a derived-figure key (docs/derived-figures.md,
  e.g. noLoadSpeedRpm, stallTorque); "min" or "max" alone is a one-sided limit. Voltage-dependent
  figures are stated at "ratedVoltage". The spec is checked completely before any motor is fitted.

Decision rule (JCGM 106:2012 guarded acceptance at 95 %): a key passes when its whole 95 % interval
lies inside the limits, fails when the whole interval lies outside them, and is undecided when the
interval straddles a limit; the guard band is thus the expanded uncertainty U on each side. A motor
passes only when every key passes. A motor whose files cannot be read or whose fit does not converge
is an error (with the reason), and the lot goes on.

Options:
  --spec FILE        the acceptance spec (required)
  --db FILE.sqlite   add this run to a SQLite store (created when missing; earlier runs are kept):
                     tables lot_runs, motors, checked_values, inputs, key_statistics (docs/lot.md)
  --jobs N           worker threads fitting motors in parallel (default: the number of cores)
  --json             print the result as one JSON document on stdout
  --report FILE.html write a self-contained HTML lot report (verdicts, distribution plots, capability)
${INGEST_OPTION_HELP}
                        (these reader options apply to every recording of the lot)

Exit codes: 0 every motor passes, 1 a motor fails, is undecided or could not be fitted (or the
store or report could not be written), 2 command-line mistake, including a spec or DIR that cannot
be used (then nothing is fitted).`;

/** A number for the tables, or an en dash when there is none. */
function formatNumber(x: number | null | undefined, digits = 4): string {
  return x === null || x === undefined ? '–' : formatFinite(x, digits);
}


/** The cautions as list items (each "- …" item of CAUTIONS with its continuation lines). */
function cautionItems(): string[] {
  const items: string[] = [];
  for (const line of CAUTIONS.split('\n').slice(1)) {
    const t = line.trim();
    if (t.startsWith('- ')) items.push(t.slice(2));
    else if (t !== '' && items.length > 0) items[items.length - 1] += ` ${t}`;
  }
  return items;
}

function limitText(l: SpecLimit): string {
  if (l.nominal !== null && l.tolerancePercent !== null) return `${formatNumber(l.nominal, 6)} ± ${formatNumber(l.tolerancePercent, 4)} %`;
  if (l.lower !== null && l.upper !== null) return formatInterval([l.lower, l.upper], { digits: 6, format: formatFinite });
  return l.lower !== null ? `≥ ${formatNumber(l.lower, 6)}` : `≤ ${formatNumber(l.upper, 6)}`;
}

function paintVerdict(v: string, paint: Paint): string {
  if (v === 'pass') return paint.good(v);
  if (v === 'fail' || v === 'error') return paint.error(v);
  return paint.warn(v);
}

function keyCell(k: KeyJudgement | undefined): string {
  if (k === undefined || k.value === null) return '–';
  return `${formatNumber(k.value, 5)}${k.verdict === 'pass' ? '' : ` ${k.verdict}`}`;
}

function formatLot(spec: LotSpec, j: LotJudgement, paint: Paint): string {
  const out: string[] = [];
  out.push(paint.bold('Verdicts') + ' (estimate per checked key; a key that does not pass is marked)');
  const header = ['serial', 'verdict', ...spec.limits.map((l) => `${l.key} [${l.unit}]`)];
  const rows = j.motors.map((m) => [m.serial, m.verdict, ...spec.limits.map((l) => keyCell(m.keys.find((k) => k.key === l.key)))]);
  const table = formatTable(header, rows, ['left', 'left', ...spec.limits.map(() => 'right' as const)]).split('\n');
  // Colour the verdict column after padding so the columns stay aligned.
  out.push(...table.map((line, i) => {
    if (i < 2) return line;
    const m = j.motors[i - 2]!;
    return line.replace(new RegExp(`^(${m.serial.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}\\s+)${m.verdict}`), (_s, pre: string) => pre + paintVerdict(m.verdict, paint));
  }));
  const open = j.motors.filter((m) => m.verdict !== 'pass');
  if (open.length > 0) {
    out.push('');
    out.push(paint.bold('Why not passed'));
    for (const m of open) {
      if (m.verdict === 'error') { out.push(`  ${m.serial} ${paintVerdict('error', paint)}: ${inCliTerms(m.reason)}`); continue; }
      out.push(`  ${m.serial} ${paintVerdict(m.verdict, paint)}:`);
      for (const k of m.keys.filter((x) => x.verdict !== 'pass')) {
        const ci = k.ci95 === null ? '' : `estimate ${formatNumber(k.value, 6)}, 95 % interval ${formatInterval(k.ci95, { digits: 6, format: formatFinite })} ${k.unit}: `;
        out.push(`    ${k.key} ${k.verdict}: ${ci}${k.reason}`);
      }
    }
  }
  if (j.counts.undecided > 0) {
    out.push('  note: an undecided key\'s 95 % interval straddles a limit. A motor whose true value lies on the limit comes out');
    out.push('  undecided whenever its interval covers that value (about 95 % of repeats); narrow the interval with longer or');
    out.push('  repeated runs, or decide by your lab\'s rule for such motors.');
  }
  out.push('');
  out.push(paint.bold('Lot statistics') + ' (over the fitted motors that have a value)');
  out.push(formatTable(
    ['key', 'unit', 'limits', 'n', 'mean', 'SD', 'min', 'max', 'Cp', 'Cpk', 'outliers (robust z)'],
    j.statistics.map((s) => {
      const l = spec.limits.find((x) => x.key === s.key)!;
      return [s.key, s.unit, limitText(l), String(s.n), formatNumber(s.mean, 5), formatNumber(s.sd, 3), formatNumber(s.min, 5), formatNumber(s.max, 5),
        s.cp === null ? '–' : formatNumber(s.cp, 3), s.cpk === null ? '–' : formatNumber(s.cpk, 3),
        s.outliers.length === 0 ? 'none' : s.outliers.map((o) => `${o.serial} (${formatNumber(o.robustZ, 3)})`).join(', ')];
    }),
    ['left', 'left', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'right', 'left'],
  ));
  const statNotes = j.statistics.flatMap((s) => s.notes.map((n) => `${s.key}: ${n}`));
  for (const n of statNotes) out.push(`  note: ${n}`);
  // Files left out of the motor folders, grouped by reason (each is listed in --json and the report).
  const left = new Map<string, string[]>();
  for (const m of j.motors) {
    for (const x of m.outcome.ignoredFiles) left.set(x.reason, [...(left.get(x.reason) ?? []), x.file]);
  }
  const remarks = [
    ...[...left].map(([reason, files]) => `not fitted (${reason}): ${files.length} file(s)${files.length > 3 ? `, e.g. ${files.slice(0, 2).join(', ')} — all listed with --json and in the report` : `: ${files.join(', ')}`}`),
    ...j.motors.flatMap((m) => m.outcome.findings.length > 0 ? [`${m.serial}: findings of the fit — ${m.outcome.findings.join(', ')}`] : []),
  ];
  if (remarks.length > 0) {
    out.push('');
    out.push(paint.bold('Remarks'));
    for (const r of remarks) out.push(`  ${r}`);
  }
  const rule = decisionRule();
  out.push('');
  out.push(`${paint.bold('Decision rule:')} ${rule.text}`);
  out.push(`${paint.bold('Guard band:')} ${rule.guardBand}`);
  out.push(`Following ${rule.references.join('; ')}.`);
  out.push('Cp = (USL − LSL)/(6·SD), Cpk = min(USL − mean, mean − LSL)/(3·SD) with the sample SD of the lot (NIST/SEMATECH ' +
    'e-Handbook of Statistical Methods §6.1.6, ISO 22514-2; from memory) — with one lot and no subgroups these are what ISO 22514-2 ' +
    `calls Pp and Ppk. Outliers: |0.6745·(x − median)/MAD| > ${OUTLIER_THRESHOLD} (Iglewicz and Hoaglin 1993, from memory).`);
  if (spec.ratedVoltage !== null) out.push(`Derived figures are stated at ${formatNumber(spec.ratedVoltage)} V (the spec's rated voltage).`);
  out.push('');
  const c = j.counts;
  const state = j.verdict === 'pass' ? paint.good('every motor passes') : paint.error('not accepted');
  out.push(`${paint.bold('Lot:')} ${state} — ${j.motors.length} motors: ${c.pass} pass, ${c.fail} fail, ${c.undecided} undecided, ${c.error} error`);
  return out.join('\n');
}

/** Reads DIR into one plan per motor folder; UsageError when DIR is not a lot folder. */
async function planLot(io: CliIo, dir: string): Promise<{ plans: MotorPlan[]; ignored: string[] }> {
  const root = resolve(io.cwd, dir);
  let entries;
  try {
    const info = await stat(root);
    if (!info.isDirectory()) throw new UsageError(`${dir} is not a folder; DIR is a folder with one folder per motor`, 'lot');
    entries = await readdir(root, { withFileTypes: true });
  } catch (error) {
    if (error instanceof UsageError) throw error;
    throw new UsageError((error as NodeJS.ErrnoException).code === 'ENOENT' ? `folder not found: ${dir}` : `cannot read the lot folder ${dir} (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})`, 'lot');
  }
  const folders = entries.filter((e) => e.isDirectory()).map((e) => e.name).sort();
  const ignored = entries.filter((e) => !e.isDirectory()).map((e) => e.name).sort();
  if (folders.length === 0) {
    throw new UsageError(`${dir} has no motor folders (it should hold one folder per motor, named by its serial${ignored.length > 0 ? `; it holds only files: ${ignored.slice(0, 5).join(', ')}${ignored.length > 5 ? ', …' : ''}` : ''})`, 'lot');
  }
  const plans: MotorPlan[] = [];
  for (const serial of folders) {
    const folderPath = join(root, serial);
    const shown = join(dir, serial);
    let list;
    try {
      list = await readdir(folderPath, { withFileTypes: true });
    } catch (error) {
      plans.push({ serial, folder: shown, runs: [], ignored: [], problem: `${shown}: cannot read the motor folder (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})` });
      continue;
    }
    const folderEntries = list.map((e) => ({ name: e.name, isFile: e.isFile() }));
    let table: string | null = null;
    if (folderEntries.some((e) => e.name === RUNS_TABLE && e.isFile)) {
      try {
        table = await readFile(join(folderPath, RUNS_TABLE), 'utf8');
      } catch (error) {
        plans.push({ serial, folder: shown, runs: [], ignored: [], problem: `${serial}/${RUNS_TABLE}: cannot read it (${(error as NodeJS.ErrnoException).code ?? (error as Error).message})` });
        continue;
      }
    }
    const plan = planMotorFolder(serial, folderPath, folderEntries, table);
    plans.push({ ...plan, folder: shown });
  }
  return { plans, ignored };
}

async function writeAtomically(path: string, bytes: Uint8Array | string): Promise<void> {
  await mkdir(dirname(path), { recursive: true });
  const tmp = join(dirname(path), `.${basename(path)}.${randomBytes(6).toString('hex')}.tmp`);
  try {
    await writeFile(tmp, bytes);
    await rename(tmp, path);
  } catch (error) {
    await rm(tmp, { force: true });
    throw error;
  }
}

async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('lot', args, {
    spec: { type: 'string' },
    db: { type: 'string' },
    jobs: { type: 'string' },
    json: { type: 'boolean' },
    report: { type: 'string' },
    ...INGEST_OPTIONS,
  });
  if (positionals.length !== 1) throw new UsageError(`give exactly one lot folder DIR (got ${positionals.length})`, 'lot');
  const dir = positionals[0]!;
  if (values.spec === undefined) throw new UsageError('--spec SPEC.json is required: the limits to judge the motors against', 'lot');
  let jobs = availableParallelism();
  if (values.jobs !== undefined) {
    const n = Number(values.jobs);
    if (values.jobs.trim() === '' || !Number.isInteger(n) || n < 1) throw new UsageError(`--jobs must be a whole number ≥ 1 (got "${values.jobs}")`, 'lot');
    jobs = n;
  }
  const ingest = ingestOptionsFrom('lot', values);
  const paint = paintFor(io);

  // Everything that can be checked is checked before any motor is fitted.
  let specText: string;
  try {
    specText = await readFile(resolve(io.cwd, values.spec), 'utf8');
  } catch (error) {
    throw new UsageError(`${fileErrorText(values.spec, error)} (the --spec file)`, 'lot');
  }
  let spec: LotSpec;
  try {
    spec = parseLotSpec(specText, values.spec);
  } catch (error) {
    if (error instanceof LotError) throw new UsageError(error.message, 'lot');
    throw error;
  }
  let storeBytes: Uint8Array | null = null;
  if (values.db !== undefined) {
    try {
      storeBytes = await readFile(resolve(io.cwd, values.db));
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'ENOENT') {
        throw new UsageError(`${fileErrorText(values.db, error)} (the --db store)`, 'lot');
      }
    }
    try {
      await checkLotStore(storeBytes, values.db);
    } catch (error) {
      if (error instanceof LotError) throw new UsageError(error.message.replace(/use another store file$/, 'give another --db file'), 'lot');
      throw error;
    }
  }
  if (values.report !== undefined) {
    const problem = await outputPathProblem(io.cwd, values.report);
    if (problem !== null) throw new UsageError(problem, 'lot');
  }
  const { plans, ignored } = await planLot(io, dir);

  const startedAt = new Date().toISOString();
  const threads = Math.min(jobs, Math.max(1, plans.filter((p) => p.problem === null).length));
  io.stderr(`lot ${dir}: ${plans.length} motor folder(s); spec "${spec.name}" checks ${spec.limits.map((l) => l.key).join(', ')}\n`);
  if (ignored.length > 0) io.stderr(`${paint.warn('note:')} not motor folders, not read: ${ignored.join(', ')}\n`);
  io.stderr(`fitting on ${threads} worker thread(s)…\n`);
  const outcomes = await fitLot(plans, {
    jobs, ratedVoltage: spec.ratedVoltage, tool: { name: 'motorprint', version: TOOL_VERSION }, date: startedAt,
    identification: { lot: basename(resolve(io.cwd, dir)) }, ingest,
    onProgress: io.isTty ? (done, total, o) => io.stderr(`\r\u001b[K[${done}/${total}] ${o.serial} ${o.status === 'fitted' ? 'fitted' : paint.error('error')}`) : undefined,
  });
  if (io.isTty) io.stderr('\r\u001b[K');
  for (const o of outcomes) o.reason = inCliTerms(o.reason);
  const judgement = judgeLot(spec, outcomes);
  const finishedAt = new Date().toISOString();
  const rule = decisionRule();

  if (values.json) {
    const doc = {
      schema: 'motorprint.lot-result/1',
      tool: { name: 'motorprint', version: TOOL_VERSION }, startedAt, finishedAt, lotFolder: dir, jobs: threads,
      spec: { file: values.spec, ...spec }, rule,
      verdict: judgement.verdict, counts: judgement.counts,
      motors: judgement.motors.map((m) => ({
        serial: m.serial, verdict: m.verdict, reason: m.reason, keys: m.keys, model: m.outcome.model, findings: m.outcome.findings,
        ignoredFiles: m.outcome.ignoredFiles, inputs: m.outcome.inputs, workerThread: m.outcome.threadId,
      })),
      statistics: judgement.statistics,
      notMotorFolders: ignored,
    };
    io.stdout(`${JSON.stringify(doc, null, 2)}\n`);
  } else {
    io.stdout(`Lot ${dir} — spec "${spec.name}" (${values.spec})\n\n${formatLot(spec, judgement, paint)}\n`);
  }

  let writeProblem = false;
  if (values.db !== undefined) {
    try {
      const { bytes, lotRunId } = await appendLotRun(storeBytes, {
        startedAt, finishedAt, tool: { name: 'motorprint', version: TOOL_VERSION }, lotFolder: dir, jobs: threads,
        specFile: values.spec, specText, spec, rule, judgement,
      }, values.db);
      await writeAtomically(resolve(io.cwd, values.db), bytes);
      io.stderr(`added lot run ${lotRunId} to ${values.db}\n`);
    } catch (error) {
      writeProblem = true;
      io.stderr(`${paint.error('error:')} ${values.db}: the store was not written (${(error as Error).message})\n`);
    }
  }
  if (values.report !== undefined) {
    try {
      const html = renderLotReport({
        lotFolder: dir, spec, specFile: values.spec, rule, judgement, tool: { name: 'motorprint', version: TOOL_VERSION }, date: startedAt,
        cautions: cautionItems(),
      });
      await writeAtomically(resolve(io.cwd, values.report), html);
      io.stderr(`wrote the lot report to ${values.report}\n`);
    } catch (error) {
      writeProblem = true;
      io.stderr(`${paint.error('error:')} ${values.report}: the report was not written (${(error as Error).message})\n`);
    }
  }
  return judgement.verdict === 'pass' && !writeProblem ? EXIT.ok : EXIT.dataProblem;
}

/** `motorprint lot`: incoming inspection of a lot against a spec. */
export const lotCommand: Subcommand = {
  name: 'lot',
  summary: 'judge a lot of motors (one folder each) against a spec, with lot statistics and a SQLite store',
  help: HELP,
  run,
};
