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
    let ok = true;
    for (let i = 0; i < p && ok; i++) {
      for (let j = 0; j <= i; j++) {
        let s = A[i * p + j]! + (i === j ? ridge : 0);
        for (let k = 0; k < j; k++) s -= Lf[i * p + k]! * Lf[j * p + k]!;
        if (i === j) {
          if (!(s > 0)) { ok = false; break; }
          Lf[i * p + i] = Math.sqrt(s);
        } else Lf[i * p + j] = s / Lf[j * p + j]!;
      }
    }
    if (!ok) continue;
    const y = new Float64Array(p);
    for (let i = 0; i < p; i++) {
      let s = b[i]!;
      for (let k = 0; k < i; k++) s -= Lf[i * p + k]! * y[k]!;
      y[i] = s / Lf[i * p + i]!;
    }
    for (let i = p - 1; i >= 0; i--) {
      let s = y[i]!;
      for (let k = i + 1; k < p; k++) s -= Lf[k * p + i]! * y[k]!;
      y[i] = s / Lf[i * p + i]!;
    }
    return y;
  }
  return null;
}
