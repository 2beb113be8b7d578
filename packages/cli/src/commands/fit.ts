import { basename, dirname, extname, resolve } from 'node:path';
import { mkdir, writeFile } from 'node:fs/promises';
import { identifyMotor, type Identification, type IdentifyOptions } from '@motorprint/diagnose';
import {
  buildParameterSet, formatInterval as formatIntervalText, formatParameterSetCsv, formatParameterSetMarkdown, renderHtmlReport, tuningRows,
  type BuildParameterSetOptions, type JsonValue, type LoopTuningOptions, type ParameterSet,
} from '@motorprint/report';
import { checkLockedRotorHold } from '@motorprint/estimate';
import type { HoldFinding, FitMotorOptions, ModelExtensions, MotorConstantName, MotorExperimentKind, MotorRecordingInput } from '@motorprint/estimate';
import type { IngestResult } from '@motorprint/ingest';
import { keyValuePairs, numberOption, parseSubcommandArgs } from '../args.js';
import { INGEST_OPTION_HELP, INGEST_OPTION_SYNOPSIS, INGEST_OPTIONS, ingestOptionsFrom, readInput } from '../readInputs.js';
import { documentInCliTerms } from '../cliTerms.js';
import { checkInputFiles, outputPathProblem } from '../inputFiles.js';
import { createProgress, type Progress } from '../progress.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber, formatTable } from '../table.js';
import { EXIT, TOOL_VERSION, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const KINDS: readonly MotorExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];
const CONSTANTS: readonly MotorConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rth', 'Cth'];
const EXTENSION_WORDS: Record<string, keyof ModelExtensions> = {
  coulomb: 'coulomb', stiction: 'stiction', drag: 'drag', 'voltage-limit': 'voltageLimit', 'current-limit': 'currentLimit', heating: 'heating',
};

