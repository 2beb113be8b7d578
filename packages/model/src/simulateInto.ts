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
 * ## Method
 * One step is x_{k+1} = Φ·x_k + Γv·v_k + c with Φ, Γv, Γτ from `zohInto` and c = Γτ·τ_load.
 * Evaluated one step at a time, the speed is set by the chain of dependent floating-point
 * operations per sample, not by the arithmetic. With a uniform interval the recursion is
 * therefore blocked by four: x_{k+4} = Φ⁴·x_k + Σ_{j<4} Φ^{3−j}·(Γv·v_{k+j} + c), with Φ², Φ⁴,
 * ΦΓv, Φ²Γv, Φ³Γv and the summed load term formed once from the one-step matrices by 2×2
 * products. Only this block update is loop-carried (one multiply and two adds per four samples);
 * the three samples inside a block are the ordinary one-step recursion started from x_k, which
 * the processor overlaps with the next block. Both forms are the same linear map, so they differ
 * by rounding only, and Φ⁴ has the spectral radius of Φ to the 4th power, so the difference does not
 * grow with the record length (measured ≤ 5e-13 of the signal scale over 10⁶ samples for a lightly
 * damped motor, the same size as merely reordering the sums of the one-step recursion; see
 * `__tests__/simulateInto.blocked.test.ts`). When the number of steps is not a multiple of four,
 * the first (n − 1) mod 4 steps are single steps; sample times (non-uniform intervals) use single steps
 * throughout, with the input term added first to shorten the chain.
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
  current[0] = i;
  speed[0] = w;
  if (typeof time === 'number') {
    zohInto(m, p, time);
    const p11 = m[0]!, p12 = m[1]!, p21 = m[2]!, p22 = m[3]!;
    const g1 = m[4]!, g2 = m[5]!;
    const c1 = m[6]! * tau, c2 = m[7]! * tau;
    // Block matrices (see ## Method): Q = Φ², S = Φ⁴, ΦΓ, Φ²Γ, Φ³Γ and the load sum (I+Φ+Φ²+Φ³)c.
    const q11 = p11 * p11 + p12 * p21, q12 = p11 * p12 + p12 * p22;
    const q21 = p21 * p11 + p22 * p21, q22 = p21 * p12 + p22 * p22;
    const s11 = q11 * q11 + q12 * q21, s12 = q11 * q12 + q12 * q22;
    const s21 = q21 * q11 + q22 * q21, s22 = q21 * q12 + q22 * q22;
    const h1 = p11 * g1 + p12 * g2, h2 = p21 * g1 + p22 * g2;
    const e1 = q11 * g1 + q12 * g2, e2 = q21 * g1 + q22 * g2;
    const f1 = q11 * h1 + q12 * h2, f2 = q21 * h1 + q22 * h2;
    const d1 = p11 * c1 + p12 * c2 + c1, d2 = p21 * c1 + p22 * c2 + c2; // (I+Φ)c
    const D1 = q11 * d1 + q12 * d2 + d1, D2 = q21 * d1 + q22 * d2 + d2; // (I+Φ²)(I+Φ)c
    // The (n − 1) mod 4 leftover steps go first, as single steps, so that the blocked loop runs to
    // the end of the record (and the JIT has seen every loop before it optimises the hot one).
    const head = 1 + ((n - 1) % 4);
    let k = 1;
    for (; k < head; k++) {
      const v = voltage[k - 1]!;
      const iNext = p11 * i + (g1 * v + c1) + p12 * w;
      w = p22 * w + (g2 * v + c2) + p21 * i;
      i = iNext;
      current[k] = i;
      speed[k] = w;
    }
    for (; k < n; k += 4) {
      const v0 = voltage[k - 1]!, v1 = voltage[k]!, v2 = voltage[k + 1]!, v3 = voltage[k + 2]!;
      // Off the loop-carried chain: the three samples inside the block.
      const a1 = p11 * i + (g1 * v0 + c1) + p12 * w;
      const a2 = p22 * w + (g2 * v0 + c2) + p21 * i;
      current[k] = a1;
      speed[k] = a2;
      const b1 = p11 * a1 + (g1 * v1 + c1) + p12 * a2;
      const b2 = p22 * a2 + (g2 * v1 + c2) + p21 * a1;
      current[k + 1] = b1;
      speed[k + 1] = b2;
      current[k + 2] = p11 * b1 + (g1 * v2 + c1) + p12 * b2;
      speed[k + 2] = p22 * b2 + (g2 * v2 + c2) + p21 * b1;
      // On the chain: x_{k+3} = Φ⁴·x_{k−1} + u, with u independent of the state.
      const u1 = f1 * v0 + D1 + e1 * v1 + (h1 * v2 + g1 * v3);
      const u2 = f2 * v0 + D2 + e2 * v1 + (h2 * v2 + g2 * v3);
      const iNext = s11 * i + u1 + s12 * w;
      w = s22 * w + u2 + s21 * i;
      i = iNext;
      current[k + 3] = i;
      speed[k + 3] = w;
    }
    return out;
  }
  let cached = NaN;
  let p11 = 0, p12 = 0, p21 = 0, p22 = 0, g1 = 0, g2 = 0, c1 = 0, c2 = 0;
  for (let k = 1; k < n; k++) {
    const dt = time[k]! - time[k - 1]!;
    if (dt !== cached) {
      zohInto(m, p, dt);
      p11 = m[0]!; p12 = m[1]!; p21 = m[2]!; p22 = m[3]!;
      g1 = m[4]!; g2 = m[5]!; c1 = m[6]! * tau; c2 = m[7]! * tau;
      cached = dt;
    }
    const v = voltage[k - 1]!;
    const iNext = p11 * i + (g1 * v + c1) + p12 * w;
    w = p22 * w + (g2 * v + c2) + p21 * i;
    i = iNext;
    current[k] = i;
    speed[k] = w;
  }
  return out;
}
