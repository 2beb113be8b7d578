import { basename } from 'node:path';
import { mkdir, writeFile } from 'node:fs/promises';
import { dirname, extname, resolve } from 'node:path';
import { diagnoseFit, type FitDiagnosis } from '@motorprint/diagnose';
import {
  buildParameterSet, formatParameterSetCsv, formatParameterSetMarkdown, renderHtmlReport,
  type BuildParameterSetOptions, type JsonValue, type ParameterSet,
} from '@motorprint/report';
import { fitMotor, type FitMotorOptions, type MotorConstantName, type MotorExperimentKind, type MotorFit } from '@motorprint/estimate';
import type { IngestResult } from '@motorprint/ingest';
import { keyValuePairs, numberOption, parseSubcommandArgs } from '../args.js';
import { inputVoltage } from '../inputVoltage.js';
import { INGEST_OPTION_HELP, INGEST_OPTIONS, ingestOptionsFrom, readInput } from '../readInputs.js';
import { createProgress, type Progress } from '../progress.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber, formatTable } from '../table.js';
import { EXIT, TOOL_VERSION, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const KINDS: readonly MotorExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];
const CONSTANTS: readonly MotorConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];

const HELP = `motorprint fit FILE... [--kind FILE=KIND] [--fix P=V] [--guess P=V] [--json] [ingest options]

Fits the lumped DC-motor model to one or more bench recordings at once and prints one consistent
parameter set: R [Ω], L [H], Kt [N·m/A], Ke [V·s/rad], J [kg·m²], b [N·m·s/rad] and, where a
coast-down or steady-state sweep informs it, Coulomb friction Tc [N·m]. Each constant comes with its
standard error and 95 % interval; a constant the recordings cannot inform is named, with the
recording that would inform it, instead of being printed as a number.

Which recording informs what:
  locked-rotor   R, L                     step            K (= Kt = Ke), J, b (R, L if sampled fast)
  coast-down     b/J and Tc               steady-state    Ke, b, Tc (and R)
  prbs/multisine all                      loaded          Kt apart from Ke (needs a torque column)

Options:
  --kind FILE=KIND   declare the experiment of FILE (as typed, or its base name); KIND is one of
                     ${KINDS.join(', ')}; otherwise it is guessed and the reason shown
  --fix P=V          pin constant P to V [SI] (e.g. --fix R=1.23); repeat as needed
  --guess P=V        start constant P at V [SI] instead of the automatic guess
  --check FILE       after fitting, predict FILE (a held-out recording) with the fitted constants
                     and print NRMSE per channel; repeat as needed
  --coulomb M        Coulomb friction in the model: auto (default: added when a coast-down or
                     steady-state run is given, or when the findings call for it and the model
                     comparison supports it — the output then says so), yes, or no
  --measured-voltage feed the raw measured voltage to the model (no rebuild of the command; biased
                     when the voltage is noisy — for comparison only)
  --json             print the parameter set (one JSON document) on stdout
  --out FILE         write the parameter set to FILE (JSON; Markdown or CSV with --format or a
                     .md / .csv name); "motorprint simulate" and "motorprint show" read the JSON
  --format F         json | md | csv for --out
  --report FILE.html write a self-contained HTML report (traces, residuals, findings, cautions)
  --rated-voltage V  voltage for the datasheet figures (default: the largest step voltage seen)
  --winding-temp C   winding temperature during the runs, to carry R to the reference temperature
                     (default: the mean of a temperature column, if logged)
  --reference-temp C reference temperature for R (default 25 °C)
  --copper-k K       copper law constant: 234.5 (IEEE Std 113 form, default) or 235 (IEC 60034-1 form)
  --id KEY=VALUE     identification for the report, e.g. --id motor="Tern 24" --id serial=A113
${INGEST_OPTION_HELP}

Exit codes: 0 converged fit, 1 data problem or a fit that did not converge (its numbers are not
trustworthy and are marked so), 2 command-line mistake.`;

