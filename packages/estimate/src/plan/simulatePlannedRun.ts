import { checkMotorParams, createRandom, multisineShape, prbsBits, simulateHybrid } from '@motorprint/model';
import type { DetailedParams, MotorParams } from '@motorprint/model';
import type { MotorChannel } from '../motor/types.js';
import { resolveRun } from './resolveRun.js';
import type { PlannedRecording, PlannedRun, PlanOptions, ResolvedRun } from './types.js';

/**
 * Simulates one planned bench run with the model package's simulator and adds its measurement
 * noise (and quantisation): the recording the plan expects, for checking a plan by fitting
 * seeded repeats of it.
 *
 * Inputs as the recording generator plays them: 10 % pre-trigger baseline at the first level,
 * then the step (locked-rotor with the rotor held; loaded against a constant load torque with a
 * torque channel), the staircase (no baseline), the 9-bit PRBS between the two levels, the
 * multisine (31 harmonics of 1/duration, Schroeder phases), or the coast-down (driven plateau from
 * the running steady state, the armature opened at 10 %; the voltage column then shows the
 * back-EMF; `voltage: false` logs the speed alone).
 *
 * @param draft - motor constants [SI]
 * @param run - the planned run (defaults as in {@link PlannedRun})
 * @param seed - seed of the noise (an integer)
 * @param options - plan-wide volts and noise (as `planExperiments` takes them)
 * @returns `{ recording, kind, name, command }`, ready for `fitMotor`
 * @throws TypeError / RangeError naming the bad field
 * @example
 * const r = simulatePlannedRun(draft, { kind: 'step', noise: { current: 0.02, speed: 0.3 } }, 7);
 * fitMotor([r]);
 */
export function simulatePlannedRun(draft: MotorParams, run: PlannedRun, seed: number, options: PlanOptions = {}): PlannedRecording {
  const fn = 'simulatePlannedRun';
  checkMotorParams(fn, draft);
  if (!Number.isInteger(seed)) throw new RangeError(`${fn}: seed must be an integer (got ${String(seed)})`);
  return simulateResolved(draft, resolveRun(fn, draft, run, 0, options), seed, 'all');
}

/**
 * The simulation of a resolved run. `noisy`: `all` adds every channel's noise; `voltage` adds it
 * to the voltage (and a loaded run's torque) only (the planning runs: the fit then rebuilds the command as it would, while
 * the outputs stay at the model).
 */
export function simulateResolved(draft: MotorParams, r: ResolvedRun, seed: number, noisy: 'all' | 'voltage'): PlannedRecording {
  const fs = r.sampleRate;
  const dt = 1 / fs;
  const n = Math.floor(r.duration * fs + 1e-9) + 1;
  const time = Float64Array.from({ length: n }, (_, k) => k * dt);
  const u = new Float64Array(n);
  const event = r.kind === 'steady-state' ? 0 : Math.round(0.1 * r.duration * fs) * dt;
  const lv = r.levels;
  switch (r.kind) {
    case 'steady-state': {
      const dwell = r.duration / lv.length;
      for (let k = 0; k < n; k++) u[k] = lv[Math.min(lv.length - 1, Math.floor(time[k]! / dwell))]!;
      break;
    }
    case 'prbs': {
      const bit = r.bitTime!;
      const bits = prbsBits(Math.ceil(r.duration / bit) + 2);
      for (let k = 0; k < n; k++) u[k] = time[k]! < event ? lv[0]! : bits[Math.floor((time[k]! - event) / bit)] ? lv[1]! : lv[0]!;
      break;
    }
    case 'multisine': {
      const shape = multisineShape(time, r.duration);
      for (let k = 0; k < n; k++) u[k] = lv[0]! + lv[1]! * shape[k]!;
      break;
    }
    case 'coast-down': u.fill(lv[0]!); break;
    default: for (let k = 0; k < n; k++) u[k] = time[k]! < event ? lv[0]! : lv[1]!;
  }
  const params: DetailedParams = { ...draft, ...(r.loadTorque !== null ? { loadTorque: r.loadTorque } : {}) };
  const tr = simulateHybrid(params, {
    time, input: u,
    ...(r.kind === 'locked-rotor' ? { rotor: 'held' as const } : {}),
    ...(r.kind === 'coast-down' ? { openFrom: event, initial: 'steady' as const } : {}),
  });
  const rng = createRandom(seed);
  const add = (x: Float64Array, sigma: number, q: number, on: boolean): Float64Array => {
    const out = x.slice();
    if (!on) return out;
    for (let k = 0; k < n; k++) {
      let v = out[k]! + (sigma > 0 ? sigma * rng.normal() : 0);
      if (q > 0) v = q * Math.round(v / q);
      out[k] = v;
    }
    return out;
  };
  const all = noisy === 'all';
  const channels: Partial<Record<MotorChannel, Float64Array>> = {};
  if (r.voltage) {
    channels.voltage = add(tr.terminalVoltage, r.noise.voltage, r.resolution.voltage, true);
    channels.current = add(tr.current, r.noise.current, r.resolution.current, all);
  }
  if (r.kind !== 'locked-rotor') {
    if (r.encoderCounts !== null) {
      // Speed from encoder count differences (backward difference; the first sample is 0).
      const q = (2 * Math.PI) / r.encoderCounts;
      const w = new Float64Array(n);
      let prev = Math.round(tr.position[0]! / q);
      for (let k = 1; k < n; k++) { const c = Math.round(tr.position[k]! / q); w[k] = ((c - prev) * q) / dt; prev = c; }
      // Quantised in the planning runs too: the fit recognises an encoder speed by its steps and fits its angle.
      channels.speed = w;
    } else channels.speed = add(tr.speed, r.noise.speed, r.resolution.speed, all);
  }
  // The torque of a loaded run keeps its noise in the planning runs too: like the voltage, it gives
  // the rows of a nuisance (the load level).
  if (r.kind === 'loaded') channels.torque = add(new Float64Array(n).fill(r.loadTorque!), r.noise.torque, 0, true);
  return { recording: { time, channels }, kind: r.kind, name: r.name, command: u };
}
