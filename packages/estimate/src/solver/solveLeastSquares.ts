import { checkSolverOptions } from './checkSolverOptions.js';
import { createNormalEquations } from './createNormalEquations.js';
import { resetNormalEquations } from './resetNormalEquations.js';
import { solveDampedStep } from './solveDampedStep.js';
import type { LeastSquaresProblem, NormalEquations, SolverOptions, SolverResult, StopReason } from './types.js';

/**
 * Minimises a sum of squared residuals with a streaming Levenberg–Marquardt method: the problem
 * accumulates JᵀJ and Jᵀr chunk by chunk, so the solver holds only p×p numbers.
 *
 * ## Method
 * Levenberg–Marquardt with Marquardt's diagonal scaling in Moré's form (D = √diag(JᵀJ), the
 * running maximum over iterations), the damped system (D⁻¹JᵀJD⁻¹ + λI) z = −D⁻¹Jᵀr, δ = D⁻¹z,
 * solved by Cholesky with a symmetric-eigendecomposition fallback, and Nielsen's damping update
 * (λ ← λ·max(1/3, 1 − (2ρ − 1)³) on success, λ ← λ·ν, ν ← 2ν on failure). A trial whose SSR is
 * not finite is rejected like any bad step. Stopping tests are relative, after Moré: the actual
 * and predicted SSR reduction (`relativeReductionTolerance`), the scaled step against the scaled
 * parameter norm (`stepTolerance`), the cosine between r and the columns of J
 * (`gradientTolerance`); plus an exact zero SSR, `maxIterations`, and a non-finite start. Trial
 * points are evaluated with the Jacobian after an accepted step and without it after a
 * rejected one (then re-evaluated with it if accepted).
 *
 * ## References
 * - K. Levenberg (1944), Q. Appl. Math. 2, 164–168, doi:10.1090/qam/10666.
 * - D. W. Marquardt (1963), SIAM J. Appl. Math. 11(2), 431–441, doi:10.1137/0111030.
 * - J. J. Moré (1978), "The Levenberg–Marquardt algorithm: implementation and theory",
 *   Lecture Notes in Mathematics 630, 105–116, doi:10.1007/BFb0067700.
 * - H. B. Nielsen (1999), "Damping parameter in Marquardt's method", IMM-REP-1999-05, DTU.
 *
 * @param problem - parameter count and the `evaluate` callback
 * @param start - starting parameters, length p, finite
 * @param options - stopping tolerances and limits (see {@link SolverOptions})
 * @returns the best parameters with SSR, counts, `converged`, `stopReason`, JᵀJ and Jᵀr there
 * @throws TypeError when `problem` or `start` has the wrong shape
 * @throws RangeError when `start` holds a non-finite value or an option is out of range
 * @example
 * // fit y = a·x through (1, 2), (2, 4): r = a·x − y, J = x
 * const x = Float64Array.of(1, 2), y = Float64Array.of(2, 4), r = new Float64Array(2);
 * const res = solveLeastSquares({ parameterCount: 1, evaluate(t, wantJ, acc) {
 *   for (let k = 0; k < 2; k++) r[k] = t[0] * x[k] - y[k];
 *   accumulateNormalEquations(acc, r, wantJ ? x : null, 2);
 *   return acc.ssr;
 * } }, [0]);
 * res.theta[0]; // ≈ 2
 */
export function solveLeastSquares(
  problem: LeastSquaresProblem,
  start: ArrayLike<number>,
  options?: SolverOptions,
): SolverResult {
  const fn = 'solveLeastSquares';
  if (problem === null || typeof problem !== 'object' || typeof problem.evaluate !== 'function') {
    throw new TypeError(`${fn}: problem must be an object with an evaluate function`);
  }
  const p = problem.parameterCount;
  if (typeof p !== 'number' || !Number.isInteger(p) || p < 1) {
    throw new RangeError(`${fn}: problem.parameterCount must be an integer >= 1 (got ${String(p)})`);
  }
  if (start === null || typeof start !== 'object' || typeof start.length !== 'number') {
    throw new TypeError(`${fn}: start must be an array of numbers`);
  }
  if (start.length !== p) {
    throw new TypeError(`${fn}: start must have length ${p} (got ${start.length})`);
  }
  for (let j = 0; j < p; j++) {
    const v = start[j];
    if (typeof v !== 'number') throw new TypeError(`${fn}: start[${j}] must be a number (got ${typeof v})`);
    if (!Number.isFinite(v)) throw new RangeError(`${fn}: start[${j}] must be finite (got ${v})`);
  }
  const opts = checkSolverOptions(options, fn);
  return runLevenbergMarquardt(problem, Float64Array.from(start), opts);
}

function allFinite(a: Float64Array): boolean {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return false;
  return true;
}

