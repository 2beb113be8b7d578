import { detectVoltageSegments } from './detectVoltageSegments.js';
import { estimateNoiseLevel } from './estimateNoiseLevel.js';
import type { MotorExperimentKind, RecordingData } from './types.js';

/**
 * Guesses the experiment kind of a recording from its channels and the shape of its voltage,
 * and says why. Rules, in order: no speed channel (or a speed that never leaves its noise) →
 * locked-rotor; a torque channel with a mean clearly off zero → loaded; current dropping to zero
 * while the speed decays → coast-down; a piecewise-constant voltage with one change → step, with
 * levels that rise monotonically over three or more segments → steady-state, alternating between
 * two levels → prbs; otherwise → multisine (rich smooth excitation).
 *
 * @param recording - time and SI channels (voltage required)
 * @returns the kind and a plain-words reason
 * @throws TypeError when the voltage channel is missing
 * @example
 * classifyRecording({ time, channels: { voltage, current } }).kind; // => 'locked-rotor'
 */
export function classifyRecording(recording: RecordingData): { kind: MotorExperimentKind; reason: string } {
  const { voltage, current, speed, torque } = recording.channels;
  if (!(voltage instanceof Float64Array)) throw new TypeError('classifyRecording: recording.channels.voltage is missing');
  const n = voltage.length;
  const tail = Math.max(4, Math.floor(n / 10));
  if (!(speed instanceof Float64Array)) return { kind: 'locked-rotor', reason: 'no speed channel: rotor taken as held' };
  const sw = estimateNoiseLevel(speed).sigma;
  let wmax = 0;
  for (let k = 0; k < n; k++) wmax = Math.max(wmax, Math.abs(speed[k]!));
  if (wmax < 6 * sw) return { kind: 'locked-rotor', reason: `speed stays within its noise (max |ω| ${wmax.toPrecision(3)} rad/s ≤ 6σ)` };
  if (torque instanceof Float64Array) {
    const st = estimateNoiseLevel(torque).sigma;
    let s = 0;
    for (let k = 0; k < n; k++) s += torque[k]!;
    if (Math.abs(s / n) > 6 * st / Math.sqrt(n) && Math.abs(s / n) > 0) return { kind: 'loaded', reason: 'torque channel with a non-zero mean load' };
  }
  if (current instanceof Float64Array) {
    const si = estimateNoiseLevel(current).sigma;
    let head = 0, end = 0, endSpeed = 0;
    for (let k = 0; k < tail; k++) head += current[k]!;
    for (let k = n - tail; k < n; k++) { end += current[k]!; endSpeed += Math.abs(speed[k]!); }
    head /= tail; end /= tail; endSpeed /= tail;
    if (Math.abs(head) > (8 * si) / Math.sqrt(tail) && Math.abs(end) < 0.2 * Math.abs(head) && endSpeed < 0.7 * wmax) {
      return { kind: 'coast-down', reason: 'current drops to zero while the speed decays' };
    }
  }
  const sv = estimateNoiseLevel(voltage).sigma;
  const segs = detectVoltageSegments(voltage, sv);
  let q = 0;
  for (const s of segs) for (let k = s.start; k < s.end; k++) q += (voltage[k]! - s.level) * (voltage[k]! - s.level);
  const piecewise = segs.length <= n / 8 && Math.sqrt(q / n) < 1.5 * sv;
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
