import type { LinearOptions, LinearTrace, MotorParams, TimeBase } from './types.js';
import { zohInto } from './zohInto.js';

/**
 * Simulates the linear motor model for a sampled terminal voltage held constant between samples
 * (zero-order hold), by the exact discretisation. Kernel: writes into caller-allocated buffers,
 * allocates only one 8-number matrix buffer, never throws (bad numbers propagate as NaN).
 *
 * Sample k holds x(t_k); the voltage `voltage[k]` is applied on [t_k, t_{k+1}). With a uniform
 * interval the matrices are computed once; with sample times each interval gets its own Φ(dt),
 * Γ(dt), reused while consecutive intervals are equal.
 *
 * @param out - output buffers, each of length ≥ voltage.length
 * @param p - motor constants (not validated here; use `simulate` for checked input)
 * @param voltage - terminal voltage per sample [V]
 * @param time - sample interval [s] or sample times [s] (same length as `voltage`)
 * @param options - initial state and constant load torque
 * @returns `out`
 * @example
 * const v = new Float64Array(1000).fill(12);
 * const out = { current: new Float64Array(1000), speed: new Float64Array(1000) };
 * simulateInto(out, { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 }, v, 1e-4);
 * out.speed[100]; // ≈ 109.604 rad/s (FACTS.md §5 at t = 10 ms)
 */
export function simulateInto(
  out: LinearTrace,
  p: MotorParams,
  voltage: Float64Array,
  time: TimeBase,
  options: LinearOptions = {},
): LinearTrace {
  const n = voltage.length;
  const current = out.current;
  const speed = out.speed;
  if (n === 0) return out;
  const tau = options.loadTorque ?? 0;
  let i = options.initialCurrent ?? 0;
  let w = options.initialSpeed ?? 0;
  const m = new Float64Array(8);
  if (typeof time === 'number') {
    zohInto(m, p, time);
    const p11 = m[0]!, p12 = m[1]!, p21 = m[2]!, p22 = m[3]!;
    const g1 = m[4]!, g2 = m[5]!;
    const c1 = m[6]! * tau, c2 = m[7]! * tau;
    current[0] = i;
    speed[0] = w;
    for (let k = 1; k < n; k++) {
      const v = voltage[k - 1]!;
      const iNext = p11 * i + p12 * w + g1 * v + c1;
      w = p21 * i + p22 * w + g2 * v + c2;
      i = iNext;
      current[k] = i;
      speed[k] = w;
    }
    return out;
  }
  let cached = NaN;
  let p11 = 0, p12 = 0, p21 = 0, p22 = 0, g1 = 0, g2 = 0, c1 = 0, c2 = 0;
  current[0] = i;
  speed[0] = w;
  for (let k = 1; k < n; k++) {
    const dt = time[k]! - time[k - 1]!;
    if (dt !== cached) {
      zohInto(m, p, dt);
      p11 = m[0]!; p12 = m[1]!; p21 = m[2]!; p22 = m[3]!;
      g1 = m[4]!; g2 = m[5]!; c1 = m[6]! * tau; c2 = m[7]! * tau;
      cached = dt;
    }
    const v = voltage[k - 1]!;
    const iNext = p11 * i + p12 * w + g1 * v + c1;
    w = p21 * i + p22 * w + g2 * v + c2;
    i = iNext;
    current[k] = i;
    speed[k] = w;
  }
  return out;
}