function runLevenbergMarquardt(
  problem: LeastSquaresProblem,
  theta: Float64Array,
  opts: ReturnType<typeof checkSolverOptions>,
): SolverResult {
  const p = theta.length;
  let cur: NormalEquations = createNormalEquations(p, opts.compensatedSums);
  let trialAcc: NormalEquations = createNormalEquations(p, opts.compensatedSums);
  const trial = new Float64Array(p);
  const d = new Float64Array(p);
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  const z = new Float64Array(p);
  const work = new Float64Array(p * p);
  const { maxIterations, relativeReductionTolerance: ftol, stepTolerance: xtol, gradientTolerance: gtol } = opts;

  let functionEvaluations = 1;
  let jacobianEvaluations = 1;
  let ssr = problem.evaluate(theta, true, resetNormalEquations(cur));
  let iterations = 0;
  let lambda = opts.initialDamping;
  let nu = 2;
  let trialWithJacobian = true;

  const finish = (stopReason: StopReason, converged: boolean): SolverResult => ({
    theta,
    ssr,
    iterations,
    jacobianEvaluations,
    functionEvaluations,
    converged,
    stopReason,
    JtJ: Float64Array.from(cur.JtJ),
    gradient: Float64Array.from(cur.Jtr),
    rows: cur.rows,
    damping: lambda,
  });

  if (!Number.isFinite(ssr) || !allFinite(cur.JtJ) || !allFinite(cur.Jtr)) return finish('non-finite', false);
  if (ssr === 0) return finish('zero-residual', true);
  for (let j = 0; j < p; j++) {
    const djj = Math.sqrt(cur.JtJ[j * p + j]!);
    d[j] = djj > 0 ? djj : 1;
  }

  for (;;) {
    // Moré's gradient test: largest |cos| between r and a column of J.
    const JtJ = cur.JtJ;
    const g = cur.Jtr;
    let gmax = 0;
    const rnorm = Math.sqrt(ssr);
    for (let j = 0; j < p; j++) {
      const cj = Math.sqrt(JtJ[j * p + j]!);
      if (cj > 0) {
        const c = Math.abs(g[j]!) / (cj * rnorm);
        if (c > gmax) gmax = c;
      }
    }
    if (gmax <= gtol) return finish('small-gradient', true);

    for (let j = 0; j < p; j++) {
      const djj = Math.sqrt(JtJ[j * p + j]!);
      if (djj > d[j]!) d[j] = djj;
    }
    for (let i = 0; i < p; i++) {
      const di = d[i]!;
      for (let j = 0; j < p; j++) A[i * p + j] = JtJ[i * p + j]! / (di * d[j]!);
      b[i] = -g[i]! / di;
    }
    let thetaNorm2 = 0;
    for (let j = 0; j < p; j++) thetaNorm2 += d[j]! * theta[j]! * (d[j]! * theta[j]!);
    const thetaNorm = Math.sqrt(thetaNorm2);

    // Inner loop: raise λ until a step is accepted or a test stops the run.
    for (;;) {
      if (iterations >= maxIterations) return finish('max-iterations', false);
      const how = solveDampedStep(A, lambda, b, p, z, work);
      iterations++;
      if (how === 'failed') {
        lambda *= nu;
        nu *= 2;
        if (!(lambda < 1e300)) return finish('non-finite', false);
        continue;
      }
      let stepNorm2 = 0;
      let zb = 0;
      for (let j = 0; j < p; j++) {
        const zj = z[j]!;
        trial[j] = theta[j]! + zj / d[j]!;
        stepNorm2 += zj * zj;
        zb += zj * b[j]!;
      }
      const stepNorm = Math.sqrt(stepNorm2);
      // Predicted reduction of the linearised model: zᵀb + λ‖z‖² (≥ 0).
      const predicted = zb + lambda * stepNorm2;
      const smallStep = stepNorm <= xtol * (thetaNorm + xtol);

      functionEvaluations++;
      if (trialWithJacobian) jacobianEvaluations++;
      let trialSsr = problem.evaluate(trial, trialWithJacobian, resetNormalEquations(trialAcc));
      let finite = Number.isFinite(trialSsr);
      const actual = ssr - trialSsr;
      if (finite && actual > 0) {
        if (!trialWithJacobian) {
          functionEvaluations++;
          jacobianEvaluations++;
          trialSsr = problem.evaluate(trial, true, resetNormalEquations(trialAcc));
        }
        finite = Number.isFinite(trialSsr) && allFinite(trialAcc.JtJ) && allFinite(trialAcc.Jtr);
        if (!finite) return finish('non-finite', false);
        const rho = predicted > 0 ? actual / predicted : 0;
        const swap = cur;
        cur = trialAcc;
        trialAcc = swap;
        theta.set(trial);
        const oldSsr = ssr;
        ssr = trialSsr;
        const t = 2 * rho - 1;
        lambda *= Math.max(1 / 3, 1 - t * t * t);
        if (lambda < 1e-300) lambda = 1e-300;
        nu = 2;
        trialWithJacobian = true;
        if (ssr === 0) return finish('zero-residual', true);
        if (actual <= ftol * oldSsr && predicted <= ftol * oldSsr && rho <= 2) {
          return finish('relative-reduction', true);
        }
        if (smallStep) return finish('small-step', true);
        break;
      }
      // Rejected step.
      trialWithJacobian = false;
      if (finite) {
        if (predicted <= ftol * ssr && Math.abs(actual) <= ftol * ssr) return finish('relative-reduction', true);
        if (smallStep) return finish('small-step', true);
      } else if (smallStep) {
        return finish('non-finite', false);
      }
      lambda *= nu;
      nu *= 2;
      if (!(lambda < 1e300)) return finish(finite ? 'small-step' : 'non-finite', finite);
    }
  }
}
