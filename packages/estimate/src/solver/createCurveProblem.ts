import { accumulateNormalEquations } from './accumulateNormalEquations.js';
import { centralDifferenceJacobian } from './centralDifferenceJacobian.js';
import type { CurveJacobian, CurveModel, LeastSquaresProblem, NormalEquations } from './types.js';

/** A dense curve problem: the streamed problem plus the residual buffer it last filled. */
export interface CurveProblem extends LeastSquaresProblem {
  /** Fills and returns the residuals model − y at `theta` (a view reused between calls). */
  residualsAt(theta: Float64Array): Float64Array;
  /** Fills and returns the Jacobian at `theta`, column-major n × p (a view reused between calls). */
  jacobianAt(theta: Float64Array): Float64Array;
  /** Adds Jᵀr_vv into `out` (see {@link LeastSquaresProblem.accumulateSecondOrder}). */
  accumulateSecondOrder(theta: Float64Array, v: Float64Array, h: number, out: Float64Array): void;
}

/**
 * Wraps a dense curve y ≈ model(x; θ) as a `LeastSquaresProblem` for `solveLeastSquares`, with the
 * residuals r = model − y, an analytic or central-difference Jacobian, and the optional
 * second-order term Jᵀr_vv used by geodesic acceleration. Inputs are assumed already checked (this
 * is the kernel behind `fitCurve`).
 *
 * ## Method
 * r_vv, the second derivative of r(θ + t·v) at t = 0, is estimated by the one-sided difference
 * of Transtrum & Sethna (2012): r_vv ≈ (2/h)·((r(θ + h·v) − r(θ))/h − J·v), error O(h·‖v‖³);
 * r(θ) and J(θ) are reused from the last evaluation at the same θ, so a call costs one model
 * evaluation after an accepted step.
 *
 * ## References
 * M. K. Transtrum, J. P. Sethna (2012), "Improvements to the Levenberg–Marquardt algorithm for
 * nonlinear least-squares minimization", arXiv:1201.5885.
 *
 * @param x - predictor columns, n points each
 * @param y - observed response, n points
 * @param model - the curve model
 * @param jacobian - analytic Jacobian, or undefined for central differences
 * @param p - number of parameters
 * @returns the problem (holds O(n·p) scratch; not re-entrant)
 * @example
 * const prob = createCurveProblem([Float64Array.of(0, 1)], Float64Array.of(1, 3),
 *   (t, [c], o) => { for (let k = 0; k < o.length; k++) o[k] = t[0] + t[1] * c[k]; }, undefined, 2);
 * solveLeastSquares(prob, [0, 0]).theta; // ≈ [1, 2]
 */
export function createCurveProblem(
  x: readonly Float64Array[],
  y: Float64Array,
  model: CurveModel,
  jacobian: CurveJacobian | undefined,
  p: number,
): CurveProblem {
  const n = y.length;
  const pred = new Float64Array(n);
  const r = new Float64Array(n);
  const J = new Float64Array(n * p);
  const plus = new Float64Array(n);
  const minus = new Float64Array(n);
  const shifted = new Float64Array(p);
  // The θ at which r and J were last filled (NaN: not yet).
  const rAt = new Float64Array(p).fill(NaN);
  const jAt = new Float64Array(p).fill(NaN);
  const same = (a: Float64Array, b: Float64Array): boolean => {
    for (let j = 0; j < p; j++) if (a[j] !== b[j]) return false;
    return true;
  };
  const residualsAt = (theta: Float64Array): Float64Array => {
    model(theta, x, pred);
    for (let k = 0; k < n; k++) r[k] = pred[k]! - y[k]!;
    rAt.set(theta);
    return r;
  };
  const jacobianAt = (theta: Float64Array): Float64Array => {
    if (jacobian) jacobian(theta, x, J);
    else centralDifferenceJacobian(model, theta, x, J, plus, minus);
    jAt.set(theta);
    return J;
  };
  return {
    parameterCount: p,
    residualsAt,
    jacobianAt,
    evaluate(theta: Float64Array, wantJacobian: boolean, acc: NormalEquations): number {
      residualsAt(theta);
      if (wantJacobian) jacobianAt(theta);
      accumulateNormalEquations(acc, r, wantJacobian ? J : null, n);
      return acc.ssr;
    },
    accumulateSecondOrder(theta: Float64Array, v: Float64Array, h: number, out: Float64Array): void {
      if (!same(jAt, theta)) jacobianAt(theta);
      if (!same(rAt, theta)) residualsAt(theta);
      for (let j = 0; j < p; j++) shifted[j] = theta[j]! + h * v[j]!;
      model(shifted, x, plus);
      // minus ← r_vv = (2/h)·((model(θ + h·v) − y − r)/h − J·v)
      const c1 = 2 / (h * h);
      const c2 = 2 / h;
      for (let k = 0; k < n; k++) minus[k] = c1 * (plus[k]! - y[k]! - r[k]!);
      for (let j = 0; j < p; j++) {
        const vj = c2 * v[j]!;
        const o = j * n;
        for (let k = 0; k < n; k++) minus[k] = minus[k]! - vj * J[o + k]!;
      }
      for (let j = 0; j < p; j++) {
        const o = j * n;
        let s = 0;
        for (let k = 0; k < n; k++) s += J[o + k]! * minus[k]!;
        out[j] = out[j]! + s;
      }
    },
  };
}
