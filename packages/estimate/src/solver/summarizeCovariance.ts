import type { CovarianceSummary } from './types.js';

/**
 * Builds a {@link CovarianceSummary} from the SVD of a column-scaled Jacobian (given as its right
 * singular vectors and singular values). Shared by `covarianceFromJacobian` and
 * `covarianceFromNormalMatrix`; not exported from the package.
 *
 * @param V - right singular vectors, p×p row-major, column k belongs to `sv[k]`
 * @param sv - singular values of the scaled Jacobian (any order)
 * @param scale - column scales sⱼ (the scaled Jacobian is J·diag(1/s))
 * @param p - number of parameters
 * @param ssr - residual sum of squares
 * @param n - number of residuals
 * @param rankTolerance - drop singular values below `rankTolerance · max(sv)`
 * @returns the summary
 * @example
 * summarizeCovariance(Float64Array.of(1), Float64Array.of(2), Float64Array.of(1), 1, 3, 4, 1e-10).covariance[0]; // ≈ 0.75
 */
export function summarizeCovariance(
  V: Float64Array,
  sv: Float64Array,
  scale: Float64Array,
  p: number,
  ssr: number,
  n: number,
  rankTolerance: number,
): CovarianceSummary {
  const order = Array.from({ length: p }, (_, k) => k).sort((a, b) => sv[b]! - sv[a]!);
  const singularValues = Float64Array.from(order, (k) => sv[k]!);
  const smax = singularValues[0]!;
  const smin = singularValues[p - 1]!;
  const conditionNumber = smin > 0 ? smax / smin : Infinity;
  const dof = n - p;
  const residualVariance = dof > 0 ? ssr / dof : NaN;
  const covariance = new Float64Array(p * p);
  const identifiable: boolean[] = new Array<boolean>(p).fill(true);
  let rank = 0;
  for (const k of order) {
    const s = sv[k]!;
    if (s > rankTolerance * smax && s > 0) {
      rank++;
      const w = 1 / (s * s);
      for (let i = 0; i < p; i++) {
        const vi = V[i * p + k]! * w;
        for (let j = 0; j < p; j++) covariance[i * p + j] = covariance[i * p + j]! + vi * V[j * p + k]!;
      }
    } else {
      // A dropped direction: every parameter with a visible loading on it is not identifiable.
      for (let i = 0; i < p; i++) if (Math.abs(V[i * p + k]!) > 1e-6) identifiable[i] = false;
    }
  }
  for (let i = 0; i < p; i++) {
    if (!(scale[i]! > 0)) identifiable[i] = false;
  }
  const standardErrors = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      const si = scale[i]!;
      const sj = scale[j]!;
      covariance[i * p + j] = si > 0 && sj > 0 ? (residualVariance * covariance[i * p + j]!) / (si * sj) : NaN;
    }
    standardErrors[i] = identifiable[i] ? Math.sqrt(covariance[i * p + i]!) : NaN;
  }
  return {
    residualVariance,
    degreesOfFreedom: dof,
    covariance,
    standardErrors,
    singularValues,
    conditionNumber,
    identifiable,
    rank,
  };
}