const UNIT: Record<string, string> = { R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m' };

function constantPairs(name: string, raw: string[] | undefined): Partial<Record<MotorConstantName, number>> {
  const out: Partial<Record<MotorConstantName, number>> = {};
  for (const [key, value] of keyValuePairs('fit', name, raw)) {
    if (!(CONSTANTS as readonly string[]).includes(key)) {
      throw new UsageError(`--${name}: unknown constant "${key}"; constants are ${CONSTANTS.join(', ')}`, 'fit');
    }
    const x = Number(value);
    if (!Number.isFinite(x) || value === '') throw new UsageError(`--${name} ${key}= must be a number in ${UNIT[key]} (got "${value}")`, 'fit');
    out[key as MotorConstantName] = x;
  }
  return out;
}

/** Which friction model the command reported, when it chose between two (see `--coulomb auto`). */
export interface ModelSelection {
  chosen: string;
  over: string;
  comparison: FitDiagnosis['comparisons'][number] | NonNullable<FitDiagnosis['coulombRefit']>['comparison'];
  triggeredBy: string[];
}

/** What `fit --json` prints and `--out` writes: the parameter set, plus held-out checks and the model comparison. */
export function fitDocument(set: ParameterSet, diagnosis: FitDiagnosis, validation: ValidationResult[], selection: ModelSelection | null = null): Record<string, unknown> {
  const doc: Record<string, unknown> = { ...set };
  if (diagnosis.coulombRefit) {
    const { comparison, supported, converged, triggeredBy } = diagnosis.coulombRefit;
    doc.modelComparison = { supported, converged, triggeredBy, comparison, reported: selection ? selection.chosen : 'as fitted' };
  }
  if (validation.length > 0) doc.checks = validation;
  return doc;
}

/** NRMSE of the fitted model on a held-out recording (see `--check`). */
export interface ValidationResult {
  file: string;
  kind: string;
  channels: { channel: string; rms: number; nrmse: number; samples: number }[];
  converged: boolean;
}

/** Prints an interval with enough digits that its ends differ (at least 3 significant). */
function formatInterval([low, high]: [number, number], value: number): string {
  const width = Math.abs(high - low);
  const digits = width > 0 && value !== 0 ? Math.min(10, Math.max(3, Math.ceil(Math.log10(Math.abs(value) / width)) + 2)) : 3;
  return `${formatNumber(low, digits)} … ${formatNumber(high, digits)}`;
}

function formatEvidence(evidence: Record<string, number | string>): string {
  return Object.entries(evidence)
    .map(([k, v]) => `${k} ${typeof v === 'number' ? formatNumber(v, 4) : v}`)
    .join('; ');
}

function formatFit(fit: MotorFit, diagnosis: FitDiagnosis, validation: ValidationResult[], paint: Paint, voltageNotes: Map<string, string>): string {
  const out: string[] = [];
  const entries = Object.entries(diagnosis.parameters);
  const rows = entries
    .filter(([, d]) => d.value !== null && d.identifiable)
    .map(([name, d]) => [
      name,
      formatNumber(d.value as number, 5),
      d.unit,
      d.fixed ? 'pinned' : d.standardError !== null ? formatNumber(d.standardError, 2) : '—',
      d.ci95 ? formatInterval(d.ci95, d.value as number) : '—',
      d.fixed ? '' : (fit.parameters[name]?.informedBy ?? []).map((f) => basename(f)).join(', '),
    ]);
  out.push(paint.bold(fit.converged ? 'Fitted constants' : 'Constants where the fit STOPPED (not converged — do not use)'));
  out.push(formatTable(['constant', 'value', 'unit', 'std. error', '95 % interval', 'informed by'], rows, ['left', 'right', 'left', 'right', 'left', 'left']));
  const unidentified = entries.filter(([, d]) => !d.identifiable);
  if (unidentified.length > 0) {
    out.push('');
    out.push(paint.bold('Not identifiable from these recordings'));
    for (const [name, d] of unidentified) {
      out.push(`  ${name}: ${d.reason ?? 'no recording informs it'}${d.wouldInform ? ` — ${d.wouldInform}` : ''}`);
    }
  }
  out.push('');
  out.push(paint.bold('Recordings'));
  for (const r of fit.recordings) {
    out.push(`  ${r.name}: ${r.kind} (${r.kindSource === 'declared' ? 'declared' : `guessed: ${r.kindReason}`}), ${r.samples} samples`);
    const voltageNote = voltageNotes.get(r.name);
    if (voltageNote) out.push(`    voltage: ${paint.warn(voltageNote)}`);
    out.push(`    input: ${r.input.method} — ${r.input.reason}`);
    for (const c of r.channels) {
      const stats = diagnosis.residuals.find((x) => x.recording === r.name && x.channel === c.channel)?.stats;
      const white = stats
        ? `, Ljung–Box p ${formatNumber(stats.ljungBox.pValue, 2)}${stats.ljungBox.pValue < 0.01 ? paint.warn(' (residuals not white)') : ''}`
        : '';
      out.push(`    ${c.channel.padEnd(7)} σ ${formatNumber(c.sigma, 3)} (${c.sigmaMethod}), residual RMS ${formatNumber(c.rms, 3)}, NRMSE ${formatNumber(c.nrmse, 3)}${white}`);
    }
  }
  out.push('');
  if (diagnosis.findings.length === 0) {
    out.push(paint.bold('Findings: none') + ' — nothing in these recordings calls for more than the lumped linear model.');
  } else {
    out.push(paint.bold(`Findings (${diagnosis.findings.length})`));
    for (const f of diagnosis.findings) {
      const tag = f.severity === 'problem' ? paint.error(f.severity) : f.severity === 'warning' ? paint.warn(f.severity) : paint.dim(f.severity);
      out.push(`  ${tag} ${f.code}${f.recording ? ` (${f.recording})` : ''}: ${f.title}`);
      out.push(`    evidence: ${formatEvidence(f.evidence)}`);
      out.push(`    advice: ${f.advice}`);
    }
  }
  const refit = diagnosis.coulombRefit;
  if (refit) {
    const c = refit.comparison;
    out.push(
      `  model comparison (${c.question}): F p ${formatNumber(c.fPValue, 2)}, AIC ${formatNumber(c.aic[0], 6)} → ${formatNumber(c.aic[1], 6)}, ` +
        `BIC ${formatNumber(c.bic[0], 6)} → ${formatNumber(c.bic[1], 6)}; the data support: ${paint.bold(refit.supported)}` +
        `${refit.converged ? '' : ' (the re-fit did not converge; treat with care)'}`,
    );
  }
  if (validation.length > 0) {
    out.push('');
    out.push(paint.bold('Check on held-out recordings (fitted constants pinned)'));
    for (const v of validation) {
      out.push(`  ${v.file} (${v.kind}): ${v.channels.map((c) => `${c.channel} NRMSE ${formatNumber(c.nrmse, 3)} (RMS ${formatNumber(c.rms, 3)})`).join(', ')}`);
    }
  }
  out.push('');
  out.push(`${fit.variant.description}`);
  const status = fit.converged ? paint.good('converged') : paint.error('NOT converged');
  out.push(
    `solver: ${status} (${fit.stopReason}) after ${fit.iterations} steps, ${fit.jacobianEvaluations} Jacobian evaluations; ` +
      `residual variance ${formatNumber(fit.residualVariance, 3)} (≈ 1 when noise levels and model agree)` +
      `${diagnosis.conditionNumber !== null ? `; condition number ${formatNumber(diagnosis.conditionNumber, 2)}` : ''}`,
  );
  return out.join('\n');
}

/** Shares of the whole job at the start of each stage, for the progress line (from timings at 1e5–1e6 samples). */
const STAGE = { read: 0, fit: 0.15, check: 0.55, refit: 0.85, heldOut: 0.9, write: 0.95 } as const;

async function run(args: string[], io: CliIo): Promise<number> {
  const progress = createProgress(io, 'motorprint fit');
  try {
    return await fitJob(args, progress.io, progress);
  } finally {
    progress.done();
  }
}

async function fitJob(args: string[], io: CliIo, progress: Progress): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('fit', args, {
    kind: { type: 'string', multiple: true },
    fix: { type: 'string', multiple: true },
    guess: { type: 'string', multiple: true },
    'measured-voltage': { type: 'boolean' },
    check: { type: 'string', multiple: true },
    coulomb: { type: 'string' },
    json: { type: 'boolean' },
    out: { type: 'string' },
    format: { type: 'string' },
    report: { type: 'string' },
    'rated-voltage': { type: 'string' },
    'winding-temp': { type: 'string' },
    'reference-temp': { type: 'string' },
    'copper-k': { type: 'string' },
    id: { type: 'string', multiple: true },
    ...INGEST_OPTIONS,
  });
  if (positionals.length === 0) throw new UsageError('give at least one recording (CSV) to fit', 'fit');
  const kinds = new Map<string, MotorExperimentKind>();
  for (const [file, kind] of keyValuePairs('fit', 'kind', values.kind)) {
    if (!(KINDS as readonly string[]).includes(kind)) {
      throw new UsageError(`--kind ${file}=${kind}: KIND must be one of ${KINDS.join(', ')}`, 'fit');
    }
    const match = positionals.filter((p) => p === file || basename(p) === file);
    if (match.length === 0) throw new UsageError(`--kind names "${file}", which is not among the files to fit`, 'fit');
    for (const m of match) kinds.set(m, kind as MotorExperimentKind);
  }
  const options: FitMotorOptions = {};
  const fix = constantPairs('fix', values.fix);
  const guess = constantPairs('guess', values.guess);
  if (Object.keys(fix).length > 0) options.fix = fix;
  if (Object.keys(guess).length > 0) options.initial = guess;
  if (values['measured-voltage']) options.voltage = 'measured';
  const coulombChoice = values.coulomb ?? 'auto';
  if (!['auto', 'yes', 'no'].includes(coulombChoice)) throw new UsageError(`--coulomb must be auto, yes or no (got "${coulombChoice}")`, 'fit');
  if (coulombChoice !== 'auto') options.coulomb = coulombChoice === 'yes';
  const ingestOptions = ingestOptionsFrom('fit', values);
  const ratedVoltage = numberOption('fit', 'rated-voltage', values['rated-voltage'], (x) => x > 0, 'a voltage > 0');
  const windingTemp = numberOption('fit', 'winding-temp', values['winding-temp'], (x) => x > -273.15, 'a temperature in °C');
  const referenceTemp = numberOption('fit', 'reference-temp', values['reference-temp'], (x) => x > -273.15, 'a temperature in °C');
  const copperK = numberOption('fit', 'copper-k', values['copper-k'], (x) => x === 234.5 || x === 235, '234.5 (IEEE Std 113 form) or 235 (IEC 60034-1 form)') as 234.5 | 235 | undefined;
  const outFormat = values.format ?? (values.out !== undefined ? ({ '.md': 'md', '.csv': 'csv' } as Record<string, string>)[extname(values.out).toLowerCase()] ?? 'json' : 'json');
  if (!['json', 'md', 'csv'].includes(outFormat)) throw new UsageError(`--format must be json, md or csv (got "${outFormat}")`, 'fit');
  if (values.format !== undefined && values.out === undefined) throw new UsageError('--format applies to --out FILE; give --out as well', 'fit');
  const paint = paintFor(io);

  const inputs: { file: string; result: IngestResult }[] = [];
  for (const [i, file] of positionals.entries()) {
    progress.update(`reading ${basename(file)}`, STAGE.read + ((STAGE.fit - STAGE.read) * i) / positionals.length);
    const result = await readInput(io.cwd, file, ingestOptions);
    refuseTable(file, result);
    const meta = result.recording.meta;
    const dropped = meta.rowsDroppedCount;
    io.stderr(`read ${file}: ${result.recording.time.length} rows${dropped > 0 ? paint.warn(`, ${dropped} dropped (run "motorprint inspect ${file}" for the list)`) : ''}\n`);
    inputs.push({ file, result });
  }
  io.stderr(`fitting ${inputs.length} recording(s)…\n`);
  const voltageNotes = new Map<string, string>();
  progress.update(`fitting ${inputs.length} recording${inputs.length === 1 ? '' : 's'}`, STAGE.fit);
  const fitInputs = inputs.map(({ file, result }) => {
    const kind = kinds.get(file);
    const input = inputVoltage(result.recording);
    if (input.note) {
      voltageNotes.set(file, input.note);
      io.stderr(`${file}: ${input.note}\n`);
    }
    return kind === undefined ? { recording: input.recording, name: file } : { recording: input.recording, name: file, kind };
  });
  let fit = fitMotor(fitInputs, options);
  if (!fit.converged) {
    // Diagnose only a converged fit; say where it stopped.
    if (values.json) io.stdout(`${JSON.stringify({ schema: 'motorprint.fit/1', converged: false, stopReason: fit.stopReason, iterations: fit.iterations }, null, 2)}\n`);
    io.stderr(`${paint.error('error:')} the fit did not converge (${fit.stopReason}) after ${fit.iterations} steps; no constants are reported. ` +
      'Check the declared kinds (--kind), pin a constant you know (--fix), or give a starting value (--guess).\n');
    return EXIT.dataProblem;
  }
  io.stderr('checking the fit (intervals, residuals, findings)…\n');
  progress.update('checking the fit', STAGE.check);
  let diagnosis = diagnoseFit(fit, fitInputs, { fitOptions: options, refitCoulomb: coulombChoice === 'auto' });
  let selection: ModelSelection | null = null;
  const refit = diagnosis.coulombRefit;
  if (coulombChoice === 'auto' && refit !== null && refit.converged && refit.supported === 'viscous + Coulomb') {
    // The data support the model with Coulomb friction: report that model's constants (the
    // diagnosis already fitted it), and say so.
    io.stderr('the data support Coulomb friction; reporting that model…\n');
    progress.update('checking the Coulomb-friction fit', STAGE.refit);
    selection = { chosen: 'viscous + Coulomb friction', over: 'viscous friction only', comparison: refit.comparison, triggeredBy: refit.triggeredBy };
    fit = refit.fit;
    diagnosis = { ...diagnoseFit(fit, fitInputs, { fitOptions: { ...options, coulomb: true }, refitCoulomb: false }), coulombRefit: refit };
  }
  const validation: ValidationResult[] = [];
  for (const [i, file] of (values.check ?? []).entries()) {
    progress.update(`checking on ${basename(file)}`, STAGE.heldOut + ((STAGE.write - STAGE.heldOut) * i) / (values.check ?? []).length);
    const held = await readInput(io.cwd, file, ingestOptions);
    refuseTable(file, held);
    validation.push(checkOnRecording(fit, file, { ...held, recording: inputVoltage(held.recording).recording }));
  }
  const setOptions: BuildParameterSetOptions = {
    recordings: inputs.map((x) => x.result.recording),
    diagnosis,
    identification: Object.fromEntries(keyValuePairs('fit', 'id', values.id)),
    provenance: {
      tool: { name: 'motorprint', version: TOOL_VERSION },
      date: new Date().toISOString(),
      inputs: inputs.map(({ file, result }) => ({ file, sha256: result.recording.meta.source.sha256 })),
      options: resolvedOptions(values, positionals),
    },
  };
  if (ratedVoltage !== undefined) setOptions.ratedVoltage = ratedVoltage;
  if (windingTemp !== undefined) setOptions.windingTemperature = windingTemp;
  if (referenceTemp !== undefined) setOptions.referenceTemperature = referenceTemp;
  if (copperK !== undefined) setOptions.copperConstant = copperK;
  progress.update('writing the parameter set', STAGE.write);
  const set = buildParameterSet(fit, setOptions);
  const doc = fitDocument(set, diagnosis, validation, selection);
  if (voltageNotes.size > 0) doc.voltageInputs = [...voltageNotes].map(([file, note]) => ({ file, note }));
  if (values.json) io.stdout(`${JSON.stringify(doc, null, 2)}\n`);
  else io.stdout(`${formatSelection(selection, paint)}${formatFit(fit, diagnosis, validation, paint, voltageNotes)}\n${formatResistanceAtReference(set)}`);
  if (values.out !== undefined) {
    const text = outFormat === 'md' ? formatParameterSetMarkdown(set) : outFormat === 'csv' ? formatParameterSetCsv(set) : `${JSON.stringify(doc, null, 2)}\n`;
    await writeOut(io, values.out, text);
    io.stderr(`wrote the parameter set (${outFormat}) to ${values.out}\n`);
  }
  if (values.report !== undefined) {
    io.stderr('writing the report…\n');
    progress.update('writing the report', STAGE.write);
    const html = renderHtmlReport({ parameterSet: set, fit, recordings: inputs.map((x) => x.result.recording), diagnosis, title: reportTitle(set) });
    await writeOut(io, values.report, html);
    io.stderr(`wrote the report to ${values.report}\n`);
  }
  return EXIT.ok;
}

