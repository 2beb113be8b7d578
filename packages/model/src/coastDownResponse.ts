/**
 * Closed-form speed of a coast-down (armature open, i = 0) under viscous and Coulomb friction,
 * with its sensitivities.
 *
 * ## Method
 * J·dω/dt = −b·ω − Tc·sgn(ω). For ω0 > 0, a = b/J, c = Tc/b:
 * ω(t) = (ω0 + c)·e^{−at} − c until the stop time t_s = (J/b)·ln(1 + b·ω0/Tc), then ω = 0
 * (the rotor stays: no drive torque is left to break away). For b = 0: ω = ω0 − Tc·t/J,
 * t_s = J·ω0/Tc. Negative ω0 is handled by symmetry. Sensitivities (before the stop):
 * ∂ω/∂ω0 = e^{−at}, ∂ω/∂Tc = expm1(−at)/b, ∂ω/∂J = (ω0 + c)(b·t/J²)e^{−at},
 * ∂ω/∂b = (Tc/b²)·[1 − e^{−at}(1 + at)] − ω0·t·e^{−at}/J (bracket by series for small at);
 * all are 0 after the stop.
 *
 * @param J - inertia [kg·m²], > 0
 * @param b - viscous coefficient [N·m·s/rad], ≥ 0
 * @param Tc - Coulomb torque [N·m], ≥ 0 (b and Tc not both 0)
 * @param initialSpeed - ω0 at the opening of the circuit [rad/s]
 * @param t - time since opening [s], ≥ 0
 * @returns `{ speed, stopTime, dJ, db, dTc, dInitialSpeed }` (stopTime = Infinity when Tc = 0)
 * @throws RangeError for out-of-domain input
 * @example
 * coastDownResponse(2e-5, 1e-5, 2e-3, 100, 0.1).speed; // ≈ 89.90 rad/s
 */
export function coastDownResponse(
  J: number,
  b: number,
  Tc: number,
  initialSpeed: number,
  t: number,
): { speed: number; stopTime: number; dJ: number; db: number; dTc: number; dInitialSpeed: number } {
  if (!(J > 0) || !Number.isFinite(J)) throw new RangeError(`coastDownResponse: J must be > 0 (got ${J})`);
  if (!(b >= 0) || !Number.isFinite(b)) throw new RangeError(`coastDownResponse: b must be >= 0 (got ${b})`);
  if (!(Tc >= 0) || !Number.isFinite(Tc)) throw new RangeError(`coastDownResponse: Tc must be >= 0 (got ${Tc})`);
  if (b === 0 && Tc === 0) throw new RangeError('coastDownResponse: b and Tc must not both be 0 (the rotor would never slow down)');
  if (!Number.isFinite(initialSpeed)) throw new RangeError(`coastDownResponse: initialSpeed must be finite (got ${initialSpeed})`);
  if (!(t >= 0) || !Number.isFinite(t)) throw new RangeError(`coastDownResponse: t must be >= 0 (got ${t})`);
  const sign = initialSpeed < 0 ? -1 : 1;
  const w0 = Math.abs(initialSpeed);
  let stopTime: number;
  if (w0 === 0) stopTime = 0;
  else if (Tc === 0) stopTime = Infinity;
  else if (b === 0) stopTime = (J * w0) / Tc;
  else stopTime = (J / b) * Math.log1p((b * w0) / Tc);
  if (t >= stopTime) return { speed: 0, stopTime, dJ: 0, db: 0, dTc: 0, dInitialSpeed: 0 };
  let speed: number, dJ: number, db: number, dTc: number, dW0: number;
  if (b === 0) {
    speed = w0 - (Tc * t) / J;
    dW0 = 1;
    dTc = -t / J;
    dJ = (Tc * t) / (J * J);
    db = -(w0 * t) / J + (Tc * t * t) / (2 * J * J);
  } else {
    const x = (b * t) / J;
    const e = Math.exp(-x);
    const c = Tc / b;
    speed = w0 * e + c * Math.expm1(-x); // = (ω0 + c)·e^{−x} − c without cancellation for small b
    dW0 = e;
    dTc = Math.expm1(-x) / b;
    dJ = (w0 + c) * ((b * t) / (J * J)) * e;
    let bracket: number; // 1 − e^{−x}(1 + x)
    if (x < 0.1) {
      bracket = 0;
      let term = 1; // x^k / k!
      for (let k = 1; k < 20; k++) {
        term *= -x / k;
        if (k >= 2) bracket += (k - 1) * term; // Σ (−1)^k (k−1) x^k / k!
      }
    } else {
      bracket = 1 - e * (1 + x);
    }
    db = (Tc / (b * b)) * bracket - (w0 * t * e) / J;
  }
  // Mirror for negative initial speed: ω → −ω, derivatives w.r.t. J, b, Tc flip sign; ∂/∂ω0 keeps.
  return { speed: sign * speed, stopTime, dJ: sign * dJ, db: sign * db, dTc: sign * dTc, dInitialSpeed: dW0 };
}
