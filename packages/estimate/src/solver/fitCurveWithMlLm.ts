import { levenbergMarquardt } from '../matrices.js';
import { checkCurveInputs } from './checkCurveInputs.js';
import { checkSolverOptions } from './checkSolverOptions.js';
import type { CurveInputs, CurveModel, SolverOptions, StopReason } from './types.js';

/** Input of `fitCurveWithMlLm` (same model shape as `fitCurve`; Jacobian by the library's differences). */
export interface FitCurveWithMlLmInput {
  /** Predictor column(s), n points each. */
  x: CurveInputs;
  /** Observed response, n points. */
  y: Float64Array;
  /** The model (vectorised, as for `fitCurve`). */
  model: CurveModel;
  /** Starting parameters; every entry must be non-zero (the fit is relative to it). */
  start: ArrayLike<number>;
  /** `maxIterations` (per library call, in rounds of 10) and `relativeReductionTolerance` are used. */
  options?: SolverOptions;
}

/** What `fitCurveWithMlLm` returns. */
export interface FitCurveWithMlLmResult {
  theta: Float64Array;
  ssr: number;
  /** Library iterations summed over rounds. */
  iterations: number;
  converged: boolean;
  stopReason: StopReason;
}

/**
 * A thin adapter around ml-levenberg-marquardt 5.1 for small dense curve fits. The library's
 * finite-difference step is an absolute 0.1 by default and it stops only on an absolute error
 * tolerance; the adapter therefore fits u = θ/θ₀ (so a step of 1e-6 in u is relative in θ), uses
 * central differences, keeps weights at 1, and runs the library in rounds of 10 iterations,
 * stopping when a round lowers the SSR by less than `relativeReductionTolerance` relative.
 *
 * @param input - predictors, response, model, non-zero start, options
 * @returns parameters, SSR, iterations, `converged` and `stopReason`
 * @throws TypeError for wrong shapes
 * @throws RangeError when a start entry is zero or non-finite
 * @example
 * fitCurveWithMlLm({ x, y, model, start: [1, 1] }).theta; // ≈ fitted parameters
 */
export function fitCurveWithMlLm(input: FitCurveWithMlLmInput): FitCurveWithMlLmResult {
  const fn = 'fitCurveWithMlLm';
  const x = checkCurveInputs(input.x, input.y, fn);
  const opts = checkSolverOptions(input.options, fn);
  const p = input.start.length;
  const scale = Float64Array.from(input.start);
  scale.forEach((v, j) => {
    if (!Number.isFinite(v) || v === 0) throw new RangeError(`${fn}: input.start[${j}] must be finite and non-zero (got ${v})`);
  });
  const n = input.y.length;
  const theta = new Float64Array(p);
  const pred = new Float64Array(n);
  // The library calls f(params) then the returned function once per point in order; evaluate the
  // vectorised model once per parameter vector and serve points from the buffer.
  const parameterized = (u: number[]) => {
    for (let j = 0; j < p; j++) theta[j] = u[j]! * scale[j]!;
    const out = new Float64Array(n);
    input.model(theta, x, out);
    return (k: number) => out[k]!;
  };
  const index = Array.from({ length: n }, (_, k) => k);
  const ssrAt = (u: ArrayLike<number>): number => {
    for (let j = 0; j < p; j++) theta[j] = u[j]! * scale[j]!;
    input.model(theta, x, pred);
    let s = 0;
    for (let k = 0; k < n; k++) s += (pred[k]! - input.y[k]!) ** 2;
    return s;
  };
  let u = new Array<number>(p).fill(1);
  let ssr = ssrAt(u);
  let iterations = 0;
  let stopReason: StopReason = 'max-iterations';
  while (iterations < opts.maxIterations) {
    const r = levenbergMarquardt({ x: index, y: Array.from(input.y) }, parameterized, {
      initialValues: u,
      maxIterations: Math.min(10, opts.maxIterations - iterations),
      gradientDifference: 1e-6,
      centralDifference: true,
      errorTolerance: 0,
    });
    iterations += r.iterations;
    const next = ssrAt(r.parameterValues);
    if (!Number.isFinite(next)) {
      stopReason = 'non-finite';
      break;
    }
    const improved = next < ssr;
    if (improved) u = r.parameterValues;
    const drop = ssr - next;
    if (improved) ssr = next;
    if (!improved || drop <= opts.relativeReductionTolerance * (ssr + drop)) {
      stopReason = 'relative-reduction';
      break;
    }
  }
  const out = Float64Array.from(u, (v, j) => v * scale[j]!);
  return { theta: out, ssr, iterations, converged: stopReason === 'relative-reduction', stopReason };
}
