import type { MotorParams } from '@motorprint/model';
import type { PlannedNoise, PlannedRun, PlanOptions, ResolvedRun } from './types.js';

const KINDS = ['locked-rotor', 'step', 'coast-down', 'steady-state', 'prbs', 'multisine', 'loaded'] as const;

/** τe = L/R and τm = J·R/(R·b + Kt·Ke) of a draft [s]. */
export function timeConstantsOf(p: MotorParams): { electrical: number; mechanical: number } {
  return { electrical: p.L / p.R, mechanical: (p.J * p.R) / (p.R * p.b + p.Kt * p.Ke) };
}

/**
 * A planned run with its defaults filled in (the recording generator's: 10 kHz, 10 % pre-trigger
 * baseline, lengths from τe and τm), checked. Messages name `runs[i].field`.
 *
 * @param fn - the public function, for messages
 * @param draft - draft constants
 * @param run - the planned run
 * @param index - its position (messages, default name)
 * @param options - plan-wide volts and noise
 * @returns the resolved run
 * @throws TypeError / RangeError naming the field
 */
export function resolveRun(fn: string, draft: MotorParams, run: PlannedRun, index: number, options: PlanOptions): ResolvedRun {
  const where = `${fn}: runs[${index}]`;
  if (run === null || typeof run !== 'object') throw new TypeError(`${where} must be an object { kind, … }`);
  if (!(KINDS as readonly string[]).includes(run.kind)) throw new RangeError(`${where}.kind must be one of ${KINDS.join(', ')} (got ${JSON.stringify(run.kind)})`);
  const num = (field: string, v: unknown, test: (x: number) => boolean, rule: string): number => {
    if (typeof v !== 'number' || !Number.isFinite(v) || !test(v)) throw new RangeError(`${where}.${field} must be ${rule} (got ${String(v)})`);
    return v;
  };
  const volts = options.volts ?? 12;
  const { electrical: te, mechanical: tm } = timeConstantsOf(draft);
  const fs = run.sampleRate === undefined ? 10000 : num('sampleRate', run.sampleRate, (x) => x > 0, 'a finite number > 0');
  const dt = 1 / fs;
  const kind = run.kind;
  let duration: number;
  if (run.duration !== undefined) duration = num('duration', run.duration, (x) => x > 0, 'a finite number > 0');
  else {
    switch (kind) {
      case 'locked-rotor': duration = (12 * te) / 0.9; break;
      case 'step': case 'loaded': duration = (6 * tm) / 0.9; break;
      case 'coast-down': duration = (6 * draft.J) / Math.max(draft.b, 1e-300) / 0.9; break;
      case 'steady-state': duration = 5 * Math.max(6 * tm, 0.05); break;
      case 'prbs': duration = 255 * Math.max(Math.round((0.5 * tm) / dt), 1) * dt / 0.9; break;
      default: duration = 20 * tm;
    }
  }
  const n = Math.floor(duration * fs + 1e-9) + 1;
  if (n < 32) throw new RangeError(`${where}: duration ${duration} s at ${fs} Hz gives ${n} samples; at least 32 are needed`);
  if (n > 4e6) throw new RangeError(`${where}: duration ${duration} s at ${fs} Hz gives ${n} samples; the limit is 4e6`);
  let levels: number[];
  if (run.levels !== undefined) {
    if (!Array.isArray(run.levels) || run.levels.length === 0) throw new TypeError(`${where}.levels must be a non-empty array of numbers [V]`);
    levels = run.levels.map((v, j) => num(`levels[${j}]`, v, () => true, 'a finite number'));
  } else {
    switch (kind) {
      case 'steady-state': levels = [1, 2, 3, 4, 5].map((j) => (volts * j) / 5); break;
      case 'prbs': levels = [0.5 * volts, volts]; break;
      case 'multisine': levels = [0.5 * volts, 0.45 * volts]; break;
      case 'coast-down': levels = [volts]; break;
      default: levels = [0, volts];
    }
  }
  const need = kind === 'coast-down' ? 1 : kind === 'steady-state' ? 2 : 2;
  if (levels.length < need) throw new RangeError(`${where}.levels must hold at least ${need} level(s) for a ${kind} run (got ${levels.length})`);
  if (kind !== 'steady-state' && kind !== 'coast-down' && levels.length !== 2) throw new RangeError(`${where}.levels must hold 2 levels for a ${kind} run (got ${levels.length})`);
  let bitTime: number | null = null;
  if (kind === 'prbs') {
    bitTime = run.bitTime === undefined ? Math.max(Math.round((0.5 * tm) / dt), 1) * dt : num('bitTime', run.bitTime, (x) => x >= dt, `at least one sample (${dt} s)`);
  } else if (run.bitTime !== undefined) throw new RangeError(`${where}.bitTime applies to prbs runs only (this one is ${kind})`);
  if (run.noise !== undefined && (run.noise === null || typeof run.noise !== 'object')) throw new TypeError(`${where}.noise must be an object { voltage?, current?, speed?, torque? }`);
  // Per channel: the run's own noise, else the plan-wide one.
  const noiseIn: PlannedNoise = { ...(options.noise ?? {}), ...(run.noise ?? {}) };
  const noise: Required<PlannedNoise> = { voltage: 0, current: 0, speed: 0, torque: 0 };
  for (const k of Object.keys(noiseIn)) {
    if (!(k in noise)) throw new TypeError(`${where}.noise.${k} is not a channel (voltage, current, speed, torque)`);
    noise[k as keyof PlannedNoise] = num(`noise.${k}`, noiseIn[k as keyof PlannedNoise], (x) => x >= 0, 'a finite number >= 0');
  }
  const resIn = run.resolution ?? {};
  const resolution = { voltage: 0, current: 0, speed: 0 };
  for (const k of Object.keys(resIn)) {
    if (!(k in resolution)) throw new TypeError(`${where}.resolution.${k} is not a channel (voltage, current, speed)`);
    resolution[k as keyof typeof resolution] = num(`resolution.${k}`, resIn[k as keyof typeof resIn], (x) => x >= 0, 'a finite number >= 0');
  }
  const encoderCounts = run.encoderCounts === undefined ? null : num('encoderCounts', run.encoderCounts, (x) => Number.isInteger(x) && x > 0, 'an integer > 0');
  const voltage = run.voltage ?? true;
  if (typeof voltage !== 'boolean') throw new TypeError(`${where}.voltage must be a boolean`);
  if (!voltage && kind !== 'coast-down') throw new RangeError(`${where}.voltage: only a coast-down can be planned without the voltage (this one is ${kind})`);
  const loadTorque = kind === 'loaded'
    ? (run.loadTorque === undefined ? (0.25 * draft.Kt * Math.max(...levels.map(Math.abs))) / draft.R : num('loadTorque', run.loadTorque, () => true, 'a finite number'))
    : null;
  const q12 = (s: number, q: number): number => Math.hypot(s, q / Math.sqrt(12));
  const sigma = {
    voltage: q12(noise.voltage, resolution.voltage),
    current: q12(noise.current, resolution.current),
    speed: q12(noise.speed, resolution.speed),
    angle: encoderCounts === null ? null : (2 * Math.PI) / encoderCounts / Math.sqrt(12),
    torque: noise.torque,
  };
  const logsCurrent = kind === 'coast-down' ? voltage : true;
  const logsSpeed = kind !== 'locked-rotor';
  if ((!logsCurrent || !(sigma.current > 0)) && (!logsSpeed || !((sigma.angle ?? sigma.speed) > 0))) {
    throw new RangeError(`${where}: give the noise or resolution of the ${logsSpeed ? 'current or speed' : 'current'} (noise.current, noise.speed, resolution.current, resolution.speed or encoderCounts); without it there is no information to predict`);
  }
  if (logsCurrent && !(sigma.current > 0) && kind !== 'coast-down') throw new RangeError(`${where}: noise.current (or resolution.current) must be > 0: the fit weighs the current by its noise`);
  if (logsSpeed && !((sigma.angle ?? sigma.speed) > 0)) throw new RangeError(`${where}: noise.speed (or resolution.speed, encoderCounts) must be > 0: the fit weighs the speed by its noise`);
  if (kind === 'loaded' && !(sigma.torque > 0)) throw new RangeError(`${where}: noise.torque must be > 0 for a loaded run`);
  return {
    kind, name: run.name ?? `${kind} ${index + 1}`, duration, sampleRate: fs, levels, bitTime, noise, resolution, encoderCounts, voltage,
    loadTorque, sigma,
  };
}
