import { checkRecording, sig } from './internal.js';
import { laggedSumsInto } from './laggedSums.js';
import { increments } from './passes.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for an unmodelled delay (`input-delay`) between the voltage and the current channel.
 *
 * ## Method
 * Cross-correlation of the voltage increments Δv with the current increments Δi at lags 0…m
 * (m = 20). Through the armature, L·di/dt = v − R·i − Ke·ω, a voltage change shows in the current
 * at the next sample under a zero-order hold (lag 1) and decays from there; a peak at lag ≥ 2
 * that is at least twice the lag-1 value and beyond the ±4/√n band means the current lags the
 * voltage by (peak − 1) samples more than the model assumes (logger skew, drive dead time).
 * (On a fit's residuals `diagnoseFit` reports the same question through the residual statistics.)
 *
 * @param recording - `{ time [s], channels }` with voltage and current
 * @returns the finding, or null
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectInputDelay(currentShiftedBy3Samples)?.evidence['delay [samples]']; // => 3
 */
export function detectInputDelay(recording: RecordingLike): Finding | null {
  const { n, dt } = checkRecording('detectInputDelay', recording);
  const { voltage, current } = recording.channels;
  if (!voltage || !current || n < 100) return null;
  const m = 20;
  const { da: dv, db: di, aa: vv, bb: ii } = increments(voltage, current);
  if (!(vv > 0 && ii > 0)) return null;
  const norm = Math.sqrt(vv * ii);
  // c(ℓ) = Σ_k dv[k]·di[k + ℓ] / norm, every lag summed in order of k (in one sweep for eight lags).
  const c = laggedSumsInto(new Float64Array(m + 1), dv, di, 0, n - 1, 0, m);
  for (let lag = 0; lag <= m; lag++) c[lag] = c[lag]! / norm;
  let best = 0;
  for (let lag = 1; lag <= m; lag++) if (Math.abs(c[lag]!) > Math.abs(c[best]!)) best = lag;
  const band = 4 / Math.sqrt(n - 1);
  if (best < 2 || !(Math.abs(c[best]!) > band) || !(Math.abs(c[best]!) > 2 * Math.abs(c[1]!))) return null;
  return {
    code: 'input-delay', severity: 'warning', title: 'The current responds to the voltage later than the model assumes',
    evidence: { 'delay [samples]': best - 1, 'delay [s]': sig((best - 1) * dt), 'peak correlation': sig(c[best]!), 'lag-1 correlation': sig(c[1]!) },
    advice: 'Align the channels (logger skew) or add the delay to the model before fitting; a delay biases L and the mechanical constants.',
  };
}
