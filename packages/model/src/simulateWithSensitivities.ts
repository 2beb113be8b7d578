import { checkSeries } from './checkSeries.js';
import { createSensitivityState } from './createSensitivityState.js';
import { simulateChunkInto } from './simulateChunkInto.js';
import type { LinearOptions, MotorParams, SensitivityChunk, TimeBase } from './types.js';

/**
 * Allocating convenience: the linear ZOH simulation with all 8 sensitivities for a whole (short)
 * record, in one chunk. For long records use `createSensitivityState` + `simulateChunkInto`,
 * which need memory only per chunk.
 *
 * @param params - motor constants
 * @param voltage - terminal voltage per sample [V]
 * @param time - sample interval [s] or sample times [s]
 * @param options - initial state [A, rad/s] and constant load torque [N·m]
 * @returns current, speed and 8·n sensitivities each (layout as `SensitivityChunk`)
 * @throws TypeError / RangeError for bad input
 * @example
 * const r = simulateWithSensitivities(motor, v, 1e-4);
 * r.speedSensitivity[8 * 100 + 2]; // ∂ω/∂Kt at sample 100 [rad/s per N·m/A]
 */
export function simulateWithSensitivities(
  params: MotorParams,
  voltage: Float64Array,
  time: TimeBase,
  options?: LinearOptions,
): SensitivityChunk {
  checkSeries('simulateWithSensitivities', 'voltage', voltage, time);
  const state = createSensitivityState(params, options);
  const n = voltage.length;
  const out: SensitivityChunk = {
    current: new Float64Array(n),
    speed: new Float64Array(n),
    currentSensitivity: new Float64Array(8 * n),
    speedSensitivity: new Float64Array(8 * n),
  };
  return simulateChunkInto(state, voltage, time, 0, n, out);
}
