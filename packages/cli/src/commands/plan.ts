import { readFile } from 'node:fs/promises';
import { resolve } from 'node:path';
import { planExperiments, type ExperimentPlan, type MotorExperimentKind, type PlannedNoise, type PlannedRun, type PlanOptions } from '@motorprint/estimate';
import type { MotorParams } from '@motorprint/model';
import { keyValuePairs, numberOption, parseSubcommandArgs } from '../args.js';
import { fileErrorText } from '../inputFiles.js';
import { readParamsFile } from '../readParamsFile.js';
import { paintFor, type Paint } from '../style.js';
import { formatNumber, formatTable } from '../table.js';
import { EXIT, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const KINDS: readonly MotorExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];

const HELP = `motorprint plan [DRAFT.json] [--guess P=V]... --run KIND[,KEY=VALUE...] [--run ...]
                [--volts V] [--noise voltage=V,current=A,speed=W,torque=T] [--target PCT]
                [--thermal Rth=V,Cth=V] [--rise K] [--no-suggest] [--json]

Before a bench session: predicts how well the planned runs will pin each constant down — the
standard error and relative error of R, L, K (= Kt = Ke; Kt and Ke apart with a loaded run), J and b,
each run's share of the information, constants too weakly informed to count (set aside: the others
are predicted as if they were pinned), changes of duration, sample rate or PRBS bit time that reach
the target, and the locked-rotor time budget. The numbers are the Cramér–Rao bound of the same
model and weighting "motorprint fit" uses (lumped model, viscous friction), computed on a
noise-free simulation of each planned run at the draft constants: they are what a fit of such runs
will report if the draft is near the truth and the model holds.

DRAFT.json is a parameter set written by "motorprint fit --out" or a JSON object of constants
{"R": …, "L": …, "Kt": …, "Ke": …, "J": …, "b": …} [SI]; --guess gives or overrides constants
(with no file, give all six; K=V sets Kt and Ke together).

Run keys (after the kind, comma-separated; numbers in SI, with an optional k, m or u suffix):
  duration=T     record length [s] (default from τe, τm as "motorprint simulate" plays it)
  rate=HZ        sample rate [Hz] (default 10k)
  levels=A/B/…   voltage levels [V]: step, locked-rotor, loaded: before/after; coast-down: the driven
                 plateau; steady-state: each level; prbs: low/high; multisine: offset/peak deviation
                 (default from --volts)
  bit=T          PRBS bit time [s] (default τm/2)
  noise-voltage=V, noise-current=A, noise-speed=W, noise-torque=T
                 noise SDs of this run (default: --noise)
  step-voltage=V, step-current=A, step-speed=W
                 quantisation steps (resolution); each adds q/√12 to that channel's noise
  counts=N       speed from an encoder of N counts per revolution (angle step 2π/N)
  voltage=no     coast-down with the speed alone (no voltage or current logged)
  load=T         load torque of a loaded run [N·m] (default 25 % of the stall torque)
  name=TEXT      label of the run

Options:
  --guess P=V    draft constant P (R, L, Kt, Ke, K, J, b) [SI]; repeat as needed
  --run SPEC     a planned run (see above); repeat for each run
  --volts V      supply voltage for default levels (default 12 V)
  --noise LIST   noise SDs of every run that gives none: voltage [V], current [A], speed [rad/s],
                 torque [N·m]
  --target PCT   target relative standard error, e.g. 1% or 0.5 (default 1 %)
  --thermal Rth=V,Cth=V   winding thermal data for the locked-rotor budget (default: no cooling and
                 Cth 1 J/K — a conservative assumption, not this motor's data)
  --rise K       allowed winding rise of the locked-rotor budget (default 20 K)
  --no-suggest   skip the search for changes (faster)
  --json         print the plan as one JSON document

Locked-rotor runs heat the winding: the budget printed is arithmetic on assumed thermal data, not a
rating. The motor maker's stall rating, local codes and licensed practice decide.

Exit codes: 0 planned; 1 a file cannot be read or the draft or a run is unusable; 2 command-line mistake.`;

const CONSTANT_KEYS = ['R', 'L', 'Kt', 'Ke', 'K', 'J', 'b'] as const;

