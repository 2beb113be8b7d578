import { Matrix, SingularValueDecomposition } from '../matrices.js';
import { summarizeCovariance } from './summarizeCovariance.js';
import type { CovarianceSummary } from './types.js';

/**
 * Covariance and standard errors of least-squares estimates from the dense Jacobian at the
 * optimum: σ² = SSR/(n − p), cov = σ²(JᵀJ)⁺, computed through the SVD of the column-scaled
 * Jacobian so that JᵀJ is never formed or inverted. Directions whose scaled singular value falls
 * below `rankTolerance` times the largest are dropped, and parameters loading on them
 * (|vᵢₖ| > 1e-6, our own threshold) are marked not identifiable with a NaN standard error
 * instead of a huge number.
 *
 * ## Method
 * Column scaling J·S⁻¹ (sⱼ = ‖Jⱼ‖), SVD J·S⁻¹ = UΣVᵀ (ml-matrix), cov = σ²·S⁻¹VΣ⁻²VᵀS⁻¹.
 *
 * ## References
 * G. H. Golub, C. F. Van Loan (2013), Matrix Computations, 4th ed., §5.5 (rank-deficient least
 * squares via the SVD), Johns Hopkins University Press.
 *
 * @param jacobian - ∂r[k]/∂θⱼ at `jacobian[j * n + k]` (column-major, n × p)
 * @param n - number of residuals (> p for a finite σ²)
 * @param p - number of parameters
 * @param ssr - residual sum of squares at the optimum
 * @param rankTolerance - relative singular-value threshold (default 1e-10)
 * @returns the {@link CovarianceSummary}
 * @throws TypeError when `jacobian` is not a Float64Array of length n·p
 * @throws RangeError when n, p or ssr are out of range
 * @example
 * // straight line through (0,0), (1,1), (2,3): J columns [1,1,1], [0,1,2]
 * covarianceFromJacobian(Float64Array.of(1, 1, 1, 0, 1, 2), 3, 2, 1 / 6).standardErrors;
 * // ≈ [0.3727, 0.2887]
 */
export function covarianceFromJacobian(
  jacobian: Float64Array,
  n: number,
  p: number,
  ssr: number,
  rankTolerance = 1e-10,
): CovarianceSummary {
  const fn = 'covarianceFromJacobian';
  if (!Number.isInteger(p) || p < 1) throw new RangeError(`${fn}: p must be an integer >= 1 (got ${p})`);
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`${fn}: n must be an integer >= 1 (got ${n})`);
  if (!(jacobian instanceof Float64Array) || jacobian.length !== n * p) {
    throw new TypeError(`${fn}: jacobian must be a Float64Array of length n*p = ${n * p}`);
  }
  if (!(ssr >= 0) || !Number.isFinite(ssr)) throw new RangeError(`${fn}: ssr must be finite and >= 0 (got ${ssr})`);
  if (!(rankTolerance >= 0 && rankTolerance < 1)) {
    throw new RangeError(`${fn}: rankTolerance must be >= 0 and < 1 (got ${rankTolerance})`);
  }
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += jacobian[j * n + k]! * jacobian[j * n + k]!;
    scale[j] = Math.sqrt(s);
  }
  const M = new Matrix(n, p);
  for (let j = 0; j < p; j++) {
    const sj = scale[j]! > 0 ? scale[j]! : 1;
    for (let k = 0; k < n; k++) M.set(k, j, jacobian[j * n + k]! / sj);
  }
  const svd = new SingularValueDecomposition(M, { autoTranspose: true, computeLeftSingularVectors: false });
  const Vm = svd.rightSingularVectors;
  const dvals = svd.diagonal;
  const m = Math.min(dvals.length, p);
  const sv = new Float64Array(p);
  const V = new Float64Array(p * p);
  for (let k = 0; k < p; k++) {
    sv[k] = k < m ? dvals[k]! : 0;
    for (let i = 0; i < p; i++) V[i * p + k] = k < Vm.columns ? Vm.get(i, k) : 0;
  }
  return summarizeCovariance(V, sv, scale, p, ssr, n, rankTolerance);
}
