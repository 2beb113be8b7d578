import type { CurveModel } from './types.js';

/** Cube root of the double-precision machine epsilon: the usual central-difference step factor. */
const STEP = Math.cbrt(Number.EPSILON);

/**
 * Central-difference Jacobian of a curve model with relative steps hⱼ = ε^(1/3)·|θⱼ| (ε^(1/3)
 * when θⱼ = 0), dividing by the representable width (θⱼ + hⱼ) − (θⱼ − hⱼ).
 *
 * ## Method
 * Second-order central differences, (f(θ + hⱼeⱼ) − f(θ − hⱼeⱼ)) / (2hⱼ).
 *
 * ## References
 * J. E. Dennis, R. B. Schnabel (1996), Numerical Methods for Unconstrained Optimization and
 * Nonlinear Equations, SIAM, §5.6, doi:10.1137/1.9781611971200.
 *
 * @param model - the curve model
 * @param theta - parameters (restored on return)
 * @param x - predictor columns
 * @param out - Jacobian, column-major n × p (∂model[k]/∂θⱼ at `out[j * n + k]`)
 * @param plus - scratch, length n
 * @param minus - scratch, length n
 * @returns `out`
 * @example
 * // model θ₀·x at x = [1, 2]: Jacobian ≈ [1, 2]
 * centralDifferenceJacobian((t, x, o) => { o[0] = t[0] * x[0][0]; o[1] = t[0] * x[0][1]; },
 *   Float64Array.of(3), [Float64Array.of(1, 2)], new Float64Array(2), new Float64Array(2), new Float64Array(2));
 */
export function centralDifferenceJacobian(
  model: CurveModel,
  theta: Float64Array,
  x: readonly Float64Array[],
  out: Float64Array,
  plus: Float64Array,
  minus: Float64Array,
): Float64Array {
  const n = plus.length;
  const p = theta.length;
  for (let j = 0; j < p; j++) {
    const t = theta[j]!;
    const a = Math.abs(t);
    const hRaw = STEP * (a > 0 ? a : 1);
    const up = t + hRaw;
    const down = t - hRaw;
    theta[j] = up;
    model(theta, x, plus);
    theta[j] = down;
    model(theta, x, minus);
    theta[j] = t;
    const width = up - down;
    const o = j * n;
    for (let k = 0; k < n; k++) out[o + k] = (plus[k]! - minus[k]!) / width;
  }
  return out;
}
