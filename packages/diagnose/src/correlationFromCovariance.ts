/**
 * Correlation matrix from a covariance matrix: ρ_ij = C_ij / √(C_ii·C_jj).
 *
 * Kernel-style: never throws on values; rows and columns whose variance is not a positive finite
 * number are NaN (a parameter without a standard error has no correlation).
 *
 * @param covariance - p×p covariance, row-major [parameter units²]
 * @param p - number of parameters
 * @returns a new p×p correlation matrix, row-major (dimensionless, diagonal 1)
 * @throws TypeError when `covariance` is not a Float64Array of length p²
 * @example
 * correlationFromCovariance(Float64Array.of(4, 2, 2, 9), 2); // => [1, 1/3, 1/3, 1]
 */
export function correlationFromCovariance(covariance: Float64Array, p: number): Float64Array {
  if (!Number.isInteger(p) || p < 1) throw new TypeError(`correlationFromCovariance: p must be an integer >= 1 (got ${p})`);
  if (!(covariance instanceof Float64Array) || covariance.length !== p * p) {
    throw new TypeError(`correlationFromCovariance: covariance must be a Float64Array of length p*p = ${p * p}`);
  }
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) {
    const vi = covariance[i * p + i]!;
    for (let j = 0; j < p; j++) {
      const vj = covariance[j * p + j]!;
      if (!(vi > 0) || !(vj > 0) || !Number.isFinite(vi) || !Number.isFinite(vj)) out[i * p + j] = NaN;
      else out[i * p + j] = i === j ? 1 : covariance[i * p + j]! / Math.sqrt(vi * vj);
    }
  }
  return out;
}
