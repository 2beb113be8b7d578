import { fitLinearModel } from './fitLinearModel.js';
import { checkRecording, sig } from './internal.js';
import { mechanicalRegression } from './mechanicalRegression.js';
import type { MechanicalRegression, MechanicalRegressionInput } from './mechanicalRegression.js';
import type { Finding, RecordingLike } from './types.js';

/**
 * Looks for stiction (`stiction`): the rotor stays still while the current rises past the level
 * that later keeps it turning, then breaks away. Best seen on a slow voltage ramp from rest.
 *
 * ## Method
 * The filtered series of `mechanicalRegression` are regressed over the moving rows only
 * (|ω| > 2 dead bands) on [acceleration, ω, sgn ω]; the sgn coefficient c = Tc/Kt is the running
 * level of the current at low speed, and the residual SD s of that regression the scale. The
 * record must start at rest. Over the still phase (from the filter edge until the filtered speed
 * first leaves its dead band) the peak current i_b (the breakaway current) and the time the
 * current spends above c + 4·s are taken. A free rotor answers a current above c within the
 * smoothing time of the zero-phase filter (one decimation interval, 1/(2·fc)): a voltage step or
 * PRBS edge from rest stays above c + 4·s for at most about one such interval while the speed
 * is still inside its dead band. Fire when i_b − c > 4·s and the current stays above c + 4·s for
 * at least 2 decimation intervals with the rotor still. Evidence: breakaway current, running
 * level, excess in SDs, stuck time.
 *
 * Rates measured on invented slow ramps (0 → 2 V over 1 s, 2 kHz, FACTS.md §5 motor with
 * Tc = 2 mN·m, noise 0.012 A / 0.48 rad/s; bench/diagnose.ts, 50 seeds each): Ts = 5 mN·m
 * 50/50, no stiction 0/50, Ts = 3 mN·m (0.02 A above the running level) 0/50 — too small for
 * this noise.
 *
 * @param recording - `{ time [s], channels }` with current and speed, starting at rest
 * @returns the finding, or null
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectStiction(slowRampFromRest)?.code; // => 'stiction' when the rotor sticks
 */
export function detectStiction(recording: RecordingLike): Finding | null {
  return stictionWith(recording, mechanicalRegression);
}

/**
 * `detectStiction` with the regression run by `regress` (`scanRecording` passes one that shares
 * its result with `detectFriction`, which regresses the same channels). Not exported from the package.
 */
export function stictionWith(recording: RecordingLike, regress: (input: MechanicalRegressionInput) => MechanicalRegression): Finding | null {
  const { n, dt } = checkRecording('detectStiction', recording);
  const { current, speed } = recording.channels;
  if (!current || !speed || n < 400) return null;
  let reg;
  try {
    reg = regress({ sampleInterval: dt, drive: current, speed });
  } catch {
    return null;
  }
  const { drive: i, speed: w, acceleration: acc, decimation: dec } = reg.filtered;
  const dead = reg.deadBand;
  const edge = 5 * dec;
  // c = Tc/Kt from the moving rows only (stuck rows would pull c up to the breakaway level).
  const rows: number[] = [];
  for (let k = edge; k < n - edge; k += dec) if (Math.abs(w[k]!) > 2 * dead) rows.push(k);
  if (rows.length < 20) return null;
  const r = rows.length;
  const cAcc = new Float64Array(r), cW = new Float64Array(r), cS = new Float64Array(r), cI = new Float64Array(r);
  for (let j = 0; j < r; j++) {
    const k = rows[j]!;
    cAcc[j] = acc[k]!; cW[j] = w[k]!; cS[j] = Math.sign(w[k]!); cI[j] = i[k]!;
  }
  const fit = fitLinearModel([cAcc, cW, cS], cI);
  const c = Math.max(fit.coefficients[2]!, 0);
  const s = Math.sqrt(fit.residualVariance);
  if (!Number.isFinite(c) || !(s > 0)) return null;
  // The rotor must start at rest (after the filter edge).
  if (Math.abs(w[edge]!) > dead) return null;
  const limit = c + 4 * s;
  let peak = 0, above = 0, first = -1, k1 = -1;
  for (let k = edge; k < n - edge; k++) {
    if (Math.abs(w[k]!) > dead) { k1 = k; break; }
    const a = Math.abs(i[k]!);
    if (a > peak) peak = a;
    if (a > limit) { above++; if (first < 0) first = k; }
  }
  if (k1 < 0) return null; // never broke away inside the record
  if (!(peak - c > 4 * s) || above < 2 * dec) return null;
  return {
    code: 'stiction', severity: 'warning', title: 'Rotor sticks until a breakaway current',
    evidence: {
      'breakaway current [A]': sig(peak), 'running level Tc/Kt [A]': sig(c), 'excess [SD]': sig((peak - c) / s),
      'stuck time above the running level [s]': sig((k1 - first) * dt), 'dead band [rad/s]': sig(dead),
    },
    advice: 'The motor needs more torque to start than to keep turning: exclude the start-up from the fit or model breakaway torque Ts > Tc; low-speed positioning will stick-slip.',
  };
}
