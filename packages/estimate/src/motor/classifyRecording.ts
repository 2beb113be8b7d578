import { detectEncoderSpeed } from './detectEncoderSpeed.js';
import { medianInterval } from './medianInterval.js';
import { detectVoltageSegments } from './detectVoltageSegments.js';
import { estimateNoiseLevel } from './estimateNoiseLevel.js';
import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import type { MotorExperimentKind, RecordingData } from './types.js';

/**
 * Guesses the experiment kind of a recording from its channels and the shape of its voltage,
 * and says why. Rules, in order: no speed channel (or a speed that never leaves its noise) →
 * locked-rotor; a torque channel with a mean clearly off zero → loaded; current dropping to zero
 * while the speed decays → coast-down; a piecewise-constant voltage with one change → step, with
 * levels that rise monotonically over three or more segments → steady-state, alternating between
 * two levels → prbs; otherwise → multisine (rich smooth excitation).
 *
 * @param recording - time and SI channels (a voltage — terminal, command or supply — or speed)
 * @returns the kind and a plain-words reason
 * @throws TypeError when there is neither a voltage nor a speed channel
 * @example
 * classifyRecording({ time, channels: { voltage, current } }).kind; // => 'locked-rotor'
 */
export function classifyRecording(recording: RecordingData): { kind: MotorExperimentKind; reason: string } {
  const { kind, reason } = classifyWithEncoder(recording);
  return { kind, reason };
}

/**
 * `classifyRecording`, also returning the encoder quantum of the speed channel when the rules
 * looked for one (`detectEncoderSpeed(time, speed)`, null when not an encoder speed; undefined
 * when not looked for), so that the preparation does not detect it again (internal).
 */
export function classifyWithEncoder(recording: RecordingData): { kind: MotorExperimentKind; reason: string; encoder?: number | null } {
  const { speed } = recording.channels;
  // The drive voltage: terminal, else the drive's command, else the supply.
  const voltage = recording.channels.voltage ?? recording.channels.commandVoltage ?? recording.channels.supplyVoltage;
  if (!(voltage instanceof Float64Array)) {
    if (speed instanceof Float64Array) return { kind: 'coast-down', reason: 'no voltage logged: a speed-only record can only be a coast-down (free deceleration)' };
    throw new TypeError('classifyRecording: the recording has no voltage (terminal, command or supply) and no speed');
  }
  const n = voltage.length;
  const tail = Math.max(4, Math.floor(n / 10));
  if (!(speed instanceof Float64Array)) return { kind: 'locked-rotor', reason: 'no speed channel: rotor taken as held' };
  // An encoder speed's noise is its count quantum over the interval (q/(Δt·√12)); a rotor that
  // turns shows counts, however coarse.
  const quantum = detectEncoderSpeed(recording.time, speed);
  const sw = quantum !== null ? quantum / (medianInterval(recording.time) * Math.sqrt(12)) : estimateNoiseLevel(speed).sigma;
  // (A speed shorter than the voltage reads missing samples: NaN, as the loop over n did.)
  const wmax = speed.length >= n ? largestMagnitude(speed.length === n ? speed : speed.subarray(0, n)) : NaN;
  if (wmax < 6 * sw) return { kind: 'locked-rotor', reason: `speed stays within its noise (max |ω| ${wmax.toPrecision(3)} rad/s ≤ 6σ)`, encoder: quantum };
  const kind = classifyTurning(recording, voltage, speed, n, tail, wmax);
  return { ...kind, encoder: quantum };
}

/**
 * The largest |x| of the samples, as `m = Math.max(m, |x|)` from 0 (NaN once any is NaN), through
 * the WebAssembly kernel for long series (the same value). Exported for the tests.
 */
export function largestMagnitude(x: Float64Array): number {
  const n = x.length;
  if (n >= KERNEL_MIN_LENGTH) {
    const room = sampleKernels.room(8 * n);
    if (room !== null) {
      room.f64.set(x, 0);
      return room.exports.largestMagnitude(0, n);
    }
  }
  let m = 0;
  for (let k = 0; k < n; k++) m = Math.max(m, Math.abs(x[k]!));
  return m;
}

/** The rules of `classifyRecording` for a rotor that turns. */
function classifyTurning(recording: RecordingData, voltage: Float64Array, speed: Float64Array, n: number, tail: number, wmax: number): { kind: MotorExperimentKind; reason: string } {
  const { current, torque } = recording.channels;
  if (torque instanceof Float64Array) {
    const st = estimateNoiseLevel(torque).sigma;
    let s = 0;
    for (let k = 0; k < n; k++) s += torque[k]!;
    if (Math.abs(s / n) > 6 * st / Math.sqrt(n) && Math.abs(s / n) > 0) return { kind: 'loaded', reason: 'torque channel with a non-zero mean load' };
  }
  if (current instanceof Float64Array) {
    const si = estimateNoiseLevel(current).sigma;
    let { head, end, endSq, endSpeed } = headAndEndSums(current, speed, n, tail);
    head /= tail; end /= tail; endSpeed /= tail;
    // After the cut the current stays off: not only its mean but its swing is small (a rich
    // excitation's current keeps swinging about a small mean).
    const endRms = Math.sqrt(endSq / tail);
    if (Math.abs(head) > (8 * si) / Math.sqrt(tail) && Math.abs(end) < 0.2 * Math.abs(head) && endRms < 0.2 * Math.abs(head) + 3 * si && endSpeed < 0.7 * wmax) {
      return { kind: 'coast-down', reason: 'current drops to zero while the speed decays' };
    }
  }
  const sv = estimateNoiseLevel(voltage).sigma;
  if (opensCircuit(voltage, speed, sv, wmax)) return { kind: 'coast-down', reason: 'the voltage leaves its level and then follows the speed down (open-circuit voltage Ke·ω): a coast-down' };
  const segs = detectVoltageSegments(voltage, sv);
  const q = segmentMisfit(voltage, segs);
  // (`<=`: an exact command has no noise at all, q = σ = 0.)
  const piecewise = segs.length <= n / 8 && Math.sqrt(q / n) <= 1.5 * sv;
  if (!piecewise) return { kind: 'multisine', reason: 'smooth, varying voltage (rich excitation)' };
  if (segs.length > 1) {
    if (segs.length === 2) return { kind: 'step', reason: 'voltage with one level change (a step)' };
    let rising = true;
    for (let i = 1; i < segs.length; i++) if (!(segs[i]!.level > segs[i - 1]!.level)) rising = false;
    if (rising) return { kind: 'steady-state', reason: `voltage staircase of ${segs.length} rising levels` };
    return { kind: 'prbs', reason: `piecewise-constant voltage switching ${segs.length - 1} times` };
  }
  return { kind: 'steady-state', reason: 'constant voltage throughout (one operating point)' };
}

