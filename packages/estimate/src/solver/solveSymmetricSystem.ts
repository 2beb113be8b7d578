import { choleskyFactor, solveWithCholeskyFactor } from './choleskyFactor.js';

/**
 * Solves A·x = b for a small symmetric positive (semi-)definite A by Cholesky factorisation,
 * with a tiny ridge (1e-13 of the largest diagonal) added when the plain factorisation fails.
 * Used for the dense linear least-squares steps of the estimator (normal equations of a few
 * regressors). Never throws: returns null when A is not positive definite even with the ridge.
 *
 * @param A - p×p row-major (not modified)
 * @param b - right-hand side, length p
 * @param p - dimension
 * @returns x, or null
 * @example
 * solveSymmetricSystem(Float64Array.of(4, 0, 0, 2), Float64Array.of(8, 2), 2); // => Float64Array [2, 1]
 */
export function solveSymmetricSystem(A: Float64Array, b: Float64Array, p: number): Float64Array | null {
  let dmax = 0;
  for (let i = 0; i < p; i++) dmax = Math.max(dmax, Math.abs(A[i * p + i]!));
  for (const ridge of [0, 1e-13 * dmax, 1e-9 * dmax]) {
    const Lf = new Float64Array(p * p);
    if (choleskyFactor(A, p, Lf, ridge)) return solveWithCholeskyFactor(Lf, b, p, new Float64Array(p));
  }
  return null;
}
