import { covarianceFromNormalMatrix } from '@motorprint/estimate';
import type { CovarianceSummary, MotorFit } from '@motorprint/estimate';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { assessIdentifiability } from './assessIdentifiability.js';
import { correlationFromCovariance } from './correlationFromCovariance.js';
import type { ParameterDiagnosis, RecordingDescription } from './types.js';

const CONSTANTS = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] as const;
const UNITS: Record<string, string> = { R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m' };

/** What `diagnoseParameters` returns (internal to the package). */
export interface ParameterPart {
  parameters: Record<string, ParameterDiagnosis>;
  degreesOfFreedom: number;
  correlation: { names: string[]; matrix: (number | null)[][] };
  summary: CovarianceSummary | null;
}

const finite = (x: number): number | null => (Number.isFinite(x) ? x : null);

/**
 * The parameter part of `diagnoseFit` (not exported from the package): covariance from the fit's
 * normal matrix, Student-t intervals on the fitted scale transformed back, identifiability from
 * the covariance, the structural rules and the estimator's `notInformed`.
 *
 * ## Method
 * cov = s²(JᵀJ)⁺ with s² = SSR/(rows − p) (`covarianceFromNormalMatrix`). For θ = ln p:
 * SE(p) = p·SE(θ) (delta method) and the interval [p·e^{−t·SE(θ)}, p·e^{t·SE(θ)}], t = t_{0.975, rows−p};
 * for Tc (fitted on a linear scale θ = Tc/scale) the interval is symmetric, the scale recovered as
 * Tc/θ. Kt/Ke (both fitted): var(ln Kt − ln Ke) = C_tt + C_ee − 2·C_te.
 *
 * @param fit - the fit
 * @param descriptions - one description per recording, in the fit's order
 * @returns parameters, degrees of freedom, correlation of the constants and the covariance summary
 */
export function diagnoseParameters(fit: MotorFit, descriptions: RecordingDescription[]): ParameterPart {
  const p = fit.theta.length;
  const names = fit.fittedNames;
  const tied = fit.variant.torqueConstant === 'equal';
  const thetaIndex = (c: string): number => {
    if (c === 'Tc') return names.indexOf('Tc');
    if (tied && (c === 'Kt' || c === 'Ke')) return names.indexOf('ln K');
    return names.indexOf(`ln ${c}`);
  };
  let summary: CovarianceSummary | null = null;
  const dof = fit.rows - p;
  if (p > 0 && dof >= 1 && Number.isFinite(fit.ssr) && fit.normalMatrix.length === p * p) {
    try {
      summary = covarianceFromNormalMatrix(fit.normalMatrix, p, fit.ssr, fit.rows);
    } catch {
      summary = null;
    }
  }
  const t = dof >= 1 ? tQuantile(0.975, dof) : NaN;
  // Structural verdicts: with Kt = Ke imposed, ask about Kt only (the rule on Kt apart from Ke does not apply).
  const fitted = CONSTANTS.filter((c) => thetaIndex(c) >= 0 && !(tied && c === 'Ke'));
  const mapped = summary === null ? null : { ...summary, identifiable: fitted.map((c) => summary!.identifiable[thetaIndex(c)] === true) };
  const L = fit.parameters.L?.value, R = fit.parameters.R?.value;
  const tauE = L !== undefined && R !== undefined && L > 0 && R > 0 && Number.isFinite(L / R) ? L / R : undefined;
  const verdicts = assessIdentifiability(fitted, mapped, descriptions, tauE !== undefined ? { electricalTimeConstant: tauE } : {});
  const verdictOf = (c: string): (typeof verdicts)[number] | undefined => verdicts.find((v) => v.name === (tied && c === 'Ke' ? 'Kt' : c));

  const parameters: Record<string, ParameterDiagnosis> = {};
  for (const c of CONSTANTS) {
    const est = fit.parameters[c];
    const missing = fit.notInformed.find((u) => u.name === c);
    if (est === undefined) {
      if (missing) parameters[c] = { value: null, unit: UNITS[c]!, fixed: false, standardError: null, ci95: null, identifiable: false, reason: missing.reason, wouldInform: missing.wouldInform };
      continue;
    }
    if (est.fixed === true) {
      parameters[c] = { value: est.value, unit: est.unit, fixed: true, standardError: null, ci95: null, identifiable: true };
      continue;
    }
    const j = thetaIndex(c);
    const v = verdictOf(c);
    const se = summary !== null && j >= 0 ? summary.standardErrors[j]! : NaN;
    const ok = summary !== null && j >= 0 && summary.identifiable[j] === true && Number.isFinite(se) && Number.isFinite(t);
    const out: ParameterDiagnosis = { value: est.value, unit: est.unit, fixed: false, standardError: null, ci95: null, identifiable: false };
    if (missing) { out.reason = missing.reason; out.wouldInform = missing.wouldInform; } else if (v !== undefined && !v.identifiable) {
      out.reason = v.reason; out.wouldInform = v.wouldInform;
    } else if (!ok) {
      out.reason = summary === null ? 'no covariance at the optimum (too few rows, or the fit did not produce a normal matrix)'
        : `the covariance is rank-deficient along a direction that involves ${c}`;
      out.wouldInform = 'a recording with richer excitation (PRBS or multisine), or pin the correlated constants';
    } else if (c === 'Tc') {
      const th = fit.theta[j]!;
      const scale = th !== 0 ? est.value / th : est.standardError !== undefined ? est.standardError / se : NaN;
      if (Number.isFinite(scale) && scale !== 0) {
        const s = Math.abs(scale) * se;
        out.identifiable = true; out.standardError = s; out.ci95 = [est.value - t * s, est.value + t * s];
      } else {
        out.reason = 'the scale of the fitted Tc could not be recovered from the fit';
      }
    } else {
      out.identifiable = true;
      out.standardError = est.value * se;
      out.ci95 = [est.value * Math.exp(-t * se), est.value * Math.exp(t * se)];
    }
    parameters[c] = out;
  }
  const kr = fit.parameters['Kt/Ke'];
  if (kr !== undefined && !tied && summary !== null) {
    const a = thetaIndex('Kt'), b = thetaIndex('Ke');
    const out: ParameterDiagnosis = { value: kr.value, unit: kr.unit, fixed: false, standardError: null, ci95: null, identifiable: false };
    if (a >= 0 && b >= 0 && summary.identifiable[a] && summary.identifiable[b]) {
      const cv = summary.covariance;
      const v = cv[a * p + a]! + cv[b * p + b]! - 2 * cv[a * p + b]!;
      if (v >= 0 && Number.isFinite(v) && Number.isFinite(t)) {
        const s = Math.sqrt(v);
        out.identifiable = true; out.standardError = kr.value * s; out.ci95 = [kr.value * Math.exp(-t * s), kr.value * Math.exp(t * s)];
      }
    }
    if (!out.identifiable) { out.reason = 'Kt or Ke has no standard error'; out.wouldInform = 'a loaded run with a torque transducer'; }
    parameters['Kt/Ke'] = out;
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
