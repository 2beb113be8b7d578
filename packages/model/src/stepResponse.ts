import { checkMotorParams } from './checkMotorParams.js';
import type { LinearOptions, MotorParams, PoleKind, StepPoint } from './types.js';

/**
 * Closed-form current and speed of the linear model at time t after a voltage step applied at
 * t = 0 from the state (i0, ω0), with a constant load torque, for real distinct, repeated and
 * complex poles.
 *
 * ## Method
 * x(t) = x_ss + e^{At}(x0 − x_ss) with x_ss = [(b·V + Ke·τ)/(R·b + Kt·Ke), (Kt·V − R·τ)/(R·b + Kt·Ke)]
 * and e^{At} by Sylvester's formula on the poles p1,2 = s ± √δ (s = tr A/2, δ = s² − det A):
 * real distinct: [e^{p1 t}(A − p2 I) − e^{p2 t}(A − p1 I)]/(p1 − p2);
 * repeated (|p1 − p2| ≤ 1e-7·|s|): e^{st}[I + t(A − sI)];
 * complex p = s ± iωd: e^{st}[cos(ωd t)·I + sin(ωd t)/ωd·(A − sI)].
 * With i0 = ω0 = τ = 0 this is the textbook ω(t) = G0·V·[1 + (p2 e^{p1 t} − p1 e^{p2 t})/(p1 − p2)].
 *
 * @param params - motor constants
 * @param volts - step voltage [V]
 * @param t - time after the step [s], ≥ 0
 * @param options - initial current [A] and speed [rad/s], constant load torque [N·m]
 * @returns `{ current, speed, kind }`
 * @throws RangeError for bad constants or a negative / non-finite t
 * @example
 * stepResponse({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, 12, 1e-3);
 * // => { current: 5.087117098…, speed: 8.437924222…, kind: 'real-distinct' } (FACTS.md §5)
 */
export function stepResponse(
  params: MotorParams,
  volts: number,
  t: number,
  options: LinearOptions = {},
): StepPoint & { kind: PoleKind } {
  checkMotorParams('stepResponse', params);
  if (!Number.isFinite(volts)) throw new RangeError(`stepResponse: volts must be finite (got ${volts})`);
  if (!(t >= 0) || !Number.isFinite(t)) throw new RangeError(`stepResponse: t must be a finite number >= 0 (got ${t})`);
  const { R, L, Kt, Ke, J, b } = params;
  const tau = options.loadTorque ?? 0;
  const den = R * b + Kt * Ke;
  const iss = (b * volts + Ke * tau) / den;
  const wss = (Kt * volts - R * tau) / den;
  const e1 = (options.initialCurrent ?? 0) - iss;
  const e2 = (options.initialSpeed ?? 0) - wss;
  const a11 = -R / L, a12 = -Ke / L, a21 = Kt / J, a22 = -b / J;
  const s = 0.5 * (a11 + a22);
  const m = 0.5 * (a11 - a22);
  const delta = m * m + a12 * a21;
  const q = Math.sqrt(Math.abs(delta));
  let kind: PoleKind;
  let f0: number; // coefficient of I
  let f1: number; // coefficient of M = A − sI
  if (2 * q <= 1e-7 * Math.abs(s)) {
    kind = 'repeated';
    const es = Math.exp(s * t);
    f0 = es;
    f1 = es * t;
  } else if (delta > 0) {
    kind = 'real-distinct';
    // Sylvester: [e1(A − p2 I) − e2(A − p1 I)]/(p1 − p2) with A − p2 I = M + qI, A − p1 I = M − qI
    const ep1 = Math.exp((s + q) * t);
    const ep2 = Math.exp((s - q) * t);
    f0 = 0.5 * (ep1 + ep2);
    f1 = (ep1 - ep2) / (2 * q);
  } else {
    kind = 'complex';
    const es = Math.exp(s * t);
    f0 = es * Math.cos(q * t);
    f1 = (es * Math.sin(q * t)) / q;
  }
  const d1 = (f0 + f1 * m) * e1 + f1 * a12 * e2;
  const d2 = f1 * a21 * e1 + (f0 - f1 * m) * e2;
  return { current: iss + d1, speed: wss + d2, kind };
}