const HELP = `motorprint fit FILE... [--kind FILE=KIND] [--fix P=V] [--guess P=V] [--check FILE]
               [--model auto|lumped|EXT,EXT…] [--coulomb auto|yes|no] [--measured-voltage]
               [--json] [--out FILE] [--format json|md|csv] [--report FILE.html]
               [--rated-voltage V] [--winding-temp C] [--reference-temp C] [--copper-k K]
               [--ambient-temp C] [--id KEY=VALUE]
               [--current-bandwidth HZ] [--speed-bandwidth HZ] [--phase-margin DEG]
               [--controller-rate HZ] [--no-tuning] [--thermal Rth=V,Cth=V] [--rise K]
               ${INGEST_OPTION_SYNOPSIS.replace(' [--supply-voltage', '\n               [--supply-voltage')}

Fits one consistent set of motor constants to one or more bench recordings at once: R [Ω], L [H],
Kt [N·m/A], Ke [V·s/rad], J [kg·m²], b [N·m·s/rad], and — where the data support them — the terms of
the detailed model: Coulomb friction Tc [N·m], stiction Ts [N·m], drag c [N·m·s²/rad²] (c·ω|ω|), a
drive's voltage limit Vmax [V] and current limit Imax [A] (when the logged voltage is the drive's
command), winding heating (R at 20 °C by the copper law, Rth [K/W], Cth [J/K]). The model is chosen
from the data: each term is added only when a nested F-test and BIC support it, and a term they do
not support is reported as not distinguishable from zero, with its bound (on long recordings a score
test at the current model screens Coulomb friction, drag and heating first: a term it does not find
is not fitted, and its bound is the linearised one). Each constant comes with
its standard error and 95 % interval; a constant the recordings cannot pin down is named, with the
recording that would, instead of being printed as a number.

Which recording informs what:
  locked-rotor   R, L                      step            K (= Kt = Ke), J, b (R, L with current)
  coast-down     b/J (and Tc/J); with the  steady-state    Ke, b, Tc (and R)
                 voltage and current before
                 the cut also R, K, J, b
  prbs/multisine all                       loaded          Kt apart from Ke (needs a torque column)
  voltage and speed, no current: the speed gain and the mechanical time constant (pin R with --fix)

Options:
  --kind FILE=KIND    declare the experiment of FILE (as typed, or its base name); KIND is one of
                      ${KINDS.join(', ')}; otherwise it is guessed and the reason shown
  --fix P=V           pin constant P to V [SI] (e.g. --fix R=1.23); repeat as needed; P is one of
                      ${CONSTANTS.join(', ')}
  --guess P=V         start constant P at V [SI] instead of the automatic start
  --check FILE        after fitting, predict FILE (a held-out recording) with the fitted constants
                      and print NRMSE per channel; repeat as needed
  --model M           auto (default: the data choose), lumped (no extension), or a comma list of
                      extensions to force: coulomb, stiction, drag, voltage-limit, current-limit,
                      heating
  --coulomb M         auto, yes (same as --model coulomb) or no (same as --model lumped)
  --measured-voltage  feed the raw measured voltage to the model (no rebuild of the command; biased
                      when the voltage is noisy — for comparison only)
  --json              print the parameter set (one JSON document) on stdout
  --out FILE          write the parameter set to FILE (JSON; Markdown or CSV with --format or a
                      .md / .csv name); "motorprint simulate" and "motorprint show" read the JSON
  --format F          json | md | csv for --out
  --report FILE.html  write a self-contained HTML report (traces, residuals, findings, cautions)
  --rated-voltage V   voltage for the datasheet figures (default: the largest step voltage seen)
  --winding-temp C    winding temperature during the runs, to carry R to the reference temperature
                      (default: the mean of a temperature column, if logged)
  --reference-temp C  reference temperature for R (default 25 °C)
  --copper-k K        copper law constant: 234.5 (IEEE Std 113 form, default) or 235 (IEC 60034-1 form)
  --ambient-temp C    ambient (and starting winding) temperature of the heating model (default 25 °C)
  --id KEY=VALUE      identification for the report, e.g. --id motor="Tern 24" --id serial=A113
  --current-bandwidth HZ  current-loop bandwidth of the loop-tuning figures (default 1000 Hz): PI by
                      pole–zero cancellation, Kp = L·ωc, Ki = R·ωc
  --speed-bandwidth HZ    speed-loop bandwidth (default 100 Hz): PI on Kt/(J·s + b), current loop
                      taken as ideal, no delay
  --phase-margin DEG  speed-loop phase margin (default 60°)
  --controller-rate HZ    controller sample rate: a bandwidth above 1/10 of it is warned about
  --no-tuning         leave the loop-tuning figures out of the parameter set
  --thermal Rth=V,Cth=V   winding thermal resistance [K/W] and capacitance [J/K] for the locked-rotor
                      time budget (default: the heating model's, else no cooling and Cth 1 J/K — a
                      conservative assumption, not this motor's data)
  --rise K            allowed winding rise of the locked-rotor budget (default 20 K); a locked-rotor
                      recording that held longer is warned about and listed as a finding
${INGEST_OPTION_HELP}

Exit codes: 0 converged fit; 1 an input file not found or unreadable, a data problem (the message
names file, line and column), or a fit that did not converge (no constants are reported then);
2 command-line mistake (unknown option, bad value, --out or --report naming a folder): every option
is checked before any file is read.`;

const UNIT: Record<string, string> = {
  R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m', Ts: 'N·m', c: 'N·m·s²/rad²', Vmax: 'V', Imax: 'A', Rth: 'K/W', Cth: 'J/K',
};

function constantPairs(name: string, raw: string[] | undefined): Partial<Record<MotorConstantName, number>> {
  const out: Partial<Record<MotorConstantName, number>> = {};
  for (const [key, value] of keyValuePairs('fit', name, raw)) {
    if (!(CONSTANTS as readonly string[]).includes(key)) {
      throw new UsageError(`--${name}: unknown constant "${key}"; constants are ${CONSTANTS.join(', ')}`, 'fit');
    }
    const x = Number(value);
    const zeroOk = ['Tc', 'Ts', 'c'].includes(key) || (key === 'b' && name === 'fix');
    if (!Number.isFinite(x) || value === '' || (zeroOk ? x < 0 : !(x > 0))) {
      throw new UsageError(`--${name} ${key}= must be a number ${zeroOk ? '≥ 0' : '> 0'} in ${UNIT[key]} (got "${value}")`, 'fit');
    }
    out[key as MotorConstantName] = x;
  }
  return out;
}

