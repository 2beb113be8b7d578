import { checkMotorParams } from './checkMotorParams.js';
import { motorRelations } from './motorRelations.js';
import type { MotorFigures, MotorParams } from './types.js';

/**
 * The derived figures of the linear model at a supply voltage: time constants, poles, natural
 * frequency and damping, steady-state, stall and no-load values, motor constant.
 *
 * ## Method
 * Characteristic polynomial L·J·s² + (R·J + L·b)·s + (R·b + Kt·Ke); poles p = s̄ ± √(s̄² − ωn²)
 * with s̄ = −(R/L + b/J)/2 and ωn² = (R·b + Kt·Ke)/(L·J); the larger-magnitude real pole is
 * computed first and the other as ωn²/p1 to avoid cancellation. The other figures are
 * `motorRelations` (friction-free here: `MotorParams` has no Coulomb term).
 *
 * @param params - motor constants
 * @param volts - supply voltage [V] for the voltage-dependent figures
 * @returns the figures (see `MotorFigures` for units)
 * @throws RangeError for bad constants or non-finite volts
 * @example
 * motorFigures({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, 12).steadySpeed;
 * // ≈ 238.0952380952 rad/s (FACTS.md §5)
 */
export function motorFigures(params: MotorParams, volts: number): MotorFigures {
  checkMotorParams('motorFigures', params);
  if (!Number.isFinite(volts)) throw new RangeError(`motorFigures: volts must be finite (got ${volts})`);
  const { R, L, Kt, Ke, J, b } = params;
  const den = R * b + Kt * Ke;
  const s = -0.5 * (R / L + b / J);
  const wn2 = den / (L * J);
  const m = 0.5 * (-R / L + b / J);
  const delta = m * m - (Ke / L) * (Kt / J);
  let poles: MotorFigures['poles'];
  if (delta > 0) {
    const p1 = s - Math.sqrt(delta);
    poles = { kind: 'real-distinct', re1: p1, re2: wn2 / p1, im: 0 };
  } else if (delta === 0) {
    poles = { kind: 'repeated', re1: s, re2: s, im: 0 };
  } else {
    poles = { kind: 'complex', re1: s, re2: s, im: Math.sqrt(-delta) };
  }
  const wn = Math.sqrt(wn2);
  const f = motorRelations;
  // Only the linear model's constants: a Coulomb term on a wider params object plays no part here.
  const lin = { R, L, Kt, Ke, J, b };
  return {
    electricalTimeConstant: f.electricalTimeConstant(lin),
    mechanicalTimeConstant: f.mechanicalTimeConstant(lin),
    mechanicalTimeConstantViscous: f.mechanicalTimeConstantViscous(lin),
    poles,
    naturalFrequency: wn,
    dampingRatio: -s / wn,
    steadySpeed: f.noLoadSpeed(lin, volts),
    steadyCurrent: f.noLoadCurrent(lin, volts),
    stallCurrent: f.stallCurrent(lin, volts),
    stallTorque: f.stallTorque(lin, volts),
    noLoadSpeed: f.idealNoLoadSpeed(lin, volts),
    motorConstant: f.motorConstant(lin),
  };
}
