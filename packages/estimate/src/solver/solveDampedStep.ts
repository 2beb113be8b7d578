import { EigenvalueDecomposition, Matrix } from '../matrices.js';
import { choleskyFactor, solveWithCholeskyFactor } from './choleskyFactor.js';

/**
 * Solves the damped, scaled normal equations (A + λI) z = b for a small symmetric p×p matrix A.
 *
 * Tries a Cholesky factorisation first; when a pivot is not safely positive (A + λI numerically
 * singular or indefinite) it falls back to a symmetric eigendecomposition and applies the
 * pseudo-inverse, dropping eigenvalues below `1e-14` of the largest.
 *
 * Kernel: writes into `z` and `work` (length p·p), returns false only when no finite step exists.
 *
 * ## Method
 * Cholesky factorisation LLᵀ with forward and back substitution; eigendecomposition fallback.
 *
 * @param A - scaled normal matrix, p×p row-major (not modified)
 * @param lambda - damping λ ≥ 0 added to the diagonal
 * @param b - right-hand side, length p
 * @param p - dimension
 * @param z - output step, length p
 * @param work - scratch, length p·p
 * @returns `'cholesky'`, `'eigen'`, or `'failed'`
 * @example
 * solveDampedStep(Float64Array.of(2, 0, 0, 2), 0, Float64Array.of(2, 4), 2, z, work); // z ≈ [1, 2]
 */
export function solveDampedStep(
  A: Float64Array,
  lambda: number,
  b: Float64Array,
  p: number,
  z: Float64Array,
  work: Float64Array,
): 'cholesky' | 'eigen' | 'failed' {
  let maxDiag = 0;
  for (let i = 0; i < p; i++) {
    const d = A[i * p + i]! + lambda;
    if (d > maxDiag) maxDiag = d;
  }
  if (!(maxDiag > 0) || !Number.isFinite(maxDiag)) return 'failed';
  const pivotFloor = 1e-14 * maxDiag;
  // Cholesky: lower factor stored in work (row-major, lower triangle).
  if (choleskyFactor(A, p, work, lambda, pivotFloor)) {
    solveWithCholeskyFactor(work, b, p, z);
    return 'cholesky';
  }
  return solveByEigen(A, lambda, b, p, z);
}

function solveByEigen(A: Float64Array, lambda: number, b: Float64Array, p: number, z: Float64Array) {
  const M = new Matrix(p, p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) M.set(i, j, A[i * p + j]! + (i === j ? lambda : 0));
  }
  let evd: EigenvalueDecomposition;
  try {
    evd = new EigenvalueDecomposition(M, { assumeSymmetric: true });
  } catch {
    return 'failed' as const;
  }
  const mu = evd.realEigenvalues;
  const V = evd.eigenvectorMatrix;
  let muMax = 0;
  for (const m of mu) if (Math.abs(m) > muMax) muMax = Math.abs(m);
  const floor = 1e-14 * muMax;
  z.fill(0);
  for (let k = 0; k < p; k++) {
    const m = mu[k]!;
    if (!(m > floor)) continue;
    let c = 0;
    for (let i = 0; i < p; i++) c += V.get(i, k) * b[i]!;
    c /= m;
    for (let i = 0; i < p; i++) z[i] = z[i]! + c * V.get(i, k);
  }
  for (let i = 0; i < p; i++) if (!Number.isFinite(z[i]!)) return 'failed' as const;
  return 'eigen' as const;
}
