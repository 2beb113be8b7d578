/**
 * Shared shapes of the least-squares core: the streamed problem, the accumulator it fills, the
 * solver options and result, dense curve fits, and covariance summaries.
 */

/**
 * Running sums of the normal equations over a residual vector r(θ) and its Jacobian J = ∂r/∂θ,
 * built chunk by chunk so the solver never holds J. Create it with `createNormalEquations`,
 * fill it with `accumulateNormalEquations`.
 */
export interface NormalEquations {
  /** Number of parameters p. */
  readonly p: number;
  /** Whether chunk totals are added with Neumaier compensation (true) or plainly (false). */
  readonly compensated: boolean;
  /** JᵀJ, p×p row-major; both triangles are kept current after every chunk. */
  readonly JtJ: Float64Array;
  /** Jᵀr, length p. */
  readonly Jtr: Float64Array;
  /** Sum of squared residuals rᵀr accumulated so far. */
  ssr: number;
  /** Number of residual rows accumulated so far. */
  rows: number;
  /** Internal: high parts of the compensated sums (upper triangle of JᵀJ, then Jᵀr, then rᵀr). */
  readonly high: Float64Array;
  /** Internal: compensation terms matching `high`. */
  readonly low: Float64Array;
  /** Internal: per-chunk scratch matching `high`. */
  readonly chunk: Float64Array;
}

/**
 * A least-squares problem for `solveLeastSquares`, described only by how to evaluate it.
 */
export interface LeastSquaresProblem {
  /** Number of parameters p (≥ 1). */
  readonly parameterCount: number;
  /**
   * Evaluates the residuals at `theta` and returns their sum of squares. When `wantJacobian` is
   * true it also adds JᵀJ and Jᵀr into `acc` (normally through `accumulateNormalEquations`).
   * `acc` arrives zeroed. Return NaN or ±Infinity when the residuals cannot be computed; the
   * solver treats that as a failed step, never as an error. Must not keep `theta` (it is reused).
   */
  evaluate(theta: Float64Array, wantJacobian: boolean, acc: NormalEquations): number;
  /**
   * Optional second-order capability, used only when `SolverOptions.geodesicAcceleration` is on:
   * adds Jᵀr_vv into `out` (length p, arrives zeroed), where J = ∂r/∂θ at `theta` and
   * r_vv = d²r(θ + t·v)/dt² at t = 0 is the second directional derivative of the residuals along
   * the velocity `v`. Return it analytically, or by the finite difference
   * r_vv ≈ (2/h)·((r(θ + h·v) − r(θ))/h − J·v) with the step fraction `h` the solver passes.
   * Write NaN when it cannot be computed (the solver then takes the plain step). Must keep
   * neither `theta` nor `v`.
   */
  accumulateSecondOrder?(theta: Float64Array, v: Float64Array, h: number, out: Float64Array): void;
}

/** Why `solveLeastSquares` stopped. */
export type StopReason =
  | 'relative-reduction'
  | 'small-step'
  | 'small-gradient'
  | 'zero-residual'
  | 'stalled'
  | 'max-iterations'
  | 'non-finite'
  /** A positive constant ran off by more than six decades from every start: a boundary, not an optimum. */
  | 'ran-off';

/** Options of `solveLeastSquares`; `checkSolverOptions` fills the defaults. */
export interface SolverOptions {
  /**
   * Most trial steps (each one evaluation of the residuals).
   * @default 200
   */
  maxIterations?: number;
  /**
   * Stop when both the actual and the predicted relative reduction of the SSR over an accepted
   * step are at most this value (Moré's `ftol` test).
   * @default 1e-10
   */
  relativeReductionTolerance?: number;
  /**
   * Stop when the scaled step is at most this value times the scaled parameter norm (Moré's
   * `xtol` test).
   * @default 1e-10
   */
  stepTolerance?: number;
  /**
   * Stop when the largest cosine between the residual vector and a Jacobian column is at most
   * this value (Moré's `gtol` test).
   * @default 1e-12
   */
  gradientTolerance?: number;
  /**
   * Starting damping λ₀, relative to the scaled normal matrix (whose diagonal is ≤ 1).
   * @default 1e-3
   */
  initialDamping?: number;
  /**
   * Add chunk totals with Neumaier compensation (true) or plainly (false).
   * @default true
   */
  compensatedSums?: boolean;
  /**
   * Initial trust radius as a multiple of the scaled start norm, Δ₀ = factor·‖Dθ₀‖ (MINPACK's
   * `factor`, recommended in [0.1, 100]); `Infinity` switches the trust region off. The default 1
   * keeps BoxBOD (NIST StRD, Start 1) from jumping onto its plateau and left the other 53 NIST
   * runs within a few iterations of the unbounded solver.
   * @default 1
   */
  initialStepBound?: number;
  /**
   * Largest cosine between r and the column space of J at which a reduction or step stop counts
   * as converged (Bates & Watts' relative-offset level); above it the stop is `'stalled'`.
   * @default 1e-3
   */
  stationarityTolerance?: number;
  /**
   * Add Transtrum & Sethna's geodesic acceleration to every trial step when the problem offers
   * `accumulateSecondOrder` (ignored otherwise). Off by default in `solveLeastSquares` and
   * `fitCurve` (on, it lowered the LRE of some NIST StRD runs; see the package README).
   * @default false
   */
  geodesicAcceleration?: boolean;
  /**
   * Largest ratio 2‖a‖/‖v‖ of acceleration to velocity (scaled norms) at which an accelerated
   * step is tried; above it the trial is rejected and the damping raised (Transtrum & Sethna's α).
   * @default 0.75
   */
  accelerationRatio?: number;
  /**
   * Step fraction h of the finite-difference second directional derivative, θ + h·v.
   * @default 0.1
   */
  secondOrderStep?: number;
  /**
   * Diagonal scaling D of the damping: `'running-max'` (Moré: the largest √diag(JᵀJ) seen so
   * far) or `'current'` (Marquardt: √diag(JᵀJ) at the current point).
   * @default 'running-max'
   */
  dampingScale?: 'running-max' | 'current';
}

