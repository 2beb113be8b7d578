/**
 * Closed-form current of the locked-rotor test (ω held at 0: first-order RL circuit) after a
 * voltage step, with its sensitivities.
 *
 * ## Method
 * L·di/dt = V − R·i ⇒ i(t) = V/R + (i0 − V/R)·e^{−Rt/L}. Differentiating:
 * ∂i/∂R = −(V/R²)(1 − e) − (i0 − V/R)(t/L)e, ∂i/∂L = (i0 − V/R)(R·t/L²)e, ∂i/∂i0 = e,
 * ∂i/∂V = (1 − e)/R, with e = e^{−Rt/L}.
 *
 * @param R - armature resistance [Ω], > 0
 * @param L - armature inductance [H], > 0
 * @param volts - step voltage [V]
 * @param t - time after the step [s], ≥ 0
 * @param initialCurrent - current at the step [A] @default 0
 * @returns `{ current [A], dR [A/Ω], dL [A/H], dInitialCurrent [1], dVolts [A/V] }`
 * @throws RangeError for R or L ≤ 0, negative t, or non-finite input
 * @example
 * lockedRotorResponse(2, 1e-3, 12, 5e-4).current; // ≈ 6·(1 − e^{−1}) = 3.79272 A
 */
export function lockedRotorResponse(
  R: number,
  L: number,
  volts: number,
  t: number,
  initialCurrent = 0,
): { current: number; dR: number; dL: number; dInitialCurrent: number; dVolts: number } {
  if (!(R > 0) || !Number.isFinite(R)) throw new RangeError(`lockedRotorResponse: R must be > 0 (got ${R})`);
  if (!(L > 0) || !Number.isFinite(L)) throw new RangeError(`lockedRotorResponse: L must be > 0 (got ${L})`);
  if (!Number.isFinite(volts)) throw new RangeError(`lockedRotorResponse: volts must be finite (got ${volts})`);
  if (!(t >= 0) || !Number.isFinite(t)) throw new RangeError(`lockedRotorResponse: t must be >= 0 (got ${t})`);
  if (!Number.isFinite(initialCurrent)) throw new RangeError(`lockedRotorResponse: initialCurrent must be finite (got ${initialCurrent})`);
  const e = Math.exp((-R * t) / L);
  const oneMinus = -Math.expm1((-R * t) / L);
  const iss = volts / R;
  const d0 = initialCurrent - iss;
  return {
    current: iss * oneMinus + initialCurrent * e,
    dR: (-volts / (R * R)) * oneMinus - d0 * (t / L) * e,
    dL: d0 * ((R * t) / (L * L)) * e,
    dInitialCurrent: e,
    dVolts: oneMinus / R,
  };
}