/**
 * Σ over the segments in order of Σ (v_k − level)² over each segment's samples; through the
 * WebAssembly kernel for long series (the same operations in the same order, so the same bits).
 * Exported for the tests.
 */
export function segmentMisfit(voltage: Float64Array, segs: readonly { start: number; end: number; level: number }[], useKernel = true): number {
  const n = voltage.length;
  const inside = segs.every((s) => Number.isInteger(s.start) && Number.isInteger(s.end) && s.start >= 0 && s.end <= n);
  if (useKernel && n >= KERNEL_MIN_LENGTH && inside) {
    const room = sampleKernels.room(8 * (n + 3 * segs.length));
    if (room !== null) {
      room.f64.set(voltage, 0);
      segs.forEach((s, j) => {
        room.f64[n + 3 * j] = s.start;
        room.f64[n + 3 * j + 1] = s.end;
        room.f64[n + 3 * j + 2] = s.level;
      });
      return room.exports.segmentSquares(0, 8 * n, segs.length);
    }
  }
  let q = 0;
  for (const s of segs) for (let k = s.start; k < s.end; k++) q += (voltage[k]! - s.level) * (voltage[k]! - s.level);
  return q;
}

/**
 * The current's sum over its first `tail` samples, and over its last `tail` samples the current's
 * sum and sum of squares and the speed's sum of magnitudes (samples before n; missing ones read
 * NaN); through the kernel for long series (the same bits). Exported for the tests.
 */
export function headAndEndSums(current: Float64Array, speed: Float64Array, n: number, tail: number, useKernel = true): { head: number; end: number; endSq: number; endSpeed: number } {
  if (useKernel && tail >= KERNEL_MIN_LENGTH && Number.isInteger(tail) && tail <= n && current.length >= n && speed.length >= n) {
    const room = sampleKernels.room(8 * (3 * tail + 3));
    if (room !== null) {
      const { f64, exports: k } = room;
      f64.set(current.subarray(0, tail), 0);
      k.endSums(0, 0, tail, 8 * 3 * tail);
      const head = f64[3 * tail]!;
      f64.set(current.subarray(n - tail, n), 0);
      f64.set(speed.subarray(n - tail, n), tail);
      k.endSums(0, 8 * tail, tail, 8 * 3 * tail);
      return { head, end: f64[3 * tail]!, endSq: f64[3 * tail + 1]!, endSpeed: f64[3 * tail + 2]! };
    }
  }
  let head = 0, end = 0, endSq = 0, endSpeed = 0;
  for (let k = 0; k < tail; k++) head += current[k]!;
  for (let k = n - tail; k < n; k++) { end += current[k]!; endSq += current[k]! * current[k]!; endSpeed += Math.abs(speed[k]!); }
  return { head, end, endSq, endSpeed };
}

/**
 * A coast-down logged without current: the drive voltage holds a level, then (circuit open) the
 * terminals show Ke·ω, so v/ω stays nearly constant (coefficient of variation below 5 %) while
 * the speed falls to under half its value at the cut.
 */
function opensCircuit(voltage: Float64Array, speed: Float64Array, sv: number, wmax: number): boolean {
  const n = voltage.length;
  // The early level from the first 0.5 % of the record (the cut may come early).
  const head = Math.max(5, Math.floor(n / 200));
  const sorted = Float64Array.from(voltage.subarray(0, head)).sort();
  const v0 = sorted[head >> 1]!;
  let k1 = -1;
  const band = 6 * Math.max(sv, 1e-12);
  for (let k = 1; k + 3 < n; k++) {
    if (Math.abs(voltage[k]! - v0) > band && Math.abs(voltage[k + 1]! - v0) > band && Math.abs(voltage[k + 2]! - v0) > band) { k1 = k; break; }
  }
  if (k1 < 4 || k1 > n - 16) return false;
  // The speed must fall to under half its value at the cut (checked first: it needs 4 samples,
  // the ratio below needs them all).
  let tail = 0;
  for (let k = n - 4; k < n; k++) tail += Math.abs(speed[k]!);
  if (!(tail / 4 < 0.5 * Math.abs(speed[k1]!))) return false;
  let s = 0, q = 0, m = 0;
  for (let k = k1; k < n; k++) {
    if (Math.abs(speed[k]!) < 0.1 * wmax) continue;
    const r = voltage[k]! / speed[k]!;
    s += r; q += r * r; m++;
  }
  if (m < 8) return false;
  const mean = s / m, sd = Math.sqrt(Math.max(q / m - mean * mean, 0));
  return mean > 0 && sd < 0.05 * mean;
}
