/**
 * The estimator's one Cholesky factorisation: A + shift·I = L·Lᵀ for a small symmetric p×p matrix A,
 * with L lower triangular, written row by row into the lower triangle of `L` (row-major; the upper
 * triangle is left as it was). `solveSymmetricSystem`, the solver's damped step and the sine fit
 * of a recording's input all factor through here.
 *
 * Kernel: validates nothing, never throws; returns false as soon as a pivot is not above
 * `pivotFloor` (A + shift·I not safely positive definite), leaving `L` partly written.
 *
 * @param A - p×p row-major (not modified)
 * @param p - dimension
 * @param L - receives the factor (length ≥ p·p)
 * @param shift - added to the diagonal of A before factoring (a ridge or a damping) @default 0
 * @param pivotFloor - a pivot (before its square root) must exceed this @default 0
 * @returns true when the factor was written
 * @example
 * const L = new Float64Array(4);
 * choleskyFactor(Float64Array.of(4, 2, 2, 5), 2, L); // => true; L = [2, 0, 1, 2]
 */
export function choleskyFactor(A: Float64Array, p: number, L: Float64Array, shift = 0, pivotFloor = 0): boolean {
  for (let i = 0; i < p; i++) {
    for (let j = 0; j <= i; j++) {
      let s = A[i * p + j]! + (i === j ? shift : 0);
      for (let k = 0; k < j; k++) s -= L[i * p + k]! * L[j * p + k]!;
      if (i === j) {
        if (!(s > pivotFloor)) return false;
        L[i * p + i] = Math.sqrt(s);
      } else L[i * p + j] = s / L[j * p + j]!;
    }
  }
  return true;
}

/**
 * Forward substitution with a factor from {@link choleskyFactor}: solves L·y = b.
 * `y` may be the same array as `b`.
 *
 * @param L - lower-triangular factor, p×p row-major
 * @param b - right-hand side, length p
 * @param p - dimension
 * @param y - receives the solution, length p
 * @returns `y`
 * @example
 * forwardSubstitute(Float64Array.of(2, 0, 1, 2), Float64Array.of(2, 5), 2, new Float64Array(2)); // => [1, 2]
 */
export function forwardSubstitute(L: Float64Array, b: Float64Array, p: number, y: Float64Array): Float64Array {
  for (let i = 0; i < p; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= L[i * p + k]! * y[k]!;
    y[i] = s / L[i * p + i]!;
  }
  return y;
}

/**
 * Solves L·Lᵀ·x = b with a factor from {@link choleskyFactor} (forward, then back substitution).
 * `x` may be the same array as `b`.
 *
 * @param L - lower-triangular factor, p×p row-major
 * @param b - right-hand side, length p
 * @param p - dimension
 * @param x - receives the solution, length p
 * @returns `x`
 * @example
 * solveWithCholeskyFactor(Float64Array.of(2, 0, 1, 2), Float64Array.of(8, 12), 2, new Float64Array(2)); // => [1, 2]
 */
export function solveWithCholeskyFactor(L: Float64Array, b: Float64Array, p: number, x: Float64Array): Float64Array {
  forwardSubstitute(L, b, p, x);
  for (let i = p - 1; i >= 0; i--) {
    let s = x[i]!;
    for (let k = i + 1; k < p; k++) s -= L[k * p + i]! * x[k]!;
    x[i] = s / L[i * p + i]!;
  }
  return x;
}
