import { tQuantile } from '@motorprint/estimate/distributions';
import { correlationFromCovariance } from './correlationFromCovariance.js';
import type { ConfidenceReport, CovarianceSummary, ParameterConfidence } from './types.js';

/**
 * Student-t confidence intervals, the correlation matrix and the conditioning of a least-squares
 * estimate, from the covariance summary of `@motorprint/estimate` (`covarianceFromNormalMatrix`
 * or `covarianceFromJacobian`).
 *
 * ## Method
 * θ̂ⱼ ± t_{(1+level)/2, n−p}·SE(θ̂ⱼ) with SE from s²(JᵀJ)⁺, s² = SSR/(n − p). The quantile is
 * stdlib's Student-t inverse CDF. A parameter the summary marks as not identifiable gets no
 * interval (null), never a number with an absurd interval.
 *
 * ## References
 * D. M. Bates, D. G. Watts (1988), Nonlinear Regression Analysis and Its Applications, Wiley,
 * §2.3 (linear-approximation inference regions), doi:10.1002/9780470316757.
 *
 * @param names - parameter names, length p
 * @param values - estimates, length p [parameter units]
 * @param summary - covariance summary at the optimum
 * @param level - confidence level in (0, 1). @default 0.95
 * @returns the {@link ConfidenceReport}
 * @throws TypeError when names/values do not match the summary's p
 * @throws RangeError when `level` is not in (0, 1) or the degrees of freedom are < 1
 * @example
 * const s = covarianceFromNormalMatrix(Float64Array.of(3, 3, 3, 5), 2, 1 / 6, 3);
 * confidenceIntervals(['a', 'b'], [1, 2], s).tQuantile; // ≈ 12.706 (1 degree of freedom)
 */
export function confidenceIntervals(
  names: readonly string[],
  values: ArrayLike<number>,
  summary: CovarianceSummary,
  level = 0.95,
): ConfidenceReport {
  const fn = 'confidenceIntervals';
  if (!Array.isArray(names)) throw new TypeError(`${fn}: names must be an array of strings`);
  const p = names.length;
  if (summary === null || typeof summary !== 'object' || !(summary.standardErrors instanceof Float64Array)) {
    throw new TypeError(`${fn}: summary must be a CovarianceSummary`);
  }
  if (summary.standardErrors.length !== p) {
    throw new TypeError(`${fn}: names has ${p} entries but summary.standardErrors has ${summary.standardErrors.length}`);
  }
  if (values === null || typeof values !== 'object' || values.length !== p) {
    throw new TypeError(`${fn}: values must have ${p} entries (got ${values === null || typeof values !== 'object' ? String(values) : values.length})`);
  }
  if (!(level > 0 && level < 1)) throw new RangeError(`${fn}: level must be in (0, 1) (got ${level})`);
  const dof = summary.degreesOfFreedom;
  if (!(dof >= 1)) throw new RangeError(`${fn}: summary.degreesOfFreedom must be >= 1 (got ${dof})`);
  const t = tQuantile(0.5 + level / 2, dof);
  const parameters: ParameterConfidence[] = [];
  for (let j = 0; j < p; j++) {
    const value = values[j]!;
    const se = summary.standardErrors[j]!;
    const ok = summary.identifiable[j] === true && Number.isFinite(se) && Number.isFinite(value);
    parameters.push({
      name: names[j]!,
      value,
      standardError: ok ? se : NaN,
      interval: ok ? [value - t * se, value + t * se] : null,
      identifiable: ok,
    });
  }
  return {
    level,
    degreesOfFreedom: dof,
    tQuantile: t,
    parameters,
    correlation: correlationFromCovariance(summary.covariance, p),
    singularValues: summary.singularValues,
    conditionNumber: summary.conditionNumber,
  };
}
