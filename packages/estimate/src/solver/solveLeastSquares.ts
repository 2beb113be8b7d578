import { checkSolverOptions } from './checkSolverOptions.js';
import { createNormalEquations } from './createNormalEquations.js';
import { resetNormalEquations } from './resetNormalEquations.js';
import { solveDampedStep } from './solveDampedStep.js';
import { forwardSubstitute } from './choleskyFactor.js';
import type { LeastSquaresProblem, NormalEquations, SolverOptions, SolverResult, StopReason } from './types.js';

/**
 * Minimises a sum of squared residuals with a streaming Levenberg–Marquardt method: the problem
 * accumulates JᵀJ and Jᵀr chunk by chunk, so the solver holds only p×p numbers.
 *
 * ## Method
 * Levenberg–Marquardt with Marquardt's diagonal scaling in Moré's form (D = √diag(JᵀJ), the
 * running maximum over iterations), the damped system (D⁻¹JᵀJD⁻¹ + λI) z = −D⁻¹Jᵀr, δ = D⁻¹z,
 * solved by Cholesky with a symmetric-eigendecomposition fallback, and Nielsen's damping update
 * (λ ← λ·max(1/3, 1 − (2ρ − 1)³) on success, λ ← λ·ν, ν ← 2ν on failure), kept inside a trust
 * region in the scaled variables: the first radius is Δ₀ = `initialStepBound`·‖Dθ₀‖ (MINPACK's
 * `factor`), a step longer than 1.1Δ raises λ by Moré's Newton iteration on 1/‖z(λ)‖, and Δ
 * becomes 2‖z‖ after a step with ρ ≥ 3/4 and ‖z‖/2 after one with ρ < 1/4 or a rejection
 * (Moré 1978, §§4–5). The bound stops a long first Gauss–Newton step from throwing a parameter
 * onto a plateau (NIST BoxBOD from Start 1). A trial whose SSR is
 * not finite is rejected like any bad step. Stopping tests are relative, after Moré: the actual
 * and predicted SSR reduction (`relativeReductionTolerance`), the scaled step against the scaled
 * parameter norm (`stepTolerance`), the cosine between r and the columns of J
 * (`gradientTolerance`); plus an exact zero SSR, `maxIterations`, and a non-finite start. Trial
 * points are evaluated with the Jacobian after an accepted step and without it after a
 * rejected one (then re-evaluated with it if accepted).
 *
 * A reduction or step test only counts as convergence at a first-order stationary point: with
 * unit-norm columns, the cosine between r and the column space of J, ‖P_J r‖/‖r‖ (the relative
 * offset of Bates & Watts; its square is the fraction of rᵀr a Gauss–Newton step could still
 * remove, the quantity behind the relative-function test of Dennis, Gay & Welsch), must be at
 * most `stationarityTolerance` (default 10⁻³, Bates & Watts' suggested level), or the
 * Gauss–Newton step must be below √ε of the scaled parameters (the zero-residual case, where
 * the cosine need not shrink). Otherwise the stop is reported as `'stalled'`, `converged: false`.
 *
 * Optional geodesic acceleration (`geodesicAcceleration`, only for problems that implement
 * `accumulateSecondOrder`): after the velocity v = δ above, the problem adds Jᵀr_vv with r_vv the
 * second directional derivative of r along v, the acceleration a solves the same damped system,
 * (JᵀJ + λD²)·a = −Jᵀr_vv, and the trial step becomes v + a/2 — the second-order term of a
 * geodesic on the model manifold. A trial with 2‖Da‖/‖Dv‖ > α (`accelerationRatio`, 0.75) is
 * rejected without evaluating it and λ is raised; the predicted reduction is that of the
 * linearised model at v + a/2. `dampingScale: 'current'` uses Marquardt's own scaling
 * D = √diag(JᵀJ) at the current point instead of the running maximum; with geodesic acceleration
 * it carries NIST MGH10 from Start 1 along the b1 → 0 valley to the certified minimum (the
 * running maximum keeps the scale of the far start and stalls there).
 *
 * ## References
 * - K. Levenberg (1944), Q. Appl. Math. 2, 164–168, doi:10.1090/qam/10666.
 * - D. W. Marquardt (1963), SIAM J. Appl. Math. 11(2), 431–441, doi:10.1137/0111030.
 * - J. J. Moré (1978), "The Levenberg–Marquardt algorithm: implementation and theory",
 *   Numerical Analysis (Dundee 1977), Springer LNM 630, 105–116, doi:10.1007/BFb0067700.
 * - H. B. Nielsen (1999), "Damping parameter in Marquardt's method", IMM-REP-1999-05, DTU.
 * - J. J. Moré, B. S. Garbow, K. E. Hillstrom (1980), "User guide for MINPACK-1", ANL-80-74
 *   (`factor`: initial step bound, recommended in [0.1, 100]).
 * - D. M. Bates, D. G. Watts (1981), "A relative offset orthogonality convergence criterion for
 *   nonlinear least squares", Technometrics 23(2), 179–183, doi:10.1080/00401706.1981.10486262.
 * - M. K. Transtrum, J. P. Sethna (2012), "Improvements to the Levenberg–Marquardt algorithm for
 *   nonlinear least-squares minimization", arXiv:1201.5885 (geodesic acceleration, α).
 * - M. K. Transtrum, B. B. Machta, J. P. Sethna (2011), "Geometry of nonlinear least squares
 *   with applications to sloppy models and optimization", Phys. Rev. E 83, 036701,
 *   doi:10.1103/PhysRevE.83.036701.
 * - J. E. Dennis, D. M. Gay, R. E. Welsch (1981), "An adaptive nonlinear least-squares
 *   algorithm", ACM TOMS 7(3), 348–368, doi:10.1145/355958.355965.
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

/** √(2⁻⁵²): a Gauss–Newton step below this relative size is lost in half the working digits. */
const SQRT_EPS = 1.4901161193847656e-8;

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
  const q = new Float64Array(p);
  const work = new Float64Array(p * p);
  const { maxIterations, relativeReductionTolerance: ftol, stepTolerance: xtol, gradientTolerance: gtol } = opts;
  // Geodesic acceleration (Transtrum & Sethna 2012): only when asked for and offered.
  const secondOrder =
    opts.geodesicAcceleration && typeof problem.accumulateSecondOrder === 'function' ? problem : null;
  const velocity = secondOrder ? new Float64Array(p) : z;
  const gvv = secondOrder ? new Float64Array(p) : z;
  const za = secondOrder ? new Float64Array(p) : z;
  const ba = secondOrder ? new Float64Array(p) : z;
  const alpha = opts.accelerationRatio;
  const h = opts.secondOrderStep;
  const runningMax = opts.dampingScale === 'running-max';

  let functionEvaluations = 1;
  let jacobianEvaluations = 1;
  let ssr = problem.evaluate(theta, true, resetNormalEquations(cur));
  let iterations = 0;
  let lambda = opts.initialDamping;
  let nu = 2;
  let trialWithJacobian = true;
  let radius = Infinity;

  const finish = (stopReason: StopReason, converged: boolean): SolverResult => {
    let stationarity = NaN;
    if (stopReason !== 'non-finite') {
      const m = measureStationarity(cur, ssr, theta, A, b, z, work);
      stationarity = m.cosine;
      // A step or reduction test met away from a stationary point is a stall, not convergence.
      if (
        converged &&
        (stopReason === 'relative-reduction' || stopReason === 'small-step') &&
        !(m.cosine <= opts.stationarityTolerance || m.step <= SQRT_EPS)
      ) {
        stopReason = 'stalled';
        converged = false;
      }
    }
    return {
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
      stationarity,
    };
  };

  if (!Number.isFinite(ssr) || !allFinite(cur.JtJ) || !allFinite(cur.Jtr)) return finish('non-finite', false);
  if (ssr === 0) return finish('zero-residual', true);
  for (let j = 0; j < p; j++) {
    const djj = Math.sqrt(cur.JtJ[j * p + j]!);
    d[j] = djj > 0 ? djj : 1;
  }
  if (Number.isFinite(opts.initialStepBound)) {
    let dx = 0;
    for (let j = 0; j < p; j++) dx += d[j]! * theta[j]! * (d[j]! * theta[j]!);
    radius = dx > 0 ? opts.initialStepBound * Math.sqrt(dx) : opts.initialStepBound;
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
      if (runningMax ? djj > d[j]! : djj > 0) d[j] = djj;
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
      let how = solveDampedStep(A, lambda, b, p, z, work);
      iterations++;
      if (how !== 'failed' && radius < Infinity) {
        const fitted = fitDampingToRadius(A, b, p, z, work, q, lambda, radius, how);
        if (fitted !== lambda) {
          lambda = fitted;
          how = Number.isFinite(fitted) ? 'cholesky' : 'failed';
          if (!Number.isFinite(fitted)) lambda = 1e300;
        }
      }
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
      let stepNorm = Math.sqrt(stepNorm2);
      // Predicted reduction of the linearised model: zᵀb + λ‖z‖² (≥ 0).
      let predicted = zb + lambda * stepNorm2;
      let smallStep = stepNorm <= xtol * (thetaNorm + xtol);
      if (secondOrder !== null && !smallStep) {
        // Acceleration a = −(JᵀJ + λD²)⁻¹Jᵀr_vv, scaled: (A + λI)·za = −D⁻¹Jᵀr_vv, a = D⁻¹za.
        for (let j = 0; j < p; j++) {
          velocity[j] = z[j]! / d[j]!;
          gvv[j] = 0;
        }
        functionEvaluations++;
        secondOrder.accumulateSecondOrder!(theta, velocity, h, gvv);
        for (let j = 0; j < p; j++) ba[j] = -gvv[j]! / d[j]!;
        let accel = allFinite(ba) && solveDampedStep(A, lambda, ba, p, za, work) !== 'failed';
        let aNorm2 = 0;
        if (accel) for (let j = 0; j < p; j++) aNorm2 += za[j]! * za[j]!;
        accel = accel && Number.isFinite(aNorm2);
        if (accel && 2 * Math.sqrt(aNorm2) > alpha * stepNorm) {
          // Too much curvature for this velocity: reject the trial and raise the damping.
          lambda *= nu;
          nu *= 2;
          if (!(lambda < 1e300)) return finish('non-finite', false);
          continue;
        }
        if (accel) {
          // Step δ = v + a/2; linear-model prediction 2bᵀs − sᵀAs for the scaled step s.
          let bs = 0;
          let sAs = 0;
          stepNorm2 = 0;
          for (let i = 0; i < p; i++) {
            const si = z[i]! + 0.5 * za[i]!;
            ba[i] = si;
            bs += b[i]! * si;
            stepNorm2 += si * si;
          }
          for (let i = 0; i < p; i++) {
            let row = 0;
            for (let j = 0; j < p; j++) row += A[i * p + j]! * ba[j]!;
            sAs += ba[i]! * row;
          }
          for (let j = 0; j < p; j++) trial[j] = theta[j]! + ba[j]! / d[j]!;
          stepNorm = Math.sqrt(stepNorm2);
          predicted = 2 * bs - sAs;
          smallStep = stepNorm <= xtol * (thetaNorm + xtol);
        }
      }

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
        if (rho >= 0.25 && 2 * stepNorm > radius) radius = 2 * stepNorm;
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

/**
 * Raises the damping until the scaled step fits the trust radius (‖z‖ ≤ 1.1·Δ) with Moré's
 * Newton iteration on φ(λ) = 1/Δ − 1/‖z(λ)‖, whose derivative comes from the Cholesky factor L of
 * A + λI: λ ← λ + (‖z‖/‖L⁻¹z‖)²·(‖z‖ − Δ)/Δ (Moré 1978, §5; monotone from below). Leaves z solved
 * for the returned λ; returns `lambda` itself when the step already fits and NaN when no
 * factorisation succeeds.
 */
function fitDampingToRadius(
  A: Float64Array,
  b: Float64Array,
  p: number,
  z: Float64Array,
  work: Float64Array,
  q: Float64Array,
  lambda: number,
  radius: number,
  how: 'cholesky' | 'eigen',
): number {
  let zn = 0;
  for (let j = 0; j < p; j++) zn += z[j]! * z[j]!;
  zn = Math.sqrt(zn);
  if (zn <= 1.1 * radius) return lambda;
  let lam = lambda;
  for (let it = 0; it < 30; it++) {
    let next: number;
    if (how === 'cholesky') {
      // q = L⁻¹z with the factor solveDampedStep left in work.
      forwardSubstitute(work, z, p, q);
      let qn = 0;
      for (let i = 0; i < p; i++) qn += q[i]! * q[i]!;
      next = lam + ((zn * zn) / qn) * ((zn - radius) / radius);
      if (!(next > lam)) next = 2 * lam;
    } else {
      next = 4 * lam;
    }
    lam = next;
    const h = solveDampedStep(A, lam, b, p, z, work);
    if (h === 'failed') return NaN;
    how = h;
    zn = 0;
    for (let j = 0; j < p; j++) zn += z[j]! * z[j]!;
    zn = Math.sqrt(zn);
    if (zn <= 1.1 * radius) return lam;
  }
  return lam;
}

/**
 * First-order optimality at the stopping point, from JᵀJ, Jᵀr and rᵀr alone: with the columns of
 * J scaled to unit norm (C = √diag JᵀJ), the Gauss–Newton step z = (C⁻¹JᵀJC⁻¹)⁺C⁻¹Jᵀr gives
 * ‖P_J r‖² = zᵀC⁻¹Jᵀr, the part of rᵀr a Gauss–Newton step could still remove. Returns the cosine
 * of the angle between r and the column space of J, ‖P_J r‖/‖r‖, and the scaled Gauss–Newton
 * step relative to the scaled parameters, ‖z‖/‖Cθ‖. Uses A, b, z, work as scratch.
 */
function measureStationarity(
  acc: NormalEquations,
  ssr: number,
  theta: Float64Array,
  A: Float64Array,
  b: Float64Array,
  z: Float64Array,
  work: Float64Array,
): { cosine: number; step: number } {
  const p = acc.p;
  const JtJ = acc.JtJ;
  const g = acc.Jtr;
  if (!(ssr > 0)) return { cosine: 0, step: 0 };
  let thetaNorm2 = 0;
  for (let i = 0; i < p; i++) {
    const cii = Math.sqrt(JtJ[i * p + i]!);
    const ci = cii > 0 ? cii : 1;
    for (let j = 0; j < p; j++) {
      const cjj = Math.sqrt(JtJ[j * p + j]!);
      A[i * p + j] = JtJ[i * p + j]! / (ci * (cjj > 0 ? cjj : 1));
    }
    b[i] = g[i]! / ci;
    thetaNorm2 += ci * theta[i]! * (ci * theta[i]!);
  }
  if (solveDampedStep(A, 0, b, p, z, work) === 'failed') return { cosine: NaN, step: NaN };
  let projected = 0;
  let step2 = 0;
  for (let j = 0; j < p; j++) {
    projected += z[j]! * b[j]!;
    step2 += z[j]! * z[j]!;
  }
  const cosine = Math.sqrt((projected > 0 ? (projected < ssr ? projected : ssr) : 0) / ssr);
  return { cosine, step: Math.sqrt(step2) / (thetaNorm2 > 0 ? Math.sqrt(thetaNorm2) : 1) };
}
