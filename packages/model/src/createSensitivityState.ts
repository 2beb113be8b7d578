import { checkLinearOptions } from './checkLinearOptions.js';
import { checkMotorParams } from './checkMotorParams.js';
import type { LinearOptions, MotorParams, SensitivityState } from './types.js';
import { ZOH_SENSITIVITY_WORK_LENGTH } from './zohSensitivitiesInto.js';

/**
 * Creates the resumable state of the chunked simulation-with-sensitivities kernel
 * (`simulateChunkInto`), positioned at sample 0 with x = [i0, ω0], ∂x/∂(R…b) = 0 and
 * ∂x/∂(i0, ω0) = I.
 *
 * @param params - motor constants
 * @param options - initial current [A], initial speed [rad/s], constant load torque [N·m]
 * @returns a fresh state (about 1 kB; create one per parameter vector and recording)
 * @throws TypeError / RangeError for bad constants or options
 * @example
 * const state = createSensitivityState({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 });
 * state.nextIndex; // => 0
 */
export function createSensitivityState(params: MotorParams, options?: LinearOptions): SensitivityState {
  checkMotorParams('createSensitivityState', params);
  const o = checkLinearOptions('createSensitivityState', options);
  const sens = new Float64Array(16);
  sens[12] = 1; // ∂i/∂i0
  sens[15] = 1; // ∂ω/∂ω0
  return {
    params: { R: params.R, L: params.L, Kt: params.Kt, Ke: params.Ke, J: params.J, b: params.b },
    loadTorque: o.loadTorque,
    nextIndex: 0,
    x: Float64Array.of(o.initialCurrent, o.initialSpeed),
    sens,
    cachedInterval: NaN,
    matrices: new Float64Array(56),
    work: new Float64Array(ZOH_SENSITIVITY_WORK_LENGTH),
  };
}
