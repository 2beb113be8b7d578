import { copperResistance } from '@motorprint/model';
import { checkRecording, noiseOf, sig } from './internal.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for winding heating (`winding-heating`) in a long locked-rotor or slowly varying record:
 * R estimated from an early and a late window differ beyond their intervals; with a temperature
 * channel the change is compared with the copper law.
 *
 * ## Method
 * Windows: the first and last fifth of the energised samples (|v| above 10 % of its peak), each
 * after the first 5 % (electrical transient). R = mean(v)/mean(i) per window (rotor still: no
 * back-EMF; `speed` must stay within 3 noise SDs of 0 when logged); SE by the delta method from the
 * channel noise and the window length. Fire when |R_late − R_early| > 4·√(SE₁² + SE₂²) and the
 * change exceeds 0.5 %. With temperature: predicted R_late = R_early·(234.5 + θ_late)/(234.5 +
 * θ_early) (FACTS.md §3, IEEE Std 113 form) is reported beside the measured value.
 *
 * ## References
 * Copper temperature law with k = 234.5 °C: IEEE Std 113 (DC machines), see FACTS.md §3.
 *
 * @param recording - `{ time [s], channels }` with voltage and current (and temperature [°C])
 * @returns the finding, or null
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectWindingHeating(longLockedRotor)?.evidence['R change [%]']; // ≈ 18
 */
export function detectWindingHeating(recording: RecordingLike): Finding | null {
  const { n } = checkRecording('detectWindingHeating', recording);
  const { voltage, current, speed, temperature } = recording.channels;
  if (!voltage || !current || n < 200) return null;
  if (speed) {
    const sW = noiseOf(speed);
    let mean = 0;
    for (let k = 0; k < n; k++) mean += Math.abs(speed[k]!);
    if (mean / n > 3 * Math.max(sW, 1e-12)) return null;
  }
  let vmax = 0;
  for (let k = 0; k < n; k++) if (Math.abs(voltage[k]!) > vmax) vmax = Math.abs(voltage[k]!);
  const on: number[] = [];
  for (let k = 0; k < n; k++) if (Math.abs(voltage[k]!) > 0.1 * vmax) on.push(k);
  const m = on.length;
  if (m < 200) return null;
  const skip = Math.floor(0.05 * m);
  const w = Math.floor((m - skip) / 5);
  const sv = noiseOf(voltage), si = noiseOf(current);
  const win = (from: number): { R: number; se: number; theta: number } => {
    let v = 0, i = 0, th = 0;
    for (let j = from; j < from + w; j++) { v += voltage[on[j]!]!; i += current[on[j]!]!; th += temperature ? temperature[on[j]!]! : 0; }
    v /= w; i /= w;
    const R = v / i;
    const se = Math.abs(R) * Math.sqrt((sv / v) ** 2 + (si / i) ** 2) / Math.sqrt(w);
    return { R, se, theta: th / w };
  };
  const e = win(skip), l = win(m - w);
  const diff = l.R - e.R;
  const se = Math.hypot(e.se, l.se);
  if (!(Math.abs(diff) > 4 * se && Math.abs(diff) > 0.005 * Math.abs(e.R))) return null;
  const evidence: Record<string, number | string> = {
    'R early [Ω]': sig(e.R), 'R late [Ω]': sig(l.R), 'R change [%]': sig((100 * diff) / e.R), 'z': sig(diff / se),
  };
  let advice = 'R rose during the record (the winding heated): fit R from a short, early window, log winding temperature, and quote R at a stated temperature.';
  if (temperature) {
    const predicted = copperResistance(e.R, e.theta, l.theta);
    evidence['temperature early [°C]'] = sig(e.theta);
    evidence['temperature late [°C]'] = sig(l.theta);
    evidence['R late by the copper law [Ω]'] = sig(predicted);
    const dev = Math.abs(l.R - predicted) / se;
    evidence['measured vs copper law [SE]'] = sig(dev);
    if (dev > 4) advice += ' The change does not follow the copper law for the logged temperature: the sensor may not sit at the winding, or something else (brushes, connections) changes.';
  }
  return { code: 'winding-heating', severity: 'warning', title: 'Winding resistance drifts: the winding heats during the record', evidence, advice };
}
