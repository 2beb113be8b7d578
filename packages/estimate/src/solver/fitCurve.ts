import { checkCurveInputs } from './checkCurveInputs.js';
import { covarianceFromJacobian } from './covarianceFromJacobian.js';
import { createCurveProblem } from './createCurveProblem.js';
import { solveLeastSquares } from './solveLeastSquares.js';
import type { FitCurveInput, FitCurveResult } from './types.js';

/**
 * Fits a curve y ≈ model(x; θ) to n points by least squares on the streaming solver, with an
 * analytic Jacobian or a central-difference one (relative steps), and returns the covariance at
 * the optimum from the SVD of the dense Jacobian.
 *
 * ## Method
 * `solveLeastSquares` (Levenberg–Marquardt, Moré's scaling and relative stopping tests) on the
 * residuals r = model − y (`createCurveProblem`); `covarianceFromJacobian` at the optimum. The
 * problem also offers Jᵀr_vv by Transtrum & Sethna's finite difference, so
 * `options.geodesicAcceleration: true` switches on geodesic acceleration (off by default: over
 * the 54 NIST StRD runs it helped MGH10 Start 1 only together with `dampingScale: 'current'`
 * and lowered the LRE of Lanczos3 Start 1 from 10.1 to 6.4).
 *
 * ## References
 * - J. J. Moré (1978), Numerical Analysis (Dundee 1977), Springer LNM 630, 105–116, doi:10.1007/BFb0067700.
 * - M. K. Transtrum, J. P. Sethna (2012), arXiv:1201.5885 (geodesic acceleration).
 *
 * @param input - predictors `x` (one column or several), response `y`, `model`, optional
 *   `jacobian`, `start`, solver `options`, covariance `rankTolerance`
 * @returns the solver result plus `residuals` (model − y) and `covariance`
 * @throws TypeError when shapes or types are wrong (names the field and index)
 * @throws RangeError when data or start hold non-finite values, or n < p
 * @example
 * const x = Float64Array.of(0, 1, 2, 3), y = Float64Array.of(1, 3, 5, 7);
 * const fit = fitCurve({ x, y, start: [0, 0],
 *   model: (t, [c], out) => { for (let k = 0; k < out.length; k++) out[k] = t[0] + t[1] * c[k]; } });
 * fit.theta; // ≈ [1, 2]
 */
export function fitCurve(input: FitCurveInput): FitCurveResult {
  const fn = 'fitCurve';
  if (input === null || typeof input !== 'object') throw new TypeError(`${fn}: input must be an object`);
  const { y, model, jacobian, start } = input;
  const x = checkCurveInputs(input.x, y, fn);
  if (typeof model !== 'function') throw new TypeError(`${fn}: input.model must be a function`);
  if (jacobian !== undefined && typeof jacobian !== 'function') {
    throw new TypeError(`${fn}: input.jacobian must be a function when given`);
  }
  if (start === null || typeof start !== 'object' || typeof start.length !== 'number' || start.length < 1) {
    throw new TypeError(`${fn}: input.start must be a non-empty array of numbers`);
  }
  const n = y.length;
  const p = start.length;
  if (n < p) throw new RangeError(`${fn}: need at least as many points as parameters (n = ${n}, p = ${p})`);

  const problem = createCurveProblem(x, y, model, jacobian, p);
  const result = solveLeastSquares(problem, start, input.options);
  const residuals = Float64Array.from(problem.residualsAt(result.theta));
  const J = problem.jacobianAt(result.theta);
  const covariance =
    Number.isFinite(result.ssr) && J.every(Number.isFinite)
      ? covarianceFromJacobian(J, n, p, result.ssr, input.rankTolerance ?? 1e-10)
      : covarianceFromJacobian(new Float64Array(n * p), n, p, 0);
  return { ...result, residuals, covariance };
}
