import { checkRecording, sig } from './internal.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for a sample rate too low for the electrical time constant (`slow-sampling`):
 * τe = L/R < 2·dt, so the current settles between samples and L cannot be estimated.
 *
 * ## Method
 * τe is taken from `electricalTimeConstant` when given. Otherwise, on a recording with a voltage
 * step from rest and current, from the first sample after the step: for a first-order rise
 * i(dt)/i_final = 1 − e^{−dt/τe}, so τe = −dt/ln(1 − f) with i_final the largest 3-point-averaged level
 * after the step (f ≥ 1 means the current settled within one sample: τe ≈ 0).
 *
 * @param recording - `{ time [s], channels }` in SI
 * @param options - `electricalTimeConstant` τe [s] when known
 * @returns the finding, or null (also when τe cannot be estimated)
 * @throws TypeError / RangeError for a malformed recording or τe ≤ 0
 * @example
 * detectSlowSampling(lockedRotorAt1kHz)?.code; // => 'slow-sampling' for τe = 0.5 ms
 */
export function detectSlowSampling(recording: RecordingLike, options: { electricalTimeConstant?: number } = {}): Finding | null {
  const fn = 'detectSlowSampling';
  const { n, dt } = checkRecording(fn, recording);
  let tauE = options.electricalTimeConstant;
  if (tauE !== undefined && (!(tauE > 0) || !Number.isFinite(tauE))) throw new RangeError(`${fn}: options.electricalTimeConstant must be > 0 (got ${tauE})`);
  let source = 'given';
  if (tauE === undefined) {
    const { voltage, current } = recording.channels;
    if (!voltage || !current || n < 50) return null;
    let vmax = 0;
    for (let k = 0; k < n; k++) if (Math.abs(voltage[k]!) > vmax) vmax = Math.abs(voltage[k]!);
    let k0 = -1;
    for (let k = 1; k < n; k++) {
      if (Math.abs(voltage[k - 1]!) < 0.1 * vmax && Math.abs(voltage[k]!) > 0.5 * vmax) { k0 = k; break; }
    }
    if (k0 < 1 || k0 + 3 >= n) return null;
    const base = current[k0 - 1]!;
    const span = n - k0;
    let peak = 0;
    for (let k = k0; k < Math.min(n, k0 + span); k++) {
      // 3-point average against noise.
      const v = (current[k - 1]! + current[k]! + current[Math.min(k + 1, n - 1)]!) / 3 - base;
      if (Math.abs(v) > Math.abs(peak)) peak = v;
    }
    if (!(Math.abs(peak) > 0)) return null;
    // First sample where the held voltage has acted for a full interval: the step shows at k0, so k0 + 1.
    const f = (current[k0 + 1]! - base) / peak;
    tauE = f >= 1 ? 0 : f <= 0 ? Infinity : -dt / Math.log(1 - f);
    source = 'estimated from the current rise after the voltage step';
  }
  if (!(tauE < 2 * dt)) return null;
  return {
    code: 'slow-sampling', severity: 'warning', title: 'Sampled too slowly for the electrical time constant',
    evidence: { 'τe [s]': sig(tauE), 'sample interval dt [s]': sig(dt), 'τe source': source },
    advice: `The current settles within ${tauE === 0 ? 'one sample' : `${sig(tauE / dt)} samples`}: L is not informed by this record. Record a locked-rotor step at ≥ 10 samples per τe (here ≥ ${sig(10 / Math.max(tauE, dt / 20))} Hz).`,
  };
}