/** A number with an optional SI prefix suffix (k, m, u/µ), e.g. 10k, 4m. */
function siNumber(raw: string): number {
  const m = /^([-+]?[0-9.]+(?:e[-+]?[0-9]+)?)\s*([kmuµ]?)(?:s|Hz|V|A)?$/i.exec(raw.trim());
  if (m === null) return NaN;
  const f = { '': 1, k: 1e3, K: 1e3, m: 1e-3, u: 1e-6, U: 1e-6, µ: 1e-6, M: NaN }[m[2]!] ?? NaN;
  return Number(m[1]) * f;
}

/** `KIND,KEY=VALUE,…` to a planned run; a UsageError names the run and key. */
export function parseRunSpec(spec: string, index: number): PlannedRun {
  const where = `--run ${index + 1} ("${spec}")`;
  const [kindRaw, ...rest] = spec.split(',').map((x) => x.trim());
  if (!(KINDS as readonly string[]).includes(kindRaw ?? '')) throw new UsageError(`${where}: the kind must come first, one of ${KINDS.join(', ')}`, 'plan');
  const run: PlannedRun = { kind: kindRaw as MotorExperimentKind };
  const noise: PlannedNoise = {};
  const resolution: NonNullable<PlannedRun['resolution']> = {};
  for (const item of rest.filter(Boolean)) {
    const at = item.indexOf('=');
    if (at <= 0) throw new UsageError(`${where}: "${item}" is not KEY=VALUE`, 'plan');
    const key = item.slice(0, at).trim(), value = item.slice(at + 1).trim();
    const num = (test: (x: number) => boolean, rule: string): number => {
      const x = siNumber(value);
      if (!Number.isFinite(x) || !test(x)) throw new UsageError(`${where}: ${key}= must be ${rule} (got "${value}")`, 'plan');
      return x;
    };
    switch (key) {
      case 'duration': run.duration = num((x) => x > 0, 'a duration > 0 [s]'); break;
      case 'rate': run.sampleRate = num((x) => x > 0, 'a sample rate > 0 [Hz]'); break;
      case 'bit': run.bitTime = num((x) => x > 0, 'a bit time > 0 [s]'); break;
      case 'levels': {
        const lv = value.split('/').map((x) => siNumber(x));
        if (lv.length === 0 || lv.some((x) => !Number.isFinite(x))) throw new UsageError(`${where}: levels= must be voltages separated by / (got "${value}")`, 'plan');
        run.levels = lv;
        break;
      }
      case 'noise-voltage': case 'noise-current': case 'noise-speed': case 'noise-torque':
        noise[key.slice(6) as keyof PlannedNoise] = num((x) => x >= 0, 'a noise SD ≥ 0'); break;
      case 'step-voltage': case 'step-current': case 'step-speed':
        resolution[key.slice(5) as 'voltage' | 'current' | 'speed'] = num((x) => x > 0, 'a quantisation step > 0'); break;
      case 'counts': run.encoderCounts = num((x) => Number.isInteger(x) && x > 0, 'a whole number of counts per revolution'); break;
      case 'voltage':
        if (value !== 'no' && value !== 'yes') throw new UsageError(`${where}: voltage= must be yes or no (got "${value}")`, 'plan');
        run.voltage = value === 'yes';
        break;
      case 'load': run.loadTorque = num(() => true, 'a torque [N·m]'); break;
      case 'name': run.name = value; break;
      default: throw new UsageError(`${where}: unknown key "${key}"; keys are duration, rate, levels, bit, noise-voltage, noise-current, noise-speed, noise-torque, step-voltage, step-current, step-speed, counts, voltage, load, name`, 'plan');
    }
  }
  if (Object.keys(noise).length > 0) run.noise = noise;
  if (Object.keys(resolution).length > 0) run.resolution = resolution;
  return run;
}

function pct(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  const p = 100 * x;
  return `${p >= 10 ? p.toFixed(0) : p >= 1 ? p.toFixed(1) : formatNumber(p, 2)} %`;
}
function seconds(x: number): string {
  if (!Number.isFinite(x)) return 'unbounded';
  return x >= 1 ? `${formatNumber(x, 3)} s` : x >= 1e-3 ? `${formatNumber(x * 1e3, 3)} ms` : `${formatNumber(x * 1e6, 3)} µs`;
}

