/** Runs one StRD dataset from one start through `fitCurve` and scores it (test and bench support). */
import { fitCurve } from '../../solver/fitCurve.js';
import { logRelativeError } from '../../solver/logRelativeError.js';
import type { FitCurveResult, SolverOptions } from '../../solver/types.js';
import type { StrdDataset } from './parseStrdNonlinear.js';
import { STRD_MODELS } from './strdModels.js';

/** Tight tolerances for the certification runs (NIST asks for as many digits as possible). */
export const STRD_OPTIONS: SolverOptions = {
  maxIterations: 5000,
  relativeReductionTolerance: 1e-15,
  stepTolerance: 1e-15,
  gradientTolerance: 1e-15,
};

/**
 * Runs that need more than the default solver: geodesic acceleration (Transtrum & Sethna 2012)
 * with Marquardt's current-point scaling. Only MGH10 Start 1 (it stalls at b1 → 0 without them).
 * Over all 54 runs this pair would move MGH17 Start 1 and BoxBOD Start 1 to other stationary
 * points, so it is not a default.
 */
export const STRD_RUN_OPTIONS: Readonly<Record<string, SolverOptions>> = {
  'MGH10 1': { geodesicAcceleration: true, dampingScale: 'current' },
};

/** Solver options of one run: {@link STRD_OPTIONS} plus any entry of {@link STRD_RUN_OPTIONS}. */
export function strdRunOptions(name: string, start: 1 | 2): SolverOptions {
  return { ...STRD_OPTIONS, ...STRD_RUN_OPTIONS[`${name} ${start}`] };
}

/** Scores of one fit against the certified values. */
export interface StrdScore {
  fit: FitCurveResult;
  /** LRE of each parameter. */
  parameterLre: number[];
  /** LRE of the residual sum of squares. */
  rssLre: number;
  /** LRE of each standard deviation. */
  sdLre: number[];
}

/** Response used in the fit: y, or log(y) for Nelson. */
export function strdResponse(ds: StrdDataset): Float64Array {
  const name = ds.name.replace(/\.dat$/, '');
  return STRD_MODELS[name]!.logResponse ? ds.y.map(Math.log) : ds.y;
}

/**
 * Fits a dataset from start 1 or 2 with the analytic Jacobian (or central differences).
 *
 * @param ds - parsed dataset
 * @param start - 1 or 2
 * @param analytic - analytic Jacobian (default) or central differences
 * @param options - solver options (default {@link STRD_OPTIONS})
 * @returns the fit and its LREs
 */
export function fitStrd(ds: StrdDataset, start: 1 | 2, analytic = true, options = STRD_OPTIONS): StrdScore {
  const name = ds.name.replace(/\.dat$/, '');
  const m = STRD_MODELS[name];
  if (!m) throw new Error(`no model for ${name}`);
  const fit = fitCurve({
    x: ds.x,
    y: strdResponse(ds),
    model: m.model,
    ...(analytic ? { jacobian: m.jacobian } : {}),
    start: start === 1 ? ds.start1 : ds.start2,
    options,
  });
  return {
    fit,
    parameterLre: ds.certified.map((c, j) => logRelativeError(fit.theta[j]!, c)),
    rssLre: logRelativeError(fit.ssr, ds.certifiedRss),
    sdLre: ds.certifiedSd.map((c, j) => logRelativeError(fit.covariance.standardErrors[j]!, c)),
  };
}
