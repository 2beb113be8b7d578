import { mkdir, readFile, writeFile } from 'node:fs/promises';
import { basename, dirname, resolve } from 'node:path';
import { formatRecordingCsv, generateRecording, type ExperimentKind, type RecordingOptions } from '@motorprint/model';
import { numberOption, parseSubcommandArgs } from '../args.js';
import { readParamsFile } from '../readParamsFile.js';
import { EXIT, type CliIo, type Subcommand } from '../types.js';
import { UsageError } from '../UsageError.js';

const KINDS: readonly ExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];

const HELP = `motorprint simulate PARAMS.json --experiment KIND --out FILE.csv [options]

Writes an INVENTED bench recording of a motor with known constants, for tests, demos and for
planning a bench run. Beside FILE.csv it writes FILE.truth.json with the true constants, the
commanded input, every option and the seed. Nothing here is a measurement.

PARAMS.json: a plain object of SI values, e.g.
  {"R": 1.2, "L": 0.0008, "Kt": 0.035, "Ke": 0.035, "J": 4e-6, "b": 2e-6}
or a parameter set written by "motorprint fit --json". Optional effect terms switch the detailed
model on: Tc, Ts [N·m] (Coulomb, stiction), cd [N·m·s²/rad²] (drag), Vmax [V], Imax [A] (drive
limits), Rth [K/W], Cth [J/K] (winding heating, copper law), Rs [Ω] (supply), loadInertia,
loadTorque, loadDamping.

KIND: locked-rotor | step | coast-down | steady-state | prbs | multisine | loaded

Options:
  --experiment KIND        which bench run to play (required)
  --out FILE.csv           where to write the recording (required)
  --sample-rate HZ         logger sample rate (default 10000)
  --duration S             record length (default: chosen from the motor's time constants)
  --volts V                step / supply voltage (default 12)
  --noise-voltage V        noise σ on the voltage channel (default 0: clean trajectory)
  --noise-current A        noise σ on the current channel
  --noise-speed RAD_S      noise σ on the speed channel
  --noise-torque NM        noise σ on the torque channel (loaded runs)
  --noise-temperature C    noise σ on the temperature channel (thermal model)
  --encoder-counts N       log encoder position in counts (N counts per revolution) instead of speed
  --log-speed              with --encoder-counts, log speed as well
  --jitter S               σ of the sample-time jitter (must be < a quarter sample interval)
  --seed N                 seed of the noise generator (default 1)
  --json                   print the truth sidecar on stdout as well

Exit codes: 0 written; 1 the parameter file cannot be read or the output cannot be written;
2 command-line mistake, including constants or options the generator cannot use.`;

async function run(args: string[], io: CliIo): Promise<number> {
  const { values, positionals } = parseSubcommandArgs('simulate', args, {
    experiment: { type: 'string' },
    out: { type: 'string' },
    'sample-rate': { type: 'string' },
    duration: { type: 'string' },
    volts: { type: 'string' },
    'noise-voltage': { type: 'string' },
    'noise-current': { type: 'string' },
    'noise-speed': { type: 'string' },
    'noise-torque': { type: 'string' },
    'noise-temperature': { type: 'string' },
    'encoder-counts': { type: 'string' },
    'log-speed': { type: 'boolean' },
    jitter: { type: 'string' },
    seed: { type: 'string' },
    json: { type: 'boolean' },
  });
  if (positionals.length !== 1) {
    throw new UsageError(`expected exactly one PARAMS.json file (got ${positionals.length})`, 'simulate');
  }
  const kind = values.experiment;
  if (kind === undefined) throw new UsageError('--experiment KIND is required', 'simulate');
  if (!(KINDS as readonly string[]).includes(kind)) {
    throw new UsageError(`--experiment must be one of ${KINDS.join(', ')} (got "${kind}")`, 'simulate');
  }
  if (values.out === undefined) throw new UsageError('--out FILE.csv is required', 'simulate');
  const positive = (x: number) => x > 0;
  const nonNegative = (x: number) => x >= 0;
  const num = (name: string, test = positive, rule = 'a number > 0') =>
    numberOption('simulate', name, values[name as keyof typeof values] as string | undefined, test, rule);
  const options: RecordingOptions = {};
  const set = <K extends keyof RecordingOptions>(key: K, v: RecordingOptions[K] | undefined) => {
    if (v !== undefined) options[key] = v;
  };
  set('sampleRate', num('sample-rate'));
  set('duration', num('duration'));
  set('volts', num('volts', (x) => x !== 0, 'a non-zero number'));
  set('timeJitter', num('jitter', nonNegative, 'a number ≥ 0'));
  set('seed', num('seed', (x) => Number.isInteger(x) && x >= 0, 'a whole number ≥ 0'));
  set('encoderCounts', num('encoder-counts', (x) => Number.isInteger(x) && x > 0, 'a whole number > 0'));
  if (values['log-speed']) options.logSpeed = true;
  const noise: NonNullable<RecordingOptions['noise']> = {};
  for (const ch of ['voltage', 'current', 'speed', 'torque', 'temperature'] as const) {
    const v = num(`noise-${ch}`, nonNegative, 'a number ≥ 0');
    if (v !== undefined) noise[ch] = v;
  }
  if (Object.keys(noise).length > 0) options.noise = noise;

  const paramsPath = resolve(io.cwd, positionals[0] as string);
  let text: string;
  try {
    text = await readFile(paramsPath, 'utf8');
  } catch (err) {
    throw new Error(`${positionals[0]}: cannot read the parameter file (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`);
  }
  const params = readParamsFile(text, positionals[0] as string);
  let generated;
  try {
    generated = generateRecording(params, kind as ExperimentKind, options);
  } catch (err) {
    if (err instanceof RangeError || err instanceof TypeError) throw new UsageError(err.message, 'simulate');
    throw err;
  }
  const outPath = resolve(io.cwd, values.out);
  const truthPath = outPath.replace(/(\.csv)?$/i, '.truth.json');
  const { voltage: _series, ...input } = generated.truth.input;
  const sidecar = {
    generatedBy: 'motorprint simulate',
    file: values.out,
    ...generated.truth,
    input,
  };
  await mkdir(dirname(outPath), { recursive: true });
  const label =
    `# INVENTED recording made by motorprint simulate (${kind}, seed ${generated.truth.seed}); not a measurement.\n` +
    `# True constants and commanded input: ${basename(truthPath)}\n`;
  await writeFile(outPath, label + formatRecordingCsv(generated.columns));
  await writeFile(truthPath, `${JSON.stringify(sidecar, null, 2)}\n`);
  const rows = generated.columns[0]?.values.length ?? 0;
  io.stderr(`wrote ${values.out} (${rows} rows, ${generated.columns.map((c) => `${c.name} [${c.unit}]`).join(', ')}) and its truth sidecar\n`);
  if (values.json) io.stdout(`${JSON.stringify(sidecar, null, 2)}\n`);
  return EXIT.ok;
}

/** `motorprint simulate`: writes an invented recording and its truth sidecar. */
export const simulateCommand: Subcommand = {
  name: 'simulate',
  summary: 'write an invented bench recording of a motor with known constants',
  help: HELP,
  run,
};