/** The plan as the terminal table. */
export function formatPlan(plan: ExperimentPlan, paint: Paint): string {
  const out: string[] = [];
  out.push(paint.bold(`Predicted standard errors (target ${pct(plan.target)})`));
  const rows = plan.constants.map((c) => {
    const shares = Object.entries(c.shares).sort((a, b) => b[1] - a[1]).filter(([, v]) => v >= 0.005)
      .map(([k, v]) => `${k} ${v >= 0.995 ? '100' : (100 * v).toFixed(0)} %`).join(', ');
    const status = c.status === 'identified' ? (c.met ? paint.good('met') : paint.warn('missed'))
      : c.status === 'set-aside' ? paint.warn(`set aside (${pct(c.relativeErrorFree)})`) : paint.warn('not informed');
    return [c.name, formatNumber(c.value, 4), c.unit, c.standardError === null ? '—' : formatNumber(c.standardError, 2), pct(c.relativeError), status, shares ? `(${shares})` : ''];
  });
  out.push(formatTable(['', 'draft', 'unit', 'SE', 'rel. SE', '', 'information from'], rows, ['left', 'right', 'left', 'right', 'right', 'left', 'left']));
  if (plan.setAside.names.length > 0) {
    out.push(`${plan.setAside.names.join(', ')} set aside: ${plan.setAside.rule}.`);
  }
  out.push('');
  out.push(`τe = L/R = ${seconds(plan.timeConstants.electrical)}, τm = ${seconds(plan.timeConstants.mechanical)}`);
  for (const n of plan.notes) out.push(`  note: ${n}`);
  if (plan.suggestions.length > 0) {
    out.push('', paint.bold('To reach the target'));
    for (const s of plan.suggestions) out.push(`  ${s.text}`);
  }
  const missed = plan.constants.filter((c) => !c.met && c.status !== 'not-informed' && !plan.suggestions.some((s) => s.constant === c.name));
  if (missed.length > 0 && plan.suggestions.length + missed.length > 0) {
    out.push(`  ${missed.map((c) => c.name).join(', ')}: no change of duration, sample rate, bit time or level tried reaches the target (or the search was skipped); add a run that informs ${missed.length === 1 ? 'it' : 'them'}`);
  }
  if (plan.lockedRotor.length > 0) out.push('');
  for (const lr of plan.lockedRotor) {
    const line = `${lr.run}: hold ${seconds(lr.holdSeconds)} at ${formatNumber(lr.current, 3)} A; budget ${seconds(lr.budgetSeconds)} for a ${lr.riseK} K rise (${lr.note})`;
    out.push(lr.over ? paint.warn(`${line} — the planned hold is over the budget`) : line);
  }
  out.push('', paint.dim('Cramér–Rao bound from the Fisher information of the model and weighting "motorprint fit" uses (lumped model, viscous friction), at the draft, on noise-free simulations of the planned runs.'));
  return out.join('\n');
}

