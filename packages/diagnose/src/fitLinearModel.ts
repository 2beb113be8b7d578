import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import type { LinearFit } from './types.js';

/**
 * Ordinary least squares y = Xβ + e with standard errors, for the small regressions behind the
 * findings (current against speed and acceleration, deceleration against speed) and the model
 * comparisons.
 *
 * ## Method
 * The columns are scaled to unit norm, XᵀX is accumulated in one pass and solved through the SVD
 * of the scaled p×p matrix (ml-matrix); singular values below 1e-10 of the largest are dropped,
 * and the coefficients and standard errors on such directions are NaN. s² = SSR/(n − p),
 * cov = s²(XᵀX)⁻¹, SSR recomputed from the residuals.
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., Wiley, §5.
 *
 * @param columns - regressor columns X, each of length n (include a column of ones for an intercept)
 * @param y - response, length n
 * @returns the {@link LinearFit}
 * @throws TypeError when the columns are not Float64Arrays of the length of `y`
 * @throws RangeError when n ≤ p or a value is not finite
 * @example
 * const x = Float64Array.of(0, 1, 2, 3), one = new Float64Array(4).fill(1);
 * fitLinearModel([one, x], Float64Array.of(1, 3, 5, 7)).coefficients; // => [1, 2]
 */
export function fitLinearModel(columns: readonly Float64Array[], y: Float64Array): LinearFit {
  const fn = 'fitLinearModel';
  if (!(y instanceof Float64Array)) throw new TypeError(`${fn}: y must be a Float64Array`);
  if (!Array.isArray(columns) || columns.length < 1) throw new TypeError(`${fn}: columns must be a non-empty array of Float64Array`);
  const n = y.length;
  const p = columns.length;
  for (let j = 0; j < p; j++) {
    const c = columns[j];
    if (!(c instanceof Float64Array) || c.length !== n) throw new TypeError(`${fn}: columns[${j}] must be a Float64Array of length ${n}`);
  }
  if (n <= p) throw new RangeError(`${fn}: need more rows than columns (got ${n} rows, ${p} columns)`);
  for (let k = 0; k < n; k++) if (!Number.isFinite(y[k]!)) throw new RangeError(`${fn}: y[${k}] must be finite (got ${y[k]})`);
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    const c = columns[j]!;
    let s = 0;
    for (let k = 0; k < n; k++) {
      const v = c[k]!;
      if (!Number.isFinite(v)) throw new RangeError(`${fn}: columns[${j}][${k}] must be finite (got ${v})`);
      s += v * v;
    }
    scale[j] = s > 0 ? Math.sqrt(s) : 1;
  }
  const A = new Matrix(p, p);
  const b = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    const ci = columns[i]!;
    let bi = 0;
    for (let k = 0; k < n; k++) bi += ci[k]! * y[k]!;
    b[i] = bi / scale[i]!;
    for (let j = i; j < p; j++) {
      const cj = columns[j]!;
      let s = 0;
      for (let k = 0; k < n; k++) s += ci[k]! * cj[k]!;
      const v = s / (scale[i]! * scale[j]!);
      A.set(i, j, v);
      A.set(j, i, v);
    }
  }
  const svd = new SingularValueDecomposition(A, { autoTranspose: false });
  const sv = svd.diagonal;
  const U = svd.leftSingularVectors;
  const V = svd.rightSingularVectors;
  const cut = 1e-10 * sv[0]!;
  // Pseudo-inverse of the scaled normal matrix, and which parameters load on dropped directions.
  const Ainv = new Float64Array(p * p);
  const bad = new Array<boolean>(p).fill(false);
  for (let m = 0; m < p; m++) {
    if (sv[m]! > cut) {
      for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) Ainv[i * p + j] = Ainv[i * p + j]! + (V.get(i, m) * U.get(j, m)) / sv[m]!;
    } else {
      for (let i = 0; i < p; i++) if (Math.abs(V.get(i, m)) > 1e-6) bad[i] = true;
    }
  }
  const beta = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let s = 0;
    for (let j = 0; j < p; j++) s += Ainv[i * p + j]! * b[j]!;
    beta[i] = s / scale[i]!;
  }
  let ssr = 0;
  for (let k = 0; k < n; k++) {
    let e = y[k]!;
    for (let j = 0; j < p; j++) e -= beta[j]! * columns[j]![k]!;
    ssr += e * e;
  }
  const s2 = ssr / (n - p);
  const covariance = new Float64Array(p * p);
  const standardErrors = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) covariance[i * p + j] = (s2 * Ainv[i * p + j]!) / (scale[i]! * scale[j]!);
    standardErrors[i] = bad[i] ? NaN : Math.sqrt(Math.max(covariance[i * p + i]!, 0));
    if (bad[i]) beta[i] = NaN;
  }
  return { coefficients: beta, standardErrors, ssr, samples: n, residualVariance: s2, covariance };
}