/** `--model` / `--coulomb` to a forced model, or 'auto'. */
function modelChoice(model: string | undefined, coulomb: string | undefined): IdentifyOptions['model'] {
  if (model !== undefined && coulomb !== undefined) throw new UsageError('give --model or --coulomb, not both', 'fit');
  if (coulomb !== undefined) {
    if (!['auto', 'yes', 'no'].includes(coulomb)) throw new UsageError(`--coulomb must be auto, yes or no (got "${coulomb}")`, 'fit');
    return coulomb === 'auto' ? 'auto' : coulomb === 'yes' ? { coulomb: true } : {};
  }
  if (model === undefined || model === 'auto') return 'auto';
  if (model === 'lumped') return {};
  const forced: ModelExtensions = {};
  for (const word of model.split(',').map((w) => w.trim()).filter(Boolean)) {
    const e = EXTENSION_WORDS[word];
    if (e === undefined) throw new UsageError(`--model: unknown extension "${word}"; use auto, lumped, or a comma list of ${Object.keys(EXTENSION_WORDS).join(', ')}`, 'fit');
    forced[e] = true;
  }
  if (forced.stiction) forced.coulomb = true;
  return forced;
}

/** What `fit --json` prints and `--out` writes: the parameter set (with the model choice and the checks in it). */
export function fitDocument(set: ParameterSet): Record<string, unknown> {
  return { ...set };
}

/** An interval with enough digits that its ends differ (the report's writer, plain minus signs; the value is not needed). */
function formatInterval(ci: [number, number], _value?: number): string {
  return formatIntervalText(ci, { digits: 3, format: formatNumber });
}

function formatEvidence(evidence: Record<string, number | string>): string {
  return Object.entries(evidence)
    .map(([k, v]) => `${k} ${typeof v === 'number' ? formatNumber(v, 4) : v}`)
    .join('; ');
}

