import { readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import { formatInterval, formatParameterSetCsv, formatParameterSetMarkdown, readParameterSet, tuningRows, type ParameterSet } from '@motorprint/report';
import { numberOption, parseSubcommandArgs } from '../args.js';
import { fileErrorText } from '../inputFiles.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber, formatTable } from '../table.js';
import { EXIT, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const HELP = `motorprint show PARAMS.json [--format text|md|csv|json]
                        [--export state-space|transfer|discrete [--dt T]]

Prints a parameter set written by "motorprint fit --out PARAMS.json" (or --json): the constants with
their intervals, R at the reference temperature, the datasheet figures, the findings and where the
numbers came from. The file is checked against the published schema first (docs/parameter-set.schema.json).

Options:
  --format F   text (default, for a terminal), md (Markdown), csv (one row per constant and figure),
               json (the validated document, re-printed)
  --export F   instead of the set, print the lumped model R, L, Kt, Ke, J, b as JSON for simulation
               and controller design: state-space (continuous A, B, C, D; state [current, speed],
               inputs [voltage, load torque]), transfer (voltage → current and voltage → speed,
               coefficients highest power of s first), discrete (the exact zero-order-hold model,
               needs --dt)
  --dt T       sample time [s] of the discrete model (with --export discrete; optional with the others)

Exit codes: 0 printed; 1 the file not found or unreadable, not a valid parameter set (the message
names the path in the document), or lacking a constant the export needs; 2 command-line mistake.`;

function interval(ci: [number, number] | null): string {
  return formatInterval(ci, { digits: 5, format: formatNumber, missing: '—' });
}

/** Terminal view of a parameter set. */
export function formatParameterSetText(set: ParameterSet, paint: Paint): string {
  const out: string[] = [];
  const id = Object.entries(set.identification).map(([k, v]) => `${k}: ${v}`).join(', ');
  out.push(paint.bold(`Parameter set${id ? ` — ${id}` : ''}`));
  out.push(`${set.variant.description}; fit ${set.fit.converged ? 'converged' : 'NOT converged'} (${set.fit.stopReason})`);
  out.push('');
  const rows = Object.entries(set.parameters).filter((e): e is [string, NonNullable<(typeof e)[1]>] => e[1] !== undefined).map(([name, p]) => [
    name,
    p.value === null ? '—' : formatNumber(p.value, 5),
    p.unit,
    interval(p.ci95),
    p.fixed ? 'pinned' : p.identifiable ? 'yes' : 'no',
    p.note,
  ]);
  out.push(formatTable(['constant', 'value', 'unit', '95 % interval', 'identified', 'note'], rows, ['left', 'right', 'left', 'left', 'left', 'left']));
  const r = set.resistanceAtReference;
  out.push('');
  out.push(r.value === null ? `R at ${r.referenceTemperature} °C: ${r.note}` : `R at ${r.referenceTemperature} °C: ${formatNumber(r.value, 5)} Ω, 95 % ${interval(r.ci95)} (${r.note})`);
  out.push('');
  out.push(paint.bold(`Datasheet figures at ${set.ratedVoltage.value === null ? '—' : formatNumber(set.ratedVoltage.value, 4)} V (${set.ratedVoltage.source})`));
  const figures = Object.values(set.derived).map((f) => [f.label, f.value === null ? '—' : formatNumber(f.value, 5), f.unit, interval(f.ci95), f.formula]);
  out.push(formatTable(['figure', 'value', 'unit', '95 % interval', 'formula'], figures, ['left', 'right', 'left', 'left', 'left']));
  out.push('');
  if (set.tuning !== undefined) {
    const t = tuningRows(set.tuning);
    out.push(paint.bold('Loop tuning'), `  ${t.settings}`);
    out.push(formatTable(['gain', 'value', 'unit', '95 % interval', 'formula'], t.rows.map((g) => [g.label, g.value === null ? '—' : formatNumber(g.value, 5), g.unit, interval(g.ci95), g.formula]), ['left', 'right', 'left', 'left', 'left']));
    for (const a of set.tuning.assumptions) out.push(`  assumed: ${a}`);
    for (const w of set.tuning.warnings) out.push(`  ${paint.bold('warning')}: ${w}`);
    out.push('');
  }
  if (set.notInformed.length > 0) {
    out.push(paint.bold('Not informed'));
    for (const u of set.notInformed) out.push(`  ${u.name}: ${u.reason} — ${u.wouldInform}`);
    out.push('');
  }
  out.push(paint.bold(`Findings (${set.findings.length})`));
  for (const f of set.findings) out.push(`  ${f.severity} ${f.code}: ${f.title}\n    advice: ${f.advice}`);
  out.push('');
  out.push(`From ${set.provenance.inputs.map((i) => `${i.file} (sha256 ${i.sha256.slice(0, 12)}…)`).join(', ')}`);
  out.push(`by ${set.provenance.tool.name} ${set.provenance.tool.version} on ${set.provenance.date}`);
  return out.join('\n');
}

async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('show', args, { format: { type: 'string' }, export: { type: 'string' }, dt: { type: 'string' } });
  if (positionals.length !== 1) throw new UsageError(`expected one parameter-set file (got ${positionals.length})`, 'show');
  const format = values.format ?? 'text';
  if (!['text', 'md', 'csv', 'json'].includes(format)) throw new UsageError(`--format must be text, md, csv or json (got "${format}")`, 'show');
  const exportForm = values.export;
  if (exportForm !== undefined && !['state-space', 'transfer', 'discrete'].includes(exportForm)) {
    throw new UsageError(`--export must be state-space, transfer or discrete (got "${exportForm}")`, 'show');
  }
  if (exportForm !== undefined && values.format !== undefined) throw new UsageError('--export prints JSON of its own; leave out --format', 'show');
  const dt = numberOption('show', 'dt', values.dt, (x) => x > 0, 'a sample time > 0 [s]');
  if (dt !== undefined && exportForm === undefined) throw new UsageError('--dt goes with --export', 'show');
  if (exportForm === 'discrete' && dt === undefined) throw new UsageError('--export discrete needs --dt T (the sample time [s])', 'show');
  const file = positionals[0] as string;
  let text: string;
  try {
    text = await readFile(resolve(io.cwd, file), 'utf8');
  } catch (err) {
    throw new Error(fileErrorText(file, err));
  }
  let set: ParameterSet;
  try {
    set = readParameterSet(text);
  } catch (err) {
    const e = err as Error & { path?: string };
    // The reader's words without its function name; the path is said once.
    const why = e.message.replace(/^readParameterSet: /, '').replace(/^\(document\)/, 'the document').replace(/\(got undefined\)/, '(missing)');
    throw new Error(`${file}: not a motorprint parameter set: ${why}`);
  }
  if (exportForm !== undefined) {
    const c: Record<string, number> = {};
    for (const k of ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const) {
      const v = set.parameters[k]?.value;
      if (typeof v !== 'number' || !(v > 0 || (k === 'b' && v === 0))) throw new Error(`${file}: cannot export the model: ${k} has no usable value (${v === null || v === undefined ? 'none' : v})`);
      c[k] = v;
    }
    const { linearModelForms } = await import('@motorprint/model');
    const forms = linearModelForms(c as unknown as Parameters<typeof linearModelForms>[0], dt);
    const out: Record<string, unknown> = {
      model: 'lumped DC motor: V = R·i + L·di/dt + Ke·ω, J·dω/dt = Kt·i − b·ω − τ_load (SI)',
      source: file, constants: c, signals: forms.signals,
    };
    if (exportForm === 'state-space') out.stateSpace = forms.stateSpace;
    if (exportForm === 'transfer') out.transfer = { ...forms.transfer, variable: 's [1/s]', order: 'coefficients highest power first; denominators monic' };
    if (exportForm === 'discrete') out.discrete = forms.discrete;
    else if (forms.discrete !== undefined) out.discrete = forms.discrete;
    io.stdout(`${JSON.stringify(out, null, 2)}\n`);
    return EXIT.ok;
  }
  if (format === 'md') io.stdout(formatParameterSetMarkdown(set));
  else if (format === 'csv') io.stdout(formatParameterSetCsv(set));
  else if (format === 'json') io.stdout(`${JSON.stringify(set, null, 2)}\n`);
  else io.stdout(`${formatParameterSetText(set, paintFor(io))}\n`);
  return EXIT.ok;
}

/** `motorprint show`: prints a parameter set. */
export const showCommand: Subcommand = {
  name: 'show',
  summary: 'print a parameter set written by "fit --out" (text, Markdown, CSV or JSON)',
  help: HELP,
  run,
};
