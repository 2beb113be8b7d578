import { detectEncoderSpeed, selectKth } from '@motorprint/estimate';
import { checkRecording, noiseLevel, noiseOf, sig } from './internal.js';
import { channelScan, plateauScan } from './passes.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for limits the linear model does not have: clipped or railed samples (`clipped-samples`)
 * and a drive at its voltage or current limit (`drive-saturation`).
 *
 * ## Method
 * - Clipped: on a channel with noise (σ > 0 by `estimateNoiseLevel`), at least 5 samples and
 *   0.2 % of the record on runs of its extreme value that the signal reaches still moving towards
 *   it (a slope above 2σ per sample that, carried on, would pass the rail by more than 4σ), or runs
 *   longer than the noise could hold one value. A quantised signal repeats its extreme codes
 *   without that: repeats alone are not clipping.
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
  const { n } = checkRecording(fn, recording);
  const cmd = options.commandedVoltage;
  if (cmd !== undefined && (!(cmd instanceof Float64Array) || cmd.length !== n)) throw new TypeError(`${fn}: options.commandedVoltage must be a Float64Array of length ${n}`);
  const out: Finding[] = [];
  for (const name of ['voltage', 'current', 'speed', 'torque'] as const) {
    const x = recording.channels[name];
    if (!x || n < 20) continue;
    const lvl = noiseLevel(x);
    const sigma = lvl.sigma;
    if (!(sigma > 0)) continue;
    const scan = channelScan(x);
    const { min, max } = scan;
    // An encoder speed repeats its codes by construction (a slow rotor reads 0 between counts):
    // only a rail the speed arrives at while moving counts there, not a long run.
    const encoder = name === 'speed' && detectEncoderSpeed(recording.time, x) !== null;
    const longest = encoder ? Infinity : improbableRun(sigma, lvl.quantum ?? 0, n);
    // On a quantised channel (an encoder speed, a quiet ADC) an exponential approach to a plateau
    // lands on its last code still stepping by a code or so per sample: movement means more than
    // two codes per sample.
    const step = Math.max(2 * sigma, 2 * (lvl.quantum ?? 0));
    // Exactly zero speed or current is a rotor at rest or an open circuit, not a rail.
    const railAt = (v: number, side: 1 | -1): number => (v === 0 && (name === 'speed' || name === 'current') ? 0 : scan.pinned(v, side, { sigma, longest, minSlope: step }));
    const pinned = { max: railAt(max, 1), min: railAt(min, -1) };
    const worst = Math.max(pinned.max, pinned.min);
    if (worst >= 5 && worst >= 0.002 * n) {
      out.push({
        code: 'clipped-samples', severity: 'problem', title: `The ${name} channel is clipped at a rail`,
        evidence: { channel: name, 'samples pinned at the maximum': pinned.max, 'samples pinned at the minimum': pinned.min, maximum: sig(max), minimum: sig(min), 'noise SD': sig(sigma), samples: n },
        advice: `The ${name} ran into a rail: it arrives at its extreme value still moving and stays there exactly. Re-record with more range, or leave the clipped stretch out of the fit.`,
      });
    }
  }
  const { current, speed, voltage } = recording.channels;
  if (current && speed && n >= 400) {
    // Plateau level: the 98th percentile of |i| (robust against single noisy maxima).
    const sI = noiseOf(current);
    const sW = noiseOf(speed);
    // (By selection: the recording was checked finite, and |i| has no −0, so the value is the
    // sorted array's.)
    const plateau = plateauScan(current, speed);
    const top = selectKth(plateau.magnitude, Math.floor(0.98 * (n - 1)));
    // Longest contiguous run on the plateau (a transient peak does not make a long run).
    const { count, wLo, wHi } = plateau.run(top - 4 * sI);
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

/**
 * The run of one repeated value that noise makes improbable (below 1e-4/n anywhere in the
 * record): with analog noise σa = √(σ² − q²/12) on a grid of step q, a sample stays on its code
 * with probability at most erf(q/(2√2·σa)); exact repeats need no grid (q = 0: any run of 3). A
 * signal quieter than a tenth of a code sits on one code by nature: Infinity.
 */
function improbableRun(sigma: number, q: number, n: number): number {
  if (!(q > 0)) return 3;
  const sa = Math.sqrt(Math.max(sigma * sigma - (q * q) / 12, 0));
  if (sa < 0.1 * q) return Infinity;
  const stay = erf(q / (2 * Math.SQRT2 * sa));
  return Math.max(3, Math.ceil(Math.log(1e-4 / n) / Math.log(stay)));
}

/** Error function (Abramowitz & Stegun 7.1.26, |error| < 1.5e-7). */
function erf(x: number): number {
  const t = 1 / (1 + 0.3275911 * Math.abs(x));
  const y = 1 - (((((1.061405429 * t - 1.453152027) * t) + 1.421413741) * t - 0.284496736) * t + 0.254829592) * t * Math.exp(-x * x);
  return x >= 0 ? y : -y;
}
