import { EigenvalueDecomposition, Matrix } from '../matrices.js';
import { summarizeCovariance } from './summarizeCovariance.js';
import type { CovarianceSummary } from './types.js';

/**
 * Covariance and standard errors from a streamed normal matrix JᵀJ (the solver's `JtJ` at the
 * optimum): σ² = SSR/(n − p), cov = σ²(JᵀJ)⁺ through the symmetric eigendecomposition of the
 * diagonally scaled JᵀJ. Singular values are reported as the square roots of its eigenvalues.
 * Because JᵀJ squares the condition number, the default `rankTolerance` here is 1e-7 (eigenvalues
 * below ~1e-14 of the largest carry no correct digits in double precision); parameters loading on a
 * dropped direction are marked not identifiable with a NaN standard error.
 *
 * ## Method
 * S = √diag(JᵀJ), A = S⁻¹JᵀJS⁻¹ = VΛVᵀ (ml-matrix, symmetric), cov = σ²·S⁻¹VΛ⁻¹VᵀS⁻¹ over kept
 * eigenvalues.
 *
 * ## References
 * G. H. Golub, C. F. Van Loan (2013), Matrix Computations, 4th ed., §8 (symmetric eigenproblem).
 *
 * @param JtJ - p×p normal matrix, row-major, symmetric
 * @param p - number of parameters
 * @param ssr - residual sum of squares at the optimum
 * @param n - number of residual rows
 * @param rankTolerance - relative threshold on √eigenvalues (default 1e-7)
 * @returns the {@link CovarianceSummary}
 * @throws TypeError when `JtJ` is not a Float64Array of length p²
 * @throws RangeError when p, n or ssr are out of range
 * @example
 * covarianceFromNormalMatrix(Float64Array.of(3, 3, 3, 5), 2, 1 / 6, 3).standardErrors; // ≈ [0.3727, 0.2887]
 */
export function covarianceFromNormalMatrix(
  JtJ: Float64Array,
  p: number,
  ssr: number,
  n: number,
  rankTolerance = 1e-7,
): CovarianceSummary {
  const fn = 'covarianceFromNormalMatrix';
  if (!Number.isInteger(p) || p < 1) throw new RangeError(`${fn}: p must be an integer >= 1 (got ${p})`);
  if (!(JtJ instanceof Float64Array) || JtJ.length !== p * p) {
    throw new TypeError(`${fn}: JtJ must be a Float64Array of length p*p = ${p * p}`);
  }
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`${fn}: n must be an integer >= 1 (got ${n})`);
  if (!(ssr >= 0) || !Number.isFinite(ssr)) throw new RangeError(`${fn}: ssr must be finite and >= 0 (got ${ssr})`);
  if (!(rankTolerance >= 0 && rankTolerance < 1)) {
    throw new RangeError(`${fn}: rankTolerance must be >= 0 and < 1 (got ${rankTolerance})`);
  }
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const v = JtJ[j * p + j]!;
    if (!Number.isFinite(v)) throw new RangeError(`${fn}: JtJ[${j * p + j}] must be finite (got ${v})`);
    scale[j] = v > 0 ? Math.sqrt(v) : 0;
  }
  const M = new Matrix(p, p);
  for (let i = 0; i < p; i++) {
    const si = scale[i]! > 0 ? scale[i]! : 1;
    for (let j = 0; j < p; j++) {
      const sj = scale[j]! > 0 ? scale[j]! : 1;
      // Symmetrise on the way in: the eigen solver assumes an exactly symmetric matrix.
      M.set(i, j, (0.5 * (JtJ[i * p + j]! + JtJ[j * p + i]!)) / (si * sj));
    }
  }
  const evd = new EigenvalueDecomposition(M, { assumeSymmetric: true });
  const mu = evd.realEigenvalues;
  const Vm = evd.eigenvectorMatrix;
  const sv = new Float64Array(p);
  const V = new Float64Array(p * p);
  for (let k = 0; k < p; k++) {
    sv[k] = Math.sqrt(Math.max(mu[k]!, 0));
    for (let i = 0; i < p; i++) V[i * p + k] = Vm.get(i, k);
  }
  return summarizeCovariance(V, sv, scale, p, ssr, n, rankTolerance);
}