/**
 * A table of operating points (no time column) is read by ingest but not fitted here yet: say so
 * plainly instead of letting the estimator refuse a time base that is only a row order.
 */
function refuseTable(file: string, result: IngestResult): void {
  if (result.recording.layout !== 'table') return;
  throw Object.assign(
    new Error(`${file} is a table of operating points (one row per point, no time column); fit does not take such tables yet. "motorprint inspect ${file}" shows what was read.`),
    { code: 'table-not-fitted' },
  );
}

/** Every option as typed, for the provenance record. */
function resolvedOptions(values: Record<string, unknown>, files: string[]): { [key: string]: JsonValue } {
  const out: { [key: string]: JsonValue } = { files };
  for (const [key, value] of Object.entries(values)) {
    if (value === undefined) continue;
    out[key] = Array.isArray(value) ? value.map(String) : (value as string | boolean);
  }
  return out;
}

async function writeOut(io: CliIo, file: string, text: string): Promise<void> {
  const path = resolve(io.cwd, file);
  await mkdir(dirname(path), { recursive: true });
  await writeFile(path, text);
}

function reportTitle(set: ParameterSet): string {
  const id = set.identification;
  const name = id.motor ?? id.name ?? id.serial;
  return name ? `Motor constants — ${name}` : 'Motor constants from bench recordings';
}