/** The resolved options (every field present). */
export type ResolvedSolverOptions = Required<SolverOptions>;

/** What `solveLeastSquares` returns. */
export interface SolverResult {
  /** Best parameters found. */
  theta: Float64Array;
  /** Sum of squared residuals at `theta`. */
  ssr: number;
  /** Trial steps taken. */
  iterations: number;
  /** Evaluations that accumulated the normal equations. */
  jacobianEvaluations: number;
  /** All evaluations of the residuals (with or without the Jacobian). */
  functionEvaluations: number;
  /**
   * True when a relative convergence test stopped the solver at a first-order stationary point
   * (see `stationarity`), or at an exact fit.
   */
  converged: boolean;
  /** Which test stopped the solver. */
  stopReason: StopReason;
  /** JᵀJ at `theta`, p×p row-major (empty-filled with NaN when it could not be evaluated). */
  JtJ: Float64Array;
  /** Jᵀr at `theta` (half the gradient of the SSR). */
  gradient: Float64Array;
  /** Number of residual rows the problem accumulated at `theta`. */
  rows: number;
  /** Damping λ in use when the solver stopped (relative to the scaled normal matrix). */
  damping: number;
  /**
   * Cosine of the angle between the residual vector and the column space of J at `theta`
   * (‖P_J r‖/‖r‖; 0 at an exact stationary point, 1 when a Gauss–Newton step could remove all
   * of rᵀr); NaN after a non-finite stop.
   */
  stationarity: number;
}

/** Predictor columns of a dense curve fit: one column, or several of equal length. */
export type CurveInputs = Float64Array | readonly Float64Array[];

/**
 * Model of a dense curve fit: writes the predictions for every point into `out`.
 * `x` always arrives as an array of columns.
 */
export type CurveModel = (theta: Float64Array, x: readonly Float64Array[], out: Float64Array) => void;

/**
 * Analytic Jacobian of a curve model: writes ∂model/∂θⱼ for point k into `out[j * n + k]`
 * (column-major, n points).
 */
export type CurveJacobian = (theta: Float64Array, x: readonly Float64Array[], out: Float64Array) => void;

/** Input of `fitCurve`. */
export interface FitCurveInput {
  /** Predictor column(s), n points each. */
  x: CurveInputs;
  /** Observed response, n points. */
  y: Float64Array;
  /** The model. */
  model: CurveModel;
  /** Analytic Jacobian; when absent a central-difference Jacobian with relative steps is used. */
  jacobian?: CurveJacobian;
  /** Starting parameters, length p. */
  start: ArrayLike<number>;
  /** Solver options. */
  options?: SolverOptions;
  /** Relative singular-value threshold of the covariance (see `covarianceFromJacobian`). */
  rankTolerance?: number;
}

/** What `fitCurve` returns: the solver result plus residuals and covariance at the optimum. */
export interface FitCurveResult extends SolverResult {
  /** model − y at `theta`. */
  residuals: Float64Array;
  /** Covariance summary at `theta`. */
  covariance: CovarianceSummary;
}

/** Covariance of least-squares estimates, from the Jacobian or the normal matrix at the optimum. */
export interface CovarianceSummary {
  /** Residual variance σ² = SSR/(n − p). */
  residualVariance: number;
  /** Degrees of freedom n − p. */
  degreesOfFreedom: number;
  /** Covariance σ²(JᵀJ)⁺, p×p row-major, restricted to the identifiable directions. */
  covariance: Float64Array;
  /** Standard errors √diag(covariance); NaN for parameters marked not identifiable. */
  standardErrors: Float64Array;
  /** Singular values of the column-scaled Jacobian, largest first. */
  singularValues: Float64Array;
  /** Largest over smallest singular value of the column-scaled Jacobian (Infinity when one is 0). */
  conditionNumber: number;
  /** Per parameter: false when it loads on a direction whose singular value was dropped. */
  identifiable: boolean[];
  /** Number of singular values kept. */
  rank: number;
}
