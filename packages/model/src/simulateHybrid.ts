import { checkMotorParams } from './checkMotorParams.js';
import { simulateHybridInto } from './simulateHybridInto.js';
import type { DetailedParams, HybridPlan, HybridTrace } from './types.js';

/**
 * Simulates the detailed motor model (friction with stick–slip, drag, drive voltage and current
 * limits, supply resistance, winding heating, open circuit) exactly between events, for a held
 * drive voltage; allocating and validating wrapper of `simulateHybridInto`, which says how.
 * This is the simulator the estimator fits with and checks held-out recordings with;
 * `simulateDetailed` (adaptive Runge–Kutta) is the independent reference it is tested against.
 *
 * @param params - constants and effect terms [SI]
 * @param plan - sample instants [s], held input [V], start state, circuit
 * @returns current [A], speed [rad/s], position [rad], terminal voltage [V], temperature [°C] per sample
 * @throws TypeError for wrong shapes; RangeError for out-of-domain numbers (non-increasing time, …)
 * @example
 * const t = Float64Array.from({ length: 1000 }, (_, k) => k * 1e-4);
 * simulateHybrid({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 2e-3 }, { time: t, input: new Float64Array(1000).fill(12) }).speed[999];
 * // ≈ 195 (rad/s)
 */
export function simulateHybrid(params: DetailedParams, plan: HybridPlan): HybridTrace {
  const fn = 'simulateHybrid';
  checkMotorParams(fn, params);
  if (plan === null || typeof plan !== 'object') throw new TypeError(`${fn}: plan must be an object`);
  const { time, input, inputTime } = plan;
  if (!(time instanceof Float64Array)) throw new TypeError(`${fn}: plan.time must be a Float64Array`);
  if (!(input instanceof Float64Array)) throw new TypeError(`${fn}: plan.input must be a Float64Array`);
  const n = time.length;
  if (n < 1) throw new RangeError(`${fn}: plan.time must hold at least one sample`);
  for (let k = 0; k < n; k++) {
    if (!Number.isFinite(time[k]!)) throw new RangeError(`${fn}: plan.time[${k}] must be finite (got ${time[k]})`);
    if (k > 0 && !(time[k]! > time[k - 1]!)) throw new RangeError(`${fn}: plan.time must be strictly increasing (time[${k}] = ${time[k]} after ${time[k - 1]})`);
  }
  if (inputTime === undefined) {
    if (input.length !== n) throw new TypeError(`${fn}: plan.input has ${input.length} values but plan.time has ${n} (or give plan.inputTime)`);
  } else {
    if (!(inputTime instanceof Float64Array)) throw new TypeError(`${fn}: plan.inputTime must be a Float64Array`);
    if (inputTime.length !== input.length || input.length === 0) throw new TypeError(`${fn}: plan.inputTime and plan.input must have the same, non-zero length`);
    for (let k = 1; k < inputTime.length; k++) {
      if (!(inputTime[k]! > inputTime[k - 1]!)) throw new RangeError(`${fn}: plan.inputTime must be strictly increasing (at ${k})`);
    }
  }
  for (let k = 0; k < input.length; k++) if (!Number.isFinite(input[k]!)) throw new RangeError(`${fn}: plan.input[${k}] must be finite (got ${input[k]})`);
  if (plan.rotor !== undefined && plan.rotor !== 'free' && plan.rotor !== 'held') throw new RangeError(`${fn}: plan.rotor must be 'free' or 'held' (got ${String(plan.rotor)})`);
  const init = plan.initial;
  if (init !== undefined && init !== 'rest' && init !== 'steady') {
    if (typeof init !== 'object' || init === null || !Number.isFinite(init.current) || !Number.isFinite(init.speed)) {
      throw new TypeError(`${fn}: plan.initial must be 'rest', 'steady' or { current, speed } with finite numbers`);
    }
  }
  const out: HybridTrace = {
    current: new Float64Array(n), speed: new Float64Array(n), position: new Float64Array(n),
    terminalVoltage: new Float64Array(n), temperature: new Float64Array(n), events: 0,
  };
  return simulateHybridInto(out, params, plan);
}