function formatIdentification(id: Identification, set: ParameterSet, paint: Paint): string {
  const { fit, diagnosis } = id;
  const out: string[] = [];
  out.push(`${paint.bold('Model:')} ${id.model.summary}.`);
  const tried = id.model.candidates.filter((c) => c.added !== null);
  if (tried.length > 0) {
    for (const c of tried) out.push(`  ${c.accepted ? paint.good('+') : paint.dim('·')} ${c.added}: ${c.reason}`);
  }
  out.push('');
  const entries = Object.entries(diagnosis.parameters);
  const rows = entries
    .filter(([, d]) => d.value !== null && (d.identifiable || d.fixed))
    .map(([name, d]) => [
      name,
      formatNumber(d.value as number, 5),
      d.unit,
      d.fixed ? 'pinned' : d.standardError !== null ? formatNumber(d.standardError, 2) : '—',
      d.interval95 ? formatInterval(d.interval95) : '—',
      d.fixed ? '' : (fit.parameters[name]?.informedBy ?? []).map((f) => basename(f)).join(', '),
    ]);
  out.push(paint.bold('Fitted constants'));
  out.push(formatTable(['constant', 'value', 'unit', 'std. error', '95 % interval', 'informed by'], rows, ['left', 'right', 'left', 'right', 'left', 'left']));
  const unsupported = Object.entries(set.parameters).filter(([, p]) => p !== undefined && p.value === null && p.note.startsWith('not distinguishable'));
  if (unsupported.length > 0) {
    out.push('');
    out.push(paint.bold('Not supported by the data (left out of the model)'));
    for (const [name, p] of unsupported) out.push(`  ${name}: ${p!.note}`);
  }
  const unidentified = entries.filter(([, d]) => !d.identifiable && !d.fixed);
  if (unidentified.length > 0) {
    out.push('');
    out.push(paint.bold('Not identifiable from these recordings'));
    for (const [name, d] of unidentified) out.push(`  ${name}: ${d.reason ?? 'no recording informs it'}${d.wouldInform ? ` — ${d.wouldInform}` : ''}`);
  }
  out.push('');
  out.push(paint.bold('Recordings'));
  for (const r of fit.recordings) {
    out.push(`  ${r.name}: ${r.kind} (${r.kindSource === 'declared' ? 'declared' : `guessed: ${r.kindReason}`}), ${r.samples} samples`);
    if (r.input.sourceNote) out.push(`    ${paint.warn(r.input.sourceNote)}`);
    out.push(`    input: ${r.input.method} — ${r.input.reason}`);
    for (const c of r.channels) {
      const stats = diagnosis.residuals.find((x) => x.recording === r.name && x.channel === c.channel)?.stats;
      const white = stats
        ? `, Ljung–Box p ${formatNumber(stats.ljungBox.pValue, 2)}${stats.ljungBox.pValue < 0.01 ? paint.warn(' (residuals not white)') : ''}`
        : '';
      const sigma = Number.isFinite(c.sigma) ? `σ ${formatNumber(c.sigma, 3)} (${c.sigmaMethod})` : `σ from the encoder angle (${c.sigmaMethod})`;
      out.push(`    ${c.channel.padEnd(7)} ${sigma}, residual RMS ${formatNumber(c.rms, 3)}, NRMSE ${formatNumber(c.nrmse, 3)}${white}`);
    }
  }
  out.push('');
  if (diagnosis.findings.length === 0) {
    out.push(paint.bold('Findings: none') + ' — nothing in these recordings calls for more than the chosen model.');
  } else {
    out.push(paint.bold(`Findings (${diagnosis.findings.length})`));
    for (const f of diagnosis.findings) {
      const tag = f.severity === 'problem' ? paint.error(f.severity) : f.severity === 'warning' ? paint.warn(f.severity) : paint.dim(f.severity);
      out.push(`  ${tag} ${f.code}${f.recording ? ` (${f.recording})` : ''}: ${f.title}`);
      out.push(`    evidence: ${formatEvidence(f.evidence)}`);
      out.push(`    advice: ${f.advice}`);
    }
  }
  if (id.checks.length > 0) {
    out.push('');
    out.push(paint.bold('Check on held-out recordings (fitted constants pinned)'));
    for (const v of id.checks) {
      out.push(`  ${v.name} (${v.kind}): ${v.channels.map((c) => `${c.channel} NRMSE ${formatNumber(c.nrmse, 3)} (RMS ${formatNumber(c.rms, 3)})`).join(', ')}${v.converged ? '' : paint.warn(' (its own nuisances did not converge)')}`);
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

/** Shares of the whole job at the start of each stage, for the progress line. */
const STAGE = { read: 0, fit: 0.15, write: 0.95 } as const;

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
    model: { type: 'string' },
    coulomb: { type: 'string' },
    json: { type: 'boolean' },
    out: { type: 'string' },
    format: { type: 'string' },
    report: { type: 'string' },
    'rated-voltage': { type: 'string' },
    'winding-temp': { type: 'string' },
    'reference-temp': { type: 'string' },
    'copper-k': { type: 'string' },
    'ambient-temp': { type: 'string' },
    id: { type: 'string', multiple: true },
    'current-bandwidth': { type: 'string' },
    'speed-bandwidth': { type: 'string' },
    'phase-margin': { type: 'string' },
    'controller-rate': { type: 'string' },
    'no-tuning': { type: 'boolean' },
    thermal: { type: 'string' },
    rise: { type: 'string' },
    ...INGEST_OPTIONS,
  });
  // Every option is checked before any file is read or any fit is run.
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
  const fitOptions: Omit<FitMotorOptions, 'extensions' | 'coulomb' | 'noise' | 'reweight'> = {};
  const fix = constantPairs('fix', values.fix);
  const guess = constantPairs('guess', values.guess);
  if (Object.keys(fix).length > 0) fitOptions.fix = fix;
  if (Object.keys(guess).length > 0) fitOptions.initial = guess;
  if (values['measured-voltage']) fitOptions.voltage = 'measured';
  const model = modelChoice(values.model, values.coulomb);
  const ingestOptions = ingestOptionsFrom('fit', values);
  const ratedVoltage = numberOption('fit', 'rated-voltage', values['rated-voltage'], (x) => x > 0, 'a voltage > 0');
  const windingTemp = numberOption('fit', 'winding-temp', values['winding-temp'], (x) => x > -273.15, 'a temperature in °C');
  const referenceTemp = numberOption('fit', 'reference-temp', values['reference-temp'], (x) => x > -273.15, 'a temperature in °C');
  const ambientTemp = numberOption('fit', 'ambient-temp', values['ambient-temp'], (x) => x > -273.15 && x < 1000, 'a temperature in °C');
  if (ambientTemp !== undefined) fitOptions.ambientTemperature = ambientTemp;
  const copperK = numberOption('fit', 'copper-k', values['copper-k'], (x) => x === 234.5 || x === 235, '234.5 (IEEE Std 113 form) or 235 (IEC 60034-1 form)') as 234.5 | 235 | undefined;
  const outFormat = values.format ?? (values.out !== undefined ? ({ '.md': 'md', '.csv': 'csv' } as Record<string, string>)[extname(values.out).toLowerCase()] ?? 'json' : 'json');
  if (!['json', 'md', 'csv'].includes(outFormat)) throw new UsageError(`--format must be json, md or csv (got "${outFormat}")`, 'fit');
  if (values.format !== undefined && values.out === undefined) throw new UsageError('--format applies to --out FILE; give --out as well', 'fit');
  const identification = Object.fromEntries(keyValuePairs('fit', 'id', values.id));
  const tuning: LoopTuningOptions = {};
  const setTuning = (key: keyof LoopTuningOptions, name: string, test: (x: number) => boolean, rule: string): void => {
    const v = numberOption('fit', name, (values as Record<string, string | undefined>)[name], test, rule);
    if (v !== undefined) tuning[key] = v;
  };
  setTuning('currentBandwidthHz', 'current-bandwidth', (x) => x > 0, 'a bandwidth > 0 [Hz]');
  setTuning('speedBandwidthHz', 'speed-bandwidth', (x) => x > 0, 'a bandwidth > 0 [Hz]');
  setTuning('phaseMarginDeg', 'phase-margin', (x) => x > 0 && x < 90, 'an angle between 0 and 90 [°]');
  setTuning('controllerRateHz', 'controller-rate', (x) => x > 0, 'a sample rate > 0 [Hz]');
  if (values['no-tuning'] && Object.keys(tuning).length > 0) throw new UsageError('--no-tuning leaves the tuning out; drop the bandwidth, phase-margin and controller-rate options or --no-tuning', 'fit');
  const thermal = thermalOption('fit', values.thermal);
  const rise = numberOption('fit', 'rise', values.rise, (x) => x > 0, 'a temperature rise > 0 [K]');
  for (const out of [values.out, values.report]) {
    const problem = out === undefined ? null : await outputPathProblem(io.cwd, out);
    if (problem !== null) throw new UsageError(problem, 'fit');
  }
  // Every input file is there before the first one is read.
  await checkInputFiles(io.cwd, [...positionals, ...(values.check ?? [])]);
  const paint = paintFor(io);

  const inputs: { file: string; result: IngestResult }[] = [];
  for (const [i, file] of positionals.entries()) {
    progress.update(`reading ${basename(file)}`, STAGE.read + ((STAGE.fit - STAGE.read) * i) / positionals.length);
    const result = await readInput(io.cwd, file, ingestOptions);
    const meta = result.recording.meta;
    const dropped = meta.rowsDroppedCount;
    io.stderr(`read ${file}: ${result.recording.time.length} ${result.recording.layout === 'table' ? 'operating points' : 'rows'}${dropped > 0 ? paint.warn(`, ${dropped} dropped (run "motorprint inspect ${file}" for the list)`) : ''}\n`);
    inputs.push({ file, result });
  }
  const held: MotorRecordingInput[] = [];
  for (const file of values.check ?? []) held.push({ recording: (await readInput(io.cwd, file, ingestOptions)).recording, name: file });
  io.stderr(`fitting ${inputs.length} recording(s) and choosing the model…\n`);
  progress.update(`fitting ${inputs.length} recording${inputs.length === 1 ? '' : 's'}`, STAGE.fit);
  const fitInputs: MotorRecordingInput[] = inputs.map(({ file, result }) => {
    const kind = kinds.get(file);
    return kind === undefined ? { recording: result.recording, name: file } : { recording: result.recording, name: file, kind };
  });
  const id = identifyMotor(fitInputs, {
    fit: fitOptions, model, checks: held,
    onProgress: (stage, fraction) => progress.update(stage, STAGE.fit + fraction * (STAGE.write - STAGE.fit)),
  });
  const fit = id.fit;
  if (!fit.converged) {
    if (values.json) io.stdout(`${JSON.stringify({ schema: 'motorprint.fit/1', converged: false, stopReason: fit.stopReason, iterations: fit.iterations }, null, 2)}\n`);
    io.stderr(`${paint.error('error:')} the fit did not converge (${fit.stopReason}) after ${fit.iterations} steps; no constants are reported. ` +
      'Check the declared kinds (--kind), pin a constant you know (--fix), or give a starting value (--guess).\n');
    return EXIT.dataProblem;
  }
  for (const [i, r] of fit.recordings.entries()) {
    if (!r.input.sourceNote) continue;
    const gain = inputs[i]!.result.recording.meta.driveGain;
    io.stderr(`${r.name}: ${r.input.sourceNote}${r.input.source === 'command' && gain !== 1 ? ` (the command × drive gain ${gain}, as --drive-gain asked)` : ''}\n`);
  }
  const setOptions: BuildParameterSetOptions = {
    recordings: inputs.map((x) => x.result.recording),
    diagnosis: id.diagnosis,
    identification,
    model: id.model,
    unsupported: id.unsupported,
    checks: id.checks,
    provenance: {
      tool: { name: 'motorprint', version: TOOL_VERSION },
      date: new Date().toISOString(),
      inputs: [...inputs.map(({ file, result }) => ({ file, sha256: result.recording.meta.source.sha256 })),
        ...held.map((h) => ({ file: h.name!, sha256: (h.recording as IngestResult['recording']).meta.source.sha256 }))],
      options: resolvedOptions(values, positionals),
    },
  };
  if (ratedVoltage !== undefined) setOptions.ratedVoltage = ratedVoltage;
  if (windingTemp !== undefined) setOptions.windingTemperature = windingTemp;
  if (referenceTemp !== undefined) setOptions.referenceTemperature = referenceTemp;
  if (copperK !== undefined) setOptions.copperConstant = copperK;
  if (!values['no-tuning']) setOptions.tuning = tuning;
  // Locked-rotor recordings: the hold against the time budget (a warning and a finding when over).
  const holdFindings: HoldFinding[] = [];
  const Rfit = fit.parameters.R?.value;
  fit.recordings.forEach((r, i) => {
    if (r.kind !== 'locked-rotor' || !(typeof Rfit === 'number' && Rfit > 0)) return;
    const Rth = thermal.Rth ?? fit.parameters.Rth?.value, Cth = thermal.Cth ?? fit.parameters.Cth?.value;
    const chk = checkLockedRotorHold(inputs[i]!.result.recording, {
      R: Rfit, name: r.name, ...(rise !== undefined ? { riseK: rise } : {}),
      ...(Rth !== undefined && Rth > 0 ? { Rth } : {}), ...(Cth !== undefined && Cth > 0 ? { Cth } : {}),
      ...(windingTemp !== undefined ? { resistanceTemperature: windingTemp } : {}),
    });
    if (chk.finding !== undefined) {
      holdFindings.push(chk.finding);
      io.stderr(`${paint.warn('warning:')} ${chk.finding.title} (${chk.note}). ${chk.finding.advice}\n`);
    }
  });
  if (holdFindings.length > 0) setOptions.findings = holdFindings;
  progress.update('writing the parameter set', STAGE.write);
  const set = documentInCliTerms(buildParameterSet(fit, setOptions));
  const doc = fitDocument(set);
  if (values.json) io.stdout(`${JSON.stringify(doc, null, 2)}\n`);
  else io.stdout(`${formatIdentification(id, set, paint)}\n${formatResistanceAtReference(set)}${formatTuning(set, paint)}`);
  if (values.out !== undefined) {
    const text = outFormat === 'md' ? formatParameterSetMarkdown(set) : outFormat === 'csv' ? formatParameterSetCsv(set) : `${JSON.stringify(doc, null, 2)}\n`;
    await writeOut(io, values.out, text);
    io.stderr(`wrote the parameter set (${outFormat}) to ${values.out}\n`);
  }
  if (values.report !== undefined) {
    io.stderr('writing the report…\n');
    progress.update('writing the report', STAGE.write);
    const html = renderHtmlReport({ parameterSet: set, fit, recordings: inputs.map((x) => x.result.recording), diagnosis: id.diagnosis, title: reportTitle(set) });
    await writeOut(io, values.report, html);
    io.stderr(`wrote the report to ${values.report}\n`);
  }
  return EXIT.ok;
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

/** `--thermal Rth=V,Cth=V` (either or both). */
function thermalOption(sub: string, raw: string | undefined): { Rth?: number; Cth?: number } {
  const out: { Rth?: number; Cth?: number } = {};
  if (raw === undefined) return out;
  for (const [key, value] of keyValuePairs(sub, 'thermal', raw.split(',').map((x) => x.trim()).filter(Boolean))) {
    if (key !== 'Rth' && key !== 'Cth') throw new UsageError(`--thermal: unknown key "${key}"; give Rth=V [K/W] and/or Cth=V [J/K]`, sub);
    const x = Number(value);
    if (!Number.isFinite(x) || !(x > 0)) throw new UsageError(`--thermal ${key}= must be a number > 0 in ${key === 'Rth' ? 'K/W' : 'J/K'} (got "${value}")`, sub);
    out[key] = x;
  }
  return out;
}

function formatTuning(set: ParameterSet, paint: Paint): string {
  if (set.tuning === undefined) return '';
  const t = tuningRows(set.tuning);
  const rows = t.rows.map((g) => [g.label, g.value === null ? '—' : formatNumber(g.value, 4), g.unit, g.ci95 === null ? '—' : formatInterval(g.ci95, g.value ?? 0)]);
  const warn = set.tuning.warnings.map((w) => `  ${paint.warn('warning:')} ${w}\n`).join('');
  return `\n${paint.bold('Loop tuning')} (${t.settings}; current loop taken as ideal for the speed loop, no delay)\n` +
    `${formatTable(['gain', 'value', 'unit', '95 % interval'], rows, ['left', 'right', 'left', 'left'])}\n${warn}`;
}

function formatResistanceAtReference(set: ParameterSet): string {
  const r = set.resistanceAtReference;
  if (r.value === null) return `R at ${r.referenceTemperature} °C: ${r.note}\n`;
  return `R at ${r.referenceTemperature} °C: ${formatNumber(r.value, 5)} Ω (${r.note})\n`;
}

/** `motorprint fit`: fits the motor constants to recordings and chooses the model the data support. */
export const fitCommand: Subcommand = {
  name: 'fit',
  summary: 'fit R, L, Kt/Ke, J, b (and the friction, limit and heating terms the data support), with intervals',
  help: HELP,
  run,
};