async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('plan', args, {
    guess: { type: 'string', multiple: true },
    run: { type: 'string', multiple: true },
    volts: { type: 'string' },
    noise: { type: 'string' },
    target: { type: 'string' },
    thermal: { type: 'string' },
    rise: { type: 'string' },
    'no-suggest': { type: 'boolean' },
    json: { type: 'boolean' },
  });
  if (positionals.length > 1) throw new UsageError(`expected at most one draft file (got ${positionals.length})`, 'plan');
  const runs = (values.run ?? []).map((spec, i) => parseRunSpec(spec, i));
  if (runs.length === 0) throw new UsageError('give at least one planned run with --run KIND[,KEY=VALUE…]', 'plan');
  const guesses: Record<string, number> = {};
  for (const [key, value] of keyValuePairs('plan', 'guess', values.guess)) {
    if (!(CONSTANT_KEYS as readonly string[]).includes(key)) throw new UsageError(`--guess: unknown constant "${key}"; give ${CONSTANT_KEYS.join(', ')}`, 'plan');
    const x = Number(value);
    if (!Number.isFinite(x) || !(x > 0 || (key === 'b' && x === 0))) throw new UsageError(`--guess ${key}= must be a number > 0 [SI] (got "${value}")`, 'plan');
    if (key === 'K') { guesses.Kt = x; guesses.Ke = x; } else guesses[key] = x;
  }
  const options: PlanOptions = {};
  const volts = numberOption('plan', 'volts', values.volts, (x) => x > 0, 'a voltage > 0 [V]');
  if (volts !== undefined) options.volts = volts;
  if (values.noise !== undefined) {
    const noise: PlannedNoise = {};
    for (const [key, value] of keyValuePairs('plan', 'noise', values.noise.split(',').map((x) => x.trim()).filter(Boolean))) {
      if (!['voltage', 'current', 'speed', 'torque'].includes(key)) throw new UsageError(`--noise: unknown channel "${key}"; channels are voltage, current, speed, torque`, 'plan');
      const x = siNumber(value);
      if (!Number.isFinite(x) || x < 0) throw new UsageError(`--noise ${key}= must be a noise SD ≥ 0 (got "${value}")`, 'plan');
      noise[key as keyof PlannedNoise] = x;
    }
    options.noise = noise;
  }
  if (values.target !== undefined) {
    const raw = values.target.trim();
    const x = raw.endsWith('%') ? Number(raw.slice(0, -1)) / 100 : Number(raw);
    if (raw === '' || !Number.isFinite(x) || !(x > 0 && x < 1)) throw new UsageError(`--target must be a relative error such as 1% or 0.01 (got "${values.target}")`, 'plan');
    options.target = x;
  }
  if (values.thermal !== undefined) {
    const th: { Rth?: number; Cth?: number } = {};
    for (const [key, value] of keyValuePairs('plan', 'thermal', values.thermal.split(',').map((x) => x.trim()).filter(Boolean))) {
      if (key !== 'Rth' && key !== 'Cth') throw new UsageError(`--thermal: unknown key "${key}"; give Rth=V [K/W] and/or Cth=V [J/K]`, 'plan');
      const x = Number(value);
      if (!Number.isFinite(x) || !(x > 0)) throw new UsageError(`--thermal ${key}= must be a number > 0 (got "${value}")`, 'plan');
      th[key] = x;
    }
    options.thermal = th;
  }
  const rise = numberOption('plan', 'rise', values.rise, (x) => x > 0, 'a temperature rise > 0 [K]');
  if (rise !== undefined) options.riseK = rise;
  if (values['no-suggest']) options.suggest = false;

  let draft: Record<string, number> = {};
  if (positionals.length === 1) {
    const file = positionals[0]!;
    let text: string;
    try { text = await readFile(resolve(io.cwd, file), 'utf8'); } catch (err) {
      throw new Error(`${fileErrorText(file, err)} (the draft parameter set)`);
    }
    const p = readParamsFile(text, file) as unknown as Record<string, number>;
    for (const k of ['R', 'L', 'Kt', 'Ke', 'J', 'b']) if (typeof p[k] === 'number') draft[k] = p[k]!;
  }
  draft = { ...draft, ...guesses };
  const missing = ['R', 'L', 'Kt', 'Ke', 'J', 'b'].filter((k) => !(typeof draft[k] === 'number'));
  if (missing.length > 0) {
    throw new UsageError(`the draft lacks ${missing.join(', ')}: give ${positionals.length === 1 ? 'them' : 'a draft file or'} with --guess P=V`, 'plan');
  }
  let plan: ExperimentPlan;
  try {
    plan = planExperiments(draft as unknown as MotorParams, runs, options);
  } catch (err) {
    // The library names runs[i].field; the command line names --run i.
    const msg = (err as Error).message.replace(/^planExperiments: /, '').replace(/runs\[(\d+)\]\./g, (_, i: string) => `--run ${Number(i) + 1} `).replace(/runs\[(\d+)\]/g, (_, i: string) => `--run ${Number(i) + 1}`)
      .replace(/options\.target/, '--target').replace(/noise\.current \(or resolution\.current\)/g, 'noise-current (or step-current)').replace(/noise\.speed \(or resolution\.speed, encoderCounts\)/g, 'noise-speed (or step-speed, counts)').replace(/noise\.(\w+)/g, 'noise-$1').replace(/resolution\.(\w+)/g, 'step-$1').replace(/sampleRate/g, 'rate').replace(/bitTime/g, 'bit').replace(/encoderCounts/g, 'counts');
    if (err instanceof RangeError || err instanceof TypeError) throw new Error(`the plan cannot be computed: ${msg}`);
    throw err;
  }
  if (values.json) io.stdout(`${JSON.stringify({ schema: 'motorprint.plan/1', ...plan }, null, 2)}\n`);
  else io.stdout(`${formatPlan(plan, paintFor(io))}\n`);
  return EXIT.ok;
}

/** `motorprint plan`: predicts the standard errors of planned bench runs before they are recorded. */
export const planCommand: Subcommand = {
  name: 'plan',
  summary: 'predict the standard errors of planned bench runs, suggest changes, and give the locked-rotor time budget',
  help: HELP,
  run,
};
