import { checkMotorParams } from './checkMotorParams.js';
import type { MotorParams, LinearModelForms } from './types.js';
import { zohInto } from './zohInto.js';

/**
 * The lumped DC-motor model V = R·i + L·di/dt + Ke·ω, J·dω/dt = Kt·i − b·ω − τ_load in its
 * linear forms, for simulation tools and controller design: continuous state space (state
 * [i, ω], inputs [V, τ_load], outputs [i, ω]), the transfer functions V → i and V → ω, and,
 * given a sample time, the exact zero-order-hold discrete model.
 *
 * ## Method
 * A = [[−R/L, −Ke/L], [Kt/J, −b/J]], B = [[1/L, 0], [0, −1/J]], C = I, D = 0.
 * With Δ(s) = L·J·s² + (R·J + L·b)·s + R·b + Kt·Ke: I/V = (J·s + b)/Δ, Ω/V = Kt/Δ, written
 * with a monic denominator. The discrete matrices are Φ = e^{A·dt} and Γ = ∫₀^dt e^{Aτ}dτ·B from
 * the model's own exact discretisation (`zohInto`, the one the simulator uses).
 *
 * @param params - motor constants
 * @param dt - sample time [s] of the discrete model; omit for the continuous forms only
 * @returns the forms (plain numbers, JSON-ready)
 * @throws TypeError / RangeError for bad constants or a dt that is not a finite number > 0
 * @example
 * linearModelForms({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }).stateSpace.A[0]; // => [-2000, -50]
 */
export function linearModelForms(params: MotorParams, dt?: number): LinearModelForms {
  const fn = 'linearModelForms';
  checkMotorParams(fn, params);
  const { R, L, Kt, Ke, J, b } = params;
  const LJ = L * J;
  const forms: LinearModelForms = {
    signals: {
      state: ['current [A]', 'speed [rad/s]'],
      inputs: ['voltage [V]', 'load torque [N·m]'],
      outputs: ['current [A]', 'speed [rad/s]'],
    },
    stateSpace: {
      A: [[-R / L, -Ke / L], [Kt / J, -b / J]],
      B: [[1 / L, 0], [0, -1 / J]],
      C: [[1, 0], [0, 1]],
      D: [[0, 0], [0, 0]],
    },
    transfer: {
      voltageToCurrent: { numerator: [1 / L, b / LJ], denominator: [1, R / L + b / J, (R * b + Kt * Ke) / LJ] },
      voltageToSpeed: { numerator: [Kt / LJ], denominator: [1, R / L + b / J, (R * b + Kt * Ke) / LJ] },
    },
  };
  if (dt !== undefined) {
    if (typeof dt !== 'number' || !Number.isFinite(dt) || !(dt > 0)) throw new RangeError(`${fn}: dt must be a finite number > 0 (got ${String(dt)})`);
    const m = zohInto(new Float64Array(8), params, dt);
    forms.discrete = {
      dt,
      Phi: [[m[0]!, m[1]!], [m[2]!, m[3]!]],
      Gamma: [[m[4]!, m[6]!], [m[5]!, m[7]!]],
      C: [[1, 0], [0, 1]],
      D: [[0, 0], [0, 0]],
    };
  }
  return forms;
}
