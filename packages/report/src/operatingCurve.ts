import { motorRelations } from '@motorprint/model';
import type { ConstantValues, OperatingCurve } from './types.js';

/**
 * Steady-state operating curve of the motor at one supply voltage, from stall to no load:
 * shaft torque, speed, current, output power and efficiency, friction (b and Tc) included.
 *
 * ## Method
 * Steady state of V = R·i + Ke·ω and Kt·i = T + b·ω + Tc (FACTS.md §4), sampled at `points`
 * equally spaced speeds ω from 0 to ω0 = (Kt·V − R·Tc)/(R·b + Kt·Ke): i = (V − Ke·ω)/R,
 * T = Kt·i − b·ω − Tc, P = T·ω, η = P/(V·i) (the model package's `motorRelations`).
 *
 * @param constants - motor constants [SI]; Tc = 0 when the model has none
 * @param voltage - supply voltage [V], > 0
 * @param points - number of samples, ≥ 2 @default 101
 * @returns the curve; empty arrays when friction exceeds the stall torque (ω0 ≤ 0)
 * @throws RangeError for a non-positive voltage, fewer than 2 points, or a constant that is not finite
 * @example
 * operatingCurve({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 0 }, 12, 3).speed;
 * // ≈ Float64Array [0, 119.05, 238.10] rad/s (FACTS.md §5 ω_ss)
 */
export function operatingCurve(constants: ConstantValues, voltage: number, points = 101): OperatingCurve {
  const fn = 'operatingCurve';
  if (!(voltage > 0) || !Number.isFinite(voltage)) throw new RangeError(`${fn}: voltage must be a finite number > 0 (got ${voltage})`);
  if (!Number.isInteger(points) || points < 2) throw new RangeError(`${fn}: points must be an integer >= 2 (got ${points})`);
  for (const k of ['R', 'Kt', 'Ke', 'b', 'Tc'] as const) {
    if (!Number.isFinite(constants[k])) throw new RangeError(`${fn}: constants.${k} must be finite (got ${constants[k]})`);
  }
  const w0 = motorRelations.noLoadSpeed(constants, voltage);
  const n = w0 > 0 ? points : 0;
  const curve: OperatingCurve = {
    voltage, torque: new Float64Array(n), speed: new Float64Array(n), current: new Float64Array(n),
    outputPower: new Float64Array(n), efficiency: new Float64Array(n),
  };
  for (let k = 0; k < n; k++) {
    const w = k === n - 1 ? w0 : (w0 * k) / (n - 1);
    const T = motorRelations.torqueAtSpeed(constants, voltage, w);
    curve.speed[k] = w;
    curve.current[k] = motorRelations.currentAtSpeed(constants, voltage, w);
    curve.torque[k] = T;
    curve.outputPower[k] = T * w;
    curve.efficiency[k] = motorRelations.efficiencyAtSpeed(constants, voltage, w);
  }
  return curve;
}
