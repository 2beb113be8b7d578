import { checkLinearOptions } from './checkLinearOptions.js';
import { checkMotorParams } from './checkMotorParams.js';
import { checkSeries } from './checkSeries.js';
import { simulateInto } from './simulateInto.js';
import type { LinearOptions, LinearTrace, MotorParams, TimeBase } from './types.js';

/**
 * Checked, allocating wrapper of `simulateInto`: exact zero-order-hold simulation of the linear
 * motor model for a sampled voltage.
 *
 * @param params - motor constants
 * @param voltage - terminal voltage per sample [V]
 * @param time - sample interval [s] or strictly increasing sample times [s]
 * @param options - initial current [A], initial speed [rad/s], constant load torque [N·m]
 * @returns new current [A] and speed [rad/s] arrays
 * @throws TypeError for wrong types or shapes; RangeError for non-finite or out-of-domain numbers
 * @example
 * const v = new Float64Array(101).fill(12);
 * simulate({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, v, 1e-4).current[20];
 * // ≈ 5.50346 A (FACTS.md §5 at t = 2 ms)
 */
export function simulate(params: MotorParams, voltage: Float64Array, time: TimeBase, options?: LinearOptions): LinearTrace {
  checkMotorParams('simulate', params);
  checkSeries('simulate', 'voltage', voltage, time);
  const opts = checkLinearOptions('simulate', options);
  const n = voltage.length;
  return simulateInto({ current: new Float64Array(n), speed: new Float64Array(n) }, params, voltage, time, opts);
}
