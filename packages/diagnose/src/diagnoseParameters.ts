import type { CovarianceSummary, MotorFit } from '@motorprint/estimate';
import { motorRelations } from '@motorprint/model';
import { assessIdentifiability } from './assessIdentifiability.js';
import { correlationFromCovariance } from './correlationFromCovariance.js';
import type { ParameterDiagnosis, RecordingDescription } from './types.js';

const CONSTANTS = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] as const;
const UNITS: Record<string, string> = { R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m' };
const WOULD_INFORM: Record<string, string> = {
  R: 'a locked-rotor step, or any driven run that logs current',
  L: 'a locked-rotor step or PRBS with current sampled several times faster than L/R',
  J: 'a free-run step, PRBS or multisine with current and speed',
  b: 'a steady-state sweep, or a longer free-run step',
  Tc: 'a coast-down or a steady-state sweep down to low speed',
};

/** What `diagnoseParameters` returns (internal to the package). */
export interface ParameterPart {
  parameters: Record<string, ParameterDiagnosis>;
  degreesOfFreedom: number;
  correlation: { names: string[]; matrix: (number | null)[][] };
  summary: CovarianceSummary | null;
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/**
 * The parameter part of `diagnoseFit` (not exported from the package): reads the estimator's
 * standard errors, intervals and information at the optimum (`MotorFit.parameters`,
 * `MotorFit.information`, `MotorFit.covariance`), adds the structural rules and the estimator's
 * `notInformed`, and the correlation of the fitted constants. Nothing here recomputes the
 * covariance or parses θ names.
 *
 * @param fit - the fit
 * @param descriptions - one description per recording, in the fit's order
 * @returns parameters, degrees of freedom, correlation of the constants and the covariance summary
 */
export function diagnoseParameters(fit: MotorFit, descriptions: RecordingDescription[]): ParameterPart {
  const p = fit.theta.length;
  const tied = fit.variant.torqueConstant === 'equal';
  // Where each constant sits in θ, as the estimator laid it out (no name parsing here).
  const info = fit.information;
  const thetaIndex = (c: string): number => info?.constantIndex[c] ?? -1;
  const dof = fit.rows - p;
  // The estimator's one analysis of the information at the optimum, read, not recomputed.
  const summary: CovarianceSummary | null = info !== undefined && fit.covariance instanceof Float64Array && fit.covariance.length === p * p ? {
    residualVariance: fit.residualVariance, degreesOfFreedom: dof, covariance: fit.covariance,
    standardErrors: Float64Array.from({ length: p }, (_, j) => (info.identifiable[j] ? Math.sqrt(fit.covariance![j * p + j]!) : NaN)),
    singularValues: info.singularValues, conditionNumber: info.conditionNumber, identifiable: info.identifiable, rank: info.rank,
  } : null;
  // Structural verdicts: with Kt = Ke imposed, ask about Kt only (the rule on Kt apart from Ke does not apply).
  const fitted = CONSTANTS.filter((c) => thetaIndex(c) >= 0 && !(tied && c === 'Ke'));
  const mapped = summary === null ? null : { ...summary, identifiable: fitted.map((c) => summary!.identifiable[thetaIndex(c)] === true) };
  const L = fit.parameters.L?.value, R = fit.parameters.R?.value;
  const tauE = L !== undefined && R !== undefined && L > 0 && R > 0 ? motorRelations.electricalTimeConstant({ L, R }) : undefined;
  const verdicts = assessIdentifiability(fitted, mapped, descriptions, tauE !== undefined && Number.isFinite(tauE) ? { electricalTimeConstant: tauE } : {});
  const verdictOf = (c: string): (typeof verdicts)[number] | undefined => verdicts.find((v) => v.name === (tied && c === 'Ke' ? 'Kt' : c));

  const parameters: Record<string, ParameterDiagnosis> = {};
  const keys = [...new Set([...CONSTANTS, ...Object.keys(fit.parameters), ...fit.notInformed.map((u) => u.name)])];
  for (const c of keys) {
    const est = fit.parameters[c];
    const missing = fit.notInformed.find((u) => u.name === c);
    if (est === undefined) {
      if (missing) parameters[c] = { value: null, unit: UNITS[c] ?? '', fixed: false, standardError: null, interval95: null, identifiable: false, reason: missing.reason, wouldInform: missing.wouldInform };
      continue;
    }
    if (est.fixed === true) {
      parameters[c] = { value: est.value, unit: est.unit, fixed: true, standardError: null, interval95: null, identifiable: true };
      continue;
    }
    const v = verdictOf(c);
    const out: ParameterDiagnosis = { value: est.value, unit: est.unit, fixed: false, standardError: null, interval95: null, identifiable: false };
    // The estimator states each constant's standard error and interval from the information at
    // its optimum; a relative standard error above 50 % is not a measurement of the constant.
    const se = est.standardError;
    const ci = est.interval95;
    const rse = se !== undefined && est.value !== 0 ? Math.abs(se / est.value) : NaN;
    // The information at the optimum decides; the structural rules only explain a constant it
    // does not pin down.
    const pinned = se !== undefined && ci !== undefined && Number.isFinite(se) && est.identified !== false && rse <= 0.5;
    if (missing) { out.reason = missing.reason; out.wouldInform = missing.wouldInform; } else if (est.unidentifiedReason !== undefined) {
      out.reason = est.unidentifiedReason;
      out.wouldInform = WOULD_INFORM[c] ?? 'a recording that informs it on its own';
    } else if (pinned) {
      out.identifiable = true;
      out.standardError = se;
      out.interval95 = ci;
    } else if (v !== undefined && !v.identifiable) {
      out.reason = v.reason; out.wouldInform = v.wouldInform;
    } else if (se === undefined || ci === undefined || !Number.isFinite(se)) {
      out.reason = summary === null ? 'no covariance at the optimum (too few rows, or the fit did not produce a normal matrix)'
        : `the information at the optimum has no direction for ${c} alone (it moves only together with other constants)`;
      out.wouldInform = WOULD_INFORM[c] ?? 'a recording with richer excitation (PRBS or multisine), or pin the correlated constants';
    } else {
      out.reason = `the recordings pin it down only to ±${Math.round(100 * rse)} % (relative standard error above 50 %)`;
      out.wouldInform = WOULD_INFORM[c] ?? 'a longer or richer recording';
      out.standardError = se; out.interval95 = ci;
    }
    parameters[c] = out;
  }
  // Correlation of the fitted constants (one entry for a tied K).
  const corrNames: string[] = [];
  const corrIdx: number[] = [];
  for (const c of CONSTANTS) {
    const j = thetaIndex(c);
    if (j < 0 || corrIdx.includes(j) || fit.parameters[c]?.fixed === true) continue;
    corrNames.push(tied && c === 'Kt' ? 'Kt = Ke' : c);
    corrIdx.push(j);
  }
  const full = summary === null ? null : correlationFromCovariance(summary.covariance, p);
  const matrix = corrIdx.map((i) => corrIdx.map((j) => (full === null ? null : finite(full[i * p + j]!))));
  return { parameters, degreesOfFreedom: dof, correlation: { names: corrNames, matrix }, summary };
}
