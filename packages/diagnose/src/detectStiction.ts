import { fitLinearModel } from './fitLinearModel.js';
import { checkRecording, sig } from './internal.js';
import { mechanicalRegression } from './mechanicalRegression.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for stiction (`stiction`): the rotor stays still while the current rises past the level
 * that later keeps it turning, then breaks away.
 *
 * ## Method
 * The filtered series of `mechanicalRegression` are regressed over the moving rows only
 * (|ω| > 2 dead bands) to give a = J/Kt and c = Tc/Kt. From the first
 * sample where the filtered current exceeds c by 4 noise SDs until the filtered speed leaves its
 * dead band, the speed a free rotor would have gained, ω̂ = Σ (i − c)·dt / a, is accumulated.
 * Without stiction the rotor moves as soon as i > c, so ω̂ stays near the dead band (both series
 * are filtered alike); fire when ω̂ exceeds 5 dead bands. Evidence: breakaway current, stuck time,
 * running level c.
 *
 * @param recording - `{ time [s], channels }` with current and speed, starting at rest
 * @returns the finding, or null
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectStiction(rampFromRest)?.code; // => 'stiction' when the rotor sticks
 */
export function detectStiction(recording: RecordingLike): Finding | null {
  const { n, dt } = checkRecording('detectStiction', recording);
  const { current, speed } = recording.channels;
  if (!current || !speed || n < 400) return null;
  let reg;
  try {
    reg = mechanicalRegression({ sampleInterval: dt, drive: current, speed });
  } catch {
    return null;
  }
  const { drive: i, speed: w, acceleration: acc, decimation: dec } = reg.filtered;
  const dead = reg.deadBand;
  const edge = 5 * dec;
  // a = J/Kt and c = Tc/Kt from the moving rows only (stuck rows would pull c up to the breakaway level).
  const rows: number[] = [];
  for (let k = edge; k < n - edge; k += dec) if (Math.abs(w[k]!) > 2 * dead) rows.push(k);
  if (rows.length < 20) return null;
  const fit = fitLinearModel([
    Float64Array.from(rows, (k) => acc[k]!), Float64Array.from(rows, (k) => w[k]!), Float64Array.from(rows, (k) => Math.sign(w[k]!)),
  ], Float64Array.from(rows, (k) => i[k]!));
  const a = fit.coefficients[0]!;
  const c = Math.max(fit.coefficients[2]!, 0);
  if (!(a > 0) || !Number.isFinite(c)) return null;
  const sigmaI = Math.sqrt(fit.residualVariance);
  // The rotor must start at rest (after the filter edge).
  if (Math.abs(w[edge]!) > dead) return null;
  let k0 = -1;
  for (let k = edge; k < n; k++) {
    if (Math.abs(w[k]!) > dead) break;
    if (Math.abs(i[k]!) > c + 4 * sigmaI) { k0 = k; break; }
  }
  if (k0 < 0) return null;
  let gained = 0, k1 = k0, peak = 0;
  for (let k = k0; k < n; k++) {
    if (Math.abs(w[k]!) > dead) { k1 = k; break; }
    const excess = Math.abs(i[k]!) - c;
    if (excess > 0) gained += (excess * dt) / a;
    if (Math.abs(i[k]!) > peak) peak = Math.abs(i[k]!);
    k1 = k;
  }
  if (!(gained > 5 * dead)) return null;
  return {
    code: 'stiction', severity: 'warning', title: 'Rotor sticks until a breakaway current',
    evidence: {
      'breakaway current [A]': sig(peak), 'running level Tc/Kt [A]': sig(c), 'stuck time [s]': sig((k1 - k0) * dt),
      'speed a free rotor would have reached [rad/s]': sig(gained), 'dead band [rad/s]': sig(dead),
    },
    advice: 'The motor needs more torque to start than to keep turning: exclude the start-up from the fit or model breakaway torque Ts > Tc; low-speed positioning will stick-slip.',
  };
}