function formatSelection(selection: ModelSelection | null, paint: Paint): string {
  if (selection === null) return '';
  const c = selection.comparison;
  return `${paint.bold('Model:')} ${selection.chosen}, chosen over ${selection.over} because the data support it ` +
    `(F-test p ${formatNumber(c.fPValue, 2)}, AIC ${formatNumber(c.aic[0], 6)} → ${formatNumber(c.aic[1], 6)}, ` +
    `BIC ${formatNumber(c.bic[0], 6)} → ${formatNumber(c.bic[1], 6)}; prompted by ${selection.triggeredBy.join(', ')}). ` +
    'Use --coulomb no to report the viscous-only fit.\n\n';
}

function formatResistanceAtReference(set: ParameterSet): string {
  const r = set.resistanceAtReference;
  if (r.value === null) return `R is not carried to ${r.referenceTemperature} °C: ${r.note}\n`;
  return `R at ${r.referenceTemperature} °C: ${formatNumber(r.value, 5)} Ω (${r.note})\n`;
}

/**
 * Simulates the fitted model on a held-out recording: the recording is passed through the
 * estimator with every fitted constant pinned, so only its own input levels and sensor offsets are
 * estimated, and the NRMSE per channel says how well the constants predict data they were not fitted to.
 */
export function checkOnRecording(fit: MotorFit, file: string, held: IngestResult): ValidationResult {
  const fix: Partial<Record<MotorConstantName, number>> = {};
  for (const name of CONSTANTS) {
    const p = fit.parameters[name];
    if (p !== undefined) fix[name] = p.value;
  }
  const check = fitMotor([{ recording: held.recording, name: file }], { fix, coulomb: fix.Tc !== undefined });
  const rec = check.recordings[0];
  return {
    file,
    kind: rec?.kind ?? 'unknown',
    converged: check.converged,
    channels: (rec?.channels ?? []).map((c) => ({ channel: c.channel, rms: c.rms, nrmse: c.nrmse, samples: c.samples })),
  };
}

/** `motorprint fit`: fits the motor constants to recordings. */
export const fitCommand: Subcommand = {
  name: 'fit',
  summary: 'fit R, L, Kt/Ke, J, b (and Coulomb friction) to recordings, with intervals',
  help: HELP,
  run,
};
