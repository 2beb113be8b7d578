import { createNormalEquations } from '../solver/createNormalEquations.js';
import { createMotorProblem } from './createMotorProblem.js';
import type { ParameterLayout, ResidualSeries } from './createMotorProblem.js';
import type { PreparedRecording } from './prepareRecording.js';
import { gaussNewtonStep } from '../solver/gaussNewtonStep.js';

/** SSR mismatch (whitened units) under which a joint Gauss–Newton step counts as landing. */
const LANDING_SLACK = 1e-2;

/**
 * Gauss–Newton steps on the full joint problem (constants and input coefficients together) from
 * the optimum found with the input coefficients held. The residuals are linear in the input
 * coefficients and the start lies within a few standard errors of the joint optimum, so one step
 * normally lands on it. A step counts as landing when its actual SSR reduction matches the linear
 * prediction to 0.01 + 1e-4·prediction (whitened units, so the point is within about 0.1 standard
 * error of the joint optimum in any direction): the model is then linear over the step, the
 * gradient left at the new point is negligible, and JᵀJ from the start of the step (returned
 * with it) differs from JᵀJ at the new point by terms of the step's size. The trial SSR is
 * evaluated with the coefficients held at their trial values (the cheap pass). Returns the point
 * with that JᵀJ.
 */
export function polishJointly(
  recs: PreparedRecording[], layout: ParameterLayout, frozen: boolean[], theta0: Float64Array,
): {
  theta: Float64Array; JtJ: Float64Array; ssr: number; rows: number; linear: boolean;
  /** Residual series at `theta` when the last step landed there, else null. */
  residuals: ResidualSeries[] | null; jacobianEvaluations: number; functionEvaluations: number;
} {
  let theta = Float64Array.from(theta0);
  const full = createMotorProblem(recs, layout, theta, null);
  const p = full.parameterCount;
  let acc = createNormalEquations(p);
  let ssr = full.evaluate(theta, true, acc);
  let jEvals = 1, fEvals = 0;
  let linear = false;
  let residuals: ResidualSeries[] | null = null;
  for (let it = 0; it < 5 && Number.isFinite(ssr); it++) {
    const gn = gaussNewtonStep(acc.JtJ, acc.Jtr, p);
    if (gn === null) break;
    const { step, drop: predicted } = gn;
    const trial = Float64Array.from(theta, (t, j) => t + step[j]!);
    // The trial pass also keeps the residual series: when the step lands they are the ones of
    // the reported point, and the caller skips a pass of its own.
    const held = createMotorProblem(recs, layout, trial, frozen);
    const tried = held.ssrWithResiduals(trial, createNormalEquations(held.parameterCount));
    const ssr2 = tried.ssr;
    fEvals++;
    if (!(ssr2 <= ssr)) { linear = predicted <= LANDING_SLACK; break; }
    const actual = ssr - ssr2;
    theta = trial;
    if (Math.abs(actual - predicted) <= LANDING_SLACK + 1e-4 * predicted) { ssr = ssr2; linear = true; residuals = tried.residuals; break; }
    acc = createNormalEquations(p);
    ssr = full.evaluate(theta, true, acc);
    jEvals++;
  }
  return { theta, JtJ: Float64Array.from(acc.JtJ), ssr, rows: acc.rows, linear, residuals, jacobianEvaluations: jEvals, functionEvaluations: fEvals };
}
