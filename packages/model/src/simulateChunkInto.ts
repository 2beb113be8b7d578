import type { SensitivityChunk, SensitivityState, TimeBase } from './types.js';
import { zohSensitivitiesInto } from './zohSensitivitiesInto.js';

/**
 * Chunked, resumable kernel: simulates samples [k0, k1) of the linear model (exact zero-order
 * hold) together with the forward sensitivities of current and speed w.r.t.
 * R, L, Kt, Ke, J, b, i0, ω0, writes them into the chunk buffers and advances `state`.
 *
 * ## Contract
 * - `state.nextIndex` must equal `k0` (start with `createSensitivityState`, then call with
 *   consecutive ranges [0, k1), [k1, k2), …). On a mismatch or bad range the kernel writes NaN
 *   into the chunk rows it was given and leaves the state unchanged (it never throws).
 * - Row r = k − k0 of the chunk receives x(t_k): `current[r]`, `speed[r]`, and the 8
 *   sensitivities at `currentSensitivity[8r + j]`, `speedSensitivity[8r + j]`.
 * - The voltage `voltage[k]` is held on [t_k, t_{k+1}); `time` is one interval [s] or the full
 *   array of sample times; matrices are cached in the state while the interval repeats.
 * - Memory is O(chunk), so a 1e6-sample record can be swept with, e.g., 4096-sample chunks while
 *   accumulating JᵀJ and Jᵀr.
 *
 * ## Method
 * Differentiating the exact recursion x⁺ = Φx + Γv·v + Γτ·τ gives
 * S⁺ = Φ·S + (∂Φ/∂θ)·x + (∂Γv/∂θ)·v + (∂Γτ/∂θ)·τ for θ ∈ {R, L, Kt, Ke, J, b} and S⁺ = Φ·S for
 * the initial state, i.e. the exact discretisation of the augmented sensitivity system; the
 * matrix derivatives come from `zohSensitivitiesInto`. A shift t_s of the whole input (for
 * example an uncertain step time) from rest has ∂x(t)/∂t_s = −ẋ(t) = −(A·x + B·u); an estimator can
 * form it from the returned x and the input, or by the central difference of two shifted runs.
 *
 * @param state - from `createSensitivityState`, updated in place
 * @param voltage - terminal voltage per sample [V], full record
 * @param time - sample interval [s] or sample times [s] (full record)
 * @param k0 - first sample of the chunk (must equal state.nextIndex)
 * @param k1 - one past the last sample (≤ voltage.length)
 * @param out - chunk buffers with room for k1 − k0 rows
 * @returns `out`
 * @example
 * const st = createSensitivityState(motor);
 * const ch = { current: new Float64Array(4096), speed: new Float64Array(4096),
 *   currentSensitivity: new Float64Array(8 * 4096), speedSensitivity: new Float64Array(8 * 4096) };
 * for (let k = 0; k < v.length; k += 4096) simulateChunkInto(st, v, 1e-4, k, Math.min(k + 4096, v.length), ch);
 */
export function simulateChunkInto(
  state: SensitivityState,
  voltage: Float64Array,
  time: TimeBase,
  k0: number,
  k1: number,
  out: SensitivityChunk,
): SensitivityChunk {
  const n = voltage.length;
  const rows = k1 - k0;
  const { current, speed, currentSensitivity: dI, speedSensitivity: dW } = out;
  if (
    k0 !== state.nextIndex || !(rows >= 0) || k1 > n || current.length < rows || speed.length < rows ||
    dI.length < 8 * rows || dW.length < 8 * rows ||
    (typeof time !== 'number' && time.length !== n)
  ) {
    const r = Math.max(0, Math.min(rows, current.length, speed.length));
    for (let k = 0; k < r; k++) { current[k] = NaN; speed[k] = NaN; }
    dI.fill(NaN, 0, Math.min(dI.length, 8 * r));
    dW.fill(NaN, 0, Math.min(dW.length, 8 * r));
    return out;
  }
  const p = state.params;
  const mats = state.matrices;
  const tau = state.loadTorque;
  const s = state.sens;
  let i = state.x[0]!;
  let w = state.x[1]!;
  for (let k = k0; k < k1; k++) {
    const r = k - k0;
    current[r] = i;
    speed[r] = w;
    const o = 8 * r;
    for (let j = 0; j < 8; j++) {
      dI[o + j] = s[2 * j]!;
      dW[o + j] = s[2 * j + 1]!;
    }
    if (k + 1 >= n) break; // last sample: nothing to advance to
    const dt = typeof time === 'number' ? time : time[k + 1]! - time[k]!;
    if (dt !== state.cachedInterval) {
      zohSensitivitiesInto(mats, p, dt, state.work);
      state.cachedInterval = dt;
    }
    const v = voltage[k]!;
    const p11 = mats[0]!, p12 = mats[1]!, p21 = mats[2]!, p22 = mats[3]!;
    for (let j = 0; j < 6; j++) {
      const mo = 8 + 8 * j;
      const si = s[2 * j]!, sw = s[2 * j + 1]!;
      s[2 * j] = p11 * si + p12 * sw + mats[mo]! * i + mats[mo + 1]! * w + mats[mo + 4]! * v + mats[mo + 6]! * tau;
      s[2 * j + 1] = p21 * si + p22 * sw + mats[mo + 2]! * i + mats[mo + 3]! * w + mats[mo + 5]! * v + mats[mo + 7]! * tau;
    }
    for (let j = 6; j < 8; j++) {
      const si = s[2 * j]!, sw = s[2 * j + 1]!;
      let a = p11 * si + p12 * sw;
      let c = p21 * si + p22 * sw;
      // The initial-state sensitivities decay geometrically; flush them before they turn
      // subnormal (subnormal arithmetic is ~100× slower on x86 and the values are 0 to 1e-290).
      if (a < 1e-290 && a > -1e-290) a = 0;
      if (c < 1e-290 && c > -1e-290) c = 0;
      s[2 * j] = a;
      s[2 * j + 1] = c;
    }
    const iNext = p11 * i + p12 * w + mats[4]! * v + mats[6]! * tau;
    w = p21 * i + p22 * w + mats[5]! * v + mats[7]! * tau;
    i = iNext;
  }
  // State now holds x at sample k1 (if k1 < n); at the end of the record it holds the last sample.
  state.x[0] = i;
  state.x[1] = w;
  state.nextIndex = k1;
  return out;
}
