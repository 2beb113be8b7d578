import { checkMotorParams } from './checkMotorParams.js';
import { createRandom } from './createRandom.js';
import { lockedRotorResponse } from './lockedRotorResponse.js';
import { prbsBits } from './prbsBits.js';
import { multisineShape } from './multisineShape.js';
import { simulateDetailed } from './simulateDetailed.js';
import { simulateInto } from './simulateInto.js';
import type {
  ChannelNoise, DetailedParams, ExperimentKind, GeneratedRecording, RecordingColumn, RecordingOptions, RecordingTruth,
} from './types.js';

const EXPERIMENTS: readonly ExperimentKind[] = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'];
const EFFECT_KEYS = ['Tc', 'Ts', 'cd', 'Vmax', 'Imax', 'Rth', 'Cth', 'Rs', 'loadInertia', 'loadDamping'] as const;

/**
 * Generates an invented bench recording of a motor: the trajectory of the chosen experiment,
 * sampled like a data logger, with optional measurement noise, encoder quantisation and
 * sample-time jitter, plus a truth sidecar (true constants, commanded input, options, seed).
 *
 * ## Experiments (10 % of each record is pre-trigger baseline unless noted)
 * - `locked-rotor`: voltage step with the rotor held (ω = 0); logs voltage and current (and
 *   temperature with the thermal model). Default length 12·τe; keep it short, real windings heat.
 * - `step`: step from rest, free shaft; default length 6·τm′.
 * - `coast-down`: the motor first runs at `volts` to steady state (not recorded), then the circuit
 *   opens at the event time; after it the current is 0 and the logged voltage is the terminal
 *   voltage, i.e. the back-EMF Ke·ω. Always uses the detailed model (open circuit).
 * - `steady-state`: staircase of 5 levels volts·(1…5)/5, each held max(6·τm′, 50 ms); no baseline.
 * - `prbs`: 9-bit LFSR sequence between 0.5·volts and volts, bit period max(τm′/2, 1 sample), 255 bits.
 * - `multisine`: 0.5·volts offset plus 31 harmonics of 1/duration with Schroeder phases
 *   φk = −π·k·(k − 1)/31, scaled to a peak of 0.45·volts; default length 20·τm′.
 * - `loaded`: step from rest against a load torque (params.loadTorque, default 25 % of the stall
 *   torque) with a torque transducer channel (shaft torque to the load).
 *
 * The exact linear model is used unless an effect term (Tc, Ts, cd, Vmax, Imax, Rth/Cth, Rs,
 * loadInertia, loadDamping) is present, an encoder is set (position needs the integrator) or the
 * experiment is a coast-down; then the adaptive detailed model is used. The logged voltage is the
 * terminal voltage plus noise; the commanded input stays in `truth.input`.
 *
 * @param params - true constants (and effect terms)
 * @param experiment - which bench experiment to play
 * @param options - sample rate, duration, volts, noise σ per channel, encoder, jitter, seed
 * @returns `{ columns, truth }`; columns start with `time [s]`
 * @throws TypeError / RangeError for bad constants, an unknown experiment or bad options
 * @example
 * const rec = generateRecording({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, 'step', { seed: 7 });
 * rec.columns.map((c) => c.name); // => ['time', 'voltage', 'current', 'speed']
 */
