import { checkRecording, noiseOf, sig } from './internal.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for limits the linear model does not have: clipped or railed samples (`clipped-samples`)
 * and a drive at its voltage or current limit (`drive-saturation`).
 *
 * ## Method
 * - Clipped: on a channel with noise (σ > 0 by `estimateNoiseLevel`), its extreme value repeated
 *   exactly in at least 5 samples and 0.2 % of the record (noise makes exact repeats of the
 *   maximum improbable; a rail makes them common).
 * - Current limit: the current stays within 4 noise SDs of its plateau level (98th percentile
 *   of |i|) for a contiguous 3 % of the record while the speed changes by more than 20 speed-noise
 *   SDs — the rotor accelerates at constant current, which the linear model only does at a limit.
 * - Voltage limit (only with `commandedVoltage`): at least 1 % of samples fall short of the
 *   command by more than 5 σ and sit within 3 σ of a common ceiling.
 *
 * @param recording - `{ time [s], channels }` in SI
 * @param options - `commandedVoltage` [V] per sample when the command is known
 * @returns the findings that fired
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectSaturation(stepAtCurrentLimit).map((f) => f.code); // => ['drive-saturation']
 */
export function detectSaturation(recording: RecordingLike, options: { commandedVoltage?: Float64Array } = {}): Finding[] {
  const fn = 'detectSaturation';
  const { n, dt } = checkRecording(fn, recording);
  const cmd = options.commandedVoltage;
  if (cmd !== undefined && (!(cmd instanceof Float64Array) || cmd.length !== n)) throw new TypeError(`${fn}: options.commandedVoltage must be a Float64Array of length ${n}`);
  const out: Finding[] = [];
  for (const name of ['voltage', 'current', 'speed', 'torque'] as const) {
    const x = recording.channels[name];
    if (!x || n < 20 || !(noiseOf(x) > 0)) continue;
    let max = -Infinity, min = Infinity;
    for (let k = 0; k < n; k++) { if (x[k]! > max) max = x[k]!; if (x[k]! < min) min = x[k]!; }
    let atMax = 0, atMin = 0;
    for (let k = 0; k < n; k++) { if (x[k] === max) atMax++; if (x[k] === min) atMin++; }
    const worst = Math.max(atMax, atMin);
    if (worst >= 5 && worst >= 0.002 * n) {
      out.push({
        code: 'clipped-samples', severity: 'problem', title: `The ${name} channel is clipped at a rail`,
        evidence: { channel: name, 'samples at the maximum': atMax, 'samples at the minimum': atMin, maximum: sig(max), minimum: sig(min), samples: n },
        advice: `Repeated identical extreme values on a noisy channel mean the logger or sensor saturated: re-record with more range, or exclude the clipped samples from the fit.`,
      });
    }
  }
  const { current, speed, voltage } = recording.channels;
  if (current && speed && n >= 400) {
    // Plateau level: the 98th percentile of |i| (robust against single noisy maxima).
    const sI = noiseOf(current);
    const sW = noiseOf(speed);
    const mag = Float64Array.from(current, Math.abs).sort();
    const top = mag[Math.floor(0.98 * (n - 1))]!;
    // Longest contiguous run on the plateau (a transient peak does not make a long run).
    let count = 0, wLo = Infinity, wHi = -Infinity, run = 0, lo = Infinity, hi = -Infinity;
    for (let k = 0; k < n; k++) {
      if (Math.abs(current[k]!) >= top - 4 * sI) {
        run++;
        if (speed[k]! < lo) lo = speed[k]!;
        if (speed[k]! > hi) hi = speed[k]!;
        if (run > count) { count = run; wLo = lo; wHi = hi; }
      } else {
        run = 0; lo = Infinity; hi = -Infinity;
      }
    }
    if (count >= Math.max(20, 0.03 * n) && wHi - wLo > 20 * Math.max(sW, 1e-12) && top > 20 * sI) {
      out.push({
        code: 'drive-saturation', severity: 'warning', title: 'Current flat-topped while the rotor accelerates: drive current limit',
        evidence: { 'current plateau [A]': sig(top), 'samples on the plateau': count, 'speed change on the plateau [rad/s]': sig(wHi - wLo) },
        advice: 'The drive limited the current: the linear model cannot follow that stretch. Fit only where the current is below the limit, or use a smaller step.',
      });
    }
  }
  if (cmd && voltage) {
    const sV = noiseOf(voltage);
    let short = 0, ceil = -Infinity;
    for (let k = 0; k < n; k++) if (cmd[k]! - voltage[k]! > 5 * sV) { short++; if (voltage[k]! > ceil) ceil = voltage[k]!; }
    let near = 0;
    for (let k = 0; k < n; k++) if (cmd[k]! - voltage[k]! > 5 * sV && voltage[k]! > ceil - 6 * sV) near++;
    if (short >= 0.01 * n && near >= 0.8 * short) {
      out.push({
        code: 'drive-saturation', severity: 'warning', title: 'Voltage flat-topped below the command: drive voltage limit',
        evidence: { 'voltage ceiling [V]': sig(ceil), 'samples short of the command': short },
        advice: 'The drive could not deliver the commanded voltage: fit with the measured voltage, or lower the command below the supply limit.',
      });
    }
  }
  return out;
}