export function generateRecording(params: DetailedParams, experiment: ExperimentKind, options: RecordingOptions = {}): GeneratedRecording {
  const fn = 'generateRecording';
  checkMotorParams(fn, params);
  if (!EXPERIMENTS.includes(experiment)) {
    throw new RangeError(`${fn}: experiment must be one of ${EXPERIMENTS.join(', ')} (got ${JSON.stringify(experiment)})`);
  }
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object (got ${String(options)})`);
  const num = (path: string, v: unknown, def: number, test: (x: number) => boolean, rule: string): number => {
    if (v === undefined) return def;
    if (typeof v !== 'number') throw new TypeError(`${fn}: ${path} must be a number (got ${String(v)})`);
    if (!Number.isFinite(v) || !test(v)) throw new RangeError(`${fn}: ${path} must be ${rule} (got ${v})`);
    return v;
  };
  const fs = num('options.sampleRate', options.sampleRate, 10000, (x) => x > 0, 'a finite number > 0');
  const volts = num('options.volts', options.volts, 12, () => true, 'finite');
  const seed = num('options.seed', options.seed, 1, Number.isInteger, 'an integer');
  const jitter = num('options.timeJitter', options.timeJitter, 0, (x) => x >= 0 && x < 0.25 / fs, '>= 0 and < 0.25 sample interval');
  const cpr = options.encoderCounts === undefined ? null
    : num('options.encoderCounts', options.encoderCounts, 0, (x) => Number.isInteger(x) && x > 0, 'an integer > 0');
  const logSpeed = options.logSpeed ?? cpr === null;
  if (typeof logSpeed !== 'boolean') throw new TypeError(`${fn}: options.logSpeed must be a boolean (got ${String(logSpeed)})`);
  const noiseIn = options.noise ?? {};
  if (noiseIn === null || typeof noiseIn !== 'object') throw new TypeError(`${fn}: options.noise must be an object`);
  const noise: Required<ChannelNoise> = { voltage: 0, current: 0, speed: 0, torque: 0, temperature: 0 };
  for (const key of Object.keys(noise) as (keyof ChannelNoise)[]) {
    noise[key] = num(`options.noise.${key}`, noiseIn[key], 0, (x) => x >= 0, '>= 0');
  }
  for (const key of Object.keys(noiseIn)) {
    if (!(key in noise)) throw new TypeError(`${fn}: options.noise.${key} is not a channel (voltage, current, speed, torque, temperature)`);
  }

  const p: DetailedParams = { ...params };
  if (experiment === 'loaded' && p.loadTorque === undefined) p.loadTorque = 0.25 * (p.Kt * volts) / p.R;
  const Jtot = p.J + (p.loadInertia ?? 0);
  const tauE = p.L / p.R;
  const tauM = (Jtot * p.R) / (p.R * (p.b + (p.loadDamping ?? 0)) + p.Kt * p.Ke);
  const dt = 1 / fs;
  const Tc = p.Tc ?? 0;
  let defaultDuration: number;
  let coastTime = 0;
  switch (experiment) {
    case 'locked-rotor': defaultDuration = (12 * tauE) / 0.9; break;
    case 'step': case 'loaded': defaultDuration = (6 * tauM) / 0.9; break;
    case 'coast-down': {
      if (p.b === 0 && Tc === 0 && !(p.cd! > 0)) throw new RangeError(`${fn}: a coast-down needs b, Tc or cd > 0 (got all 0)`);
      const w0 = (p.Kt * volts) / (p.R * p.b + p.Kt * p.Ke);
      coastTime = Tc > 0 ? (p.b > 0 ? (Jtot / p.b) * Math.log1p((p.b * Math.abs(w0)) / Tc) : (Jtot * Math.abs(w0)) / Tc) * 1.2 : p.b > 0 ? (6 * Jtot) / p.b : 1;
      defaultDuration = coastTime / 0.9;
      break;
    }
    case 'steady-state': defaultDuration = 5 * Math.max(6 * tauM, 0.05); break;
    case 'prbs': defaultDuration = 255 * Math.max(Math.round((0.5 * tauM) / dt), 1) * dt; break;
    default: defaultDuration = 20 * tauM;
  }
  const duration = num('options.duration', options.duration, defaultDuration, (x) => x > 0, 'a finite number > 0');
  const n = Math.floor(duration * fs + 1e-9) + 1;
  if (n < 2) throw new RangeError(`${fn}: options.duration ${duration} s holds fewer than 2 samples at ${fs} Hz`);
  if (n > 2e7) throw new RangeError(`${fn}: ${n} samples requested (duration × sampleRate); the limit is 2e7`);

  const rng = createRandom(seed);
  // Sample instants: nominal grid plus jitter (clipped to ±0.45 interval so time stays increasing).
  const time = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let e = jitter > 0 ? jitter * rng.normal() : 0;
    if (e > 0.45 * dt) e = 0.45 * dt;
    else if (e < -0.45 * dt) e = -0.45 * dt;
    time[k] = k * dt + (k === 0 ? 0 : e);
  }
  const eventTime = experiment === 'steady-state' ? 0 : Math.round(0.1 * duration * fs) * dt;
  const u = new Float64Array(n);
  const detail: Record<string, number | string> = {};
  let levels: number[];
  let description: string;
  if (experiment === 'steady-state') {
    const dwell = duration / 5;
    levels = [1, 2, 3, 4, 5].map((j) => (volts * j) / 5);
    for (let k = 0; k < n; k++) u[k] = levels[Math.min(4, Math.floor(time[k]! / dwell))]!;
    detail.dwell = dwell;
    description = `staircase of 5 levels, ${dwell} s each`;
  } else if (experiment === 'prbs') {
    const bit = Math.max(Math.round((0.5 * tauM) / dt), 1) * dt;
    const bits = prbsBits(Math.ceil(duration / bit) + 2);
    levels = [0.5 * volts, volts];
    for (let k = 0; k < n; k++) u[k] = time[k]! < eventTime ? 0 : bits[Math.floor((time[k]! - eventTime) / bit)] ? volts : 0.5 * volts;
    detail.bitPeriod = bit;
    detail.register = 'LFSR x^9 + x^5 + 1, start state 0x1ff';
    description = `PRBS between ${levels[0]} V and ${volts} V from ${eventTime} s, bit period ${bit} s`;
  } else if (experiment === 'multisine') {
    const K = 31;
    const f0 = 1 / duration;
    const shape = multisineShape(time, duration, K);
    for (let k = 0; k < n; k++) u[k] = 0.5 * volts + 0.45 * volts * shape[k]!;
    levels = [0.5 * volts];
    detail.baseFrequency = f0;
    detail.harmonics = K;
    detail.amplitudePeak = 0.45 * volts;
    description = `multisine: ${0.5 * volts} V + ${K} harmonics of ${f0} Hz, Schroeder phases`;
  } else if (experiment === 'coast-down') {
    levels = [volts, 0];
    for (let k = 0; k < n; k++) u[k] = volts;
    description = `running at ${volts} V, armature opened at ${eventTime} s`;
  } else {
    levels = [0, volts];
    for (let k = 0; k < n; k++) u[k] = time[k]! < eventTime ? 0 : volts;
    description = `step 0 → ${volts} V at ${eventTime} s` + (experiment === 'loaded' ? ` against ${p.loadTorque} N·m` : '') +
      (experiment === 'locked-rotor' ? ', rotor held' : '');
  }

  const effects = EFFECT_KEYS.filter((key) => p[key] !== undefined);
  if (p.loadTorque !== undefined && p.loadTorque !== 0) effects.push('loadTorque' as never);
  const detailed = effects.some((e) => e !== ('loadTorque' as string)) || cpr !== null || experiment === 'coast-down';
  const uniform = jitter === 0 ? dt : time;
  let current: Float64Array, speed: Float64Array, vMeas: Float64Array;
  let position: Float64Array | null = null, torque: Float64Array | null = null, temperature: Float64Array | null = null;
  const notes: string[] = ['invented recording, made by @motorprint/model generateRecording'];
  if (experiment === 'locked-rotor' && !detailed) {
    current = new Float64Array(n);
    speed = new Float64Array(n);
    // Exact: the voltage is held from the first sample at or after the step time.
    let tOn = NaN;
    for (let k = 0; k < n; k++) {
      if (Number.isNaN(tOn) && u[k]! !== 0) tOn = time[k]!;
      current[k] = Number.isNaN(tOn) ? 0 : lockedRotorResponse(p.R, p.L, volts, time[k]! - tOn).current;
    }
    vMeas = u.slice();
  } else if (!detailed) {
    const tr = simulateInto({ current: new Float64Array(n), speed: new Float64Array(n) }, p, u, uniform, { loadTorque: p.loadTorque ?? 0 });
    current = tr.current;
    speed = tr.speed;
    vMeas = u.slice();
    if (experiment === 'loaded') torque = new Float64Array(n).fill(p.loadTorque ?? 0);
  } else {
    const dp: DetailedParams = experiment === 'locked-rotor' ? { ...p, Ts: Number.MAX_VALUE } : p;
    let init = {};
    if (experiment === 'coast-down') {
      const spinLen = Math.max(Math.ceil((8 * tauM) / dt), 10);
      const spin = simulateDetailed(p, new Float64Array(spinLen + 1).fill(volts), dt);
      init = { initialCurrent: spin.current[spinLen]!, initialSpeed: spin.speed[spinLen]! };
      notes.push('after the armature opens, current is 0 and the voltage column is the back-EMF Ke·ω at the open terminals');
    }
    const tr = simulateDetailed(dp, u, uniform, { ...init, openCircuitFrom: experiment === 'coast-down' ? eventTime : Infinity });
    current = tr.current;
    speed = tr.speed;
    vMeas = tr.terminalVoltage;
    if (cpr !== null) position = tr.position;
    if (experiment === 'loaded') torque = tr.shaftTorque;
    if (p.Rth !== undefined) temperature = tr.temperature;
    if (experiment === 'locked-rotor') notes.push('rotor held: modelled as an unbounded breakaway torque');
  }
  const noisy = (values: Float64Array, sigma: number): Float64Array => {
    const out = values.slice();
    if (sigma > 0) for (let k = 0; k < n; k++) out[k] = out[k]! + sigma * rng.normal();
    return out;
  };
  const columns: RecordingColumn[] = [
    { name: 'time', unit: 's', values: time },
    { name: 'voltage', unit: 'V', values: noisy(vMeas, noise.voltage) },
    { name: 'current', unit: 'A', values: noisy(current, noise.current) },
  ];
  if (experiment !== 'locked-rotor' && logSpeed) columns.push({ name: 'speed', unit: 'rad/s', values: noisy(speed, noise.speed) });
  if (position !== null && cpr !== null && experiment !== 'locked-rotor') {
    const counts = new Float64Array(n);
    for (let k = 0; k < n; k++) counts[k] = Math.round((position[k]! * cpr) / (2 * Math.PI));
    columns.push({ name: 'position', unit: 'count', values: counts });
    notes.push(`position in encoder counts, ${cpr} counts per revolution, rounded to the nearest count`);
  }
  if (torque !== null) columns.push({ name: 'torque', unit: 'N·m', values: noisy(torque, noise.torque) });
  if (temperature !== null) columns.push({ name: 'temperature', unit: '°C', values: noisy(temperature, noise.temperature) });
  if (jitter > 0) notes.push(`sample instants jittered with σ = ${jitter} s (clipped at ±0.45 interval); the time column holds the actual instants`);

  const truth: RecordingTruth = {
    params: p,
    experiment,
    options: { sampleRate: fs, duration, volts, noise, encoderCounts: cpr, logSpeed, timeJitter: jitter, seed },
    effects,
    model: detailed ? 'detailed-adaptive' : 'linear-exact',
    seed,
    input: { kind: experiment, description, ...(experiment === 'steady-state' ? {} : { eventTime }), levels, detail, voltage: u },
    notes,
    provenance: 'invented: generated by @motorprint/model, not measured on a real motor',
  };
  return { columns, truth };
}
