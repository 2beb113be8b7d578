import { Matrix, SingularValueDecomposition } from '@motorprint/estimate/matrices';
import { linearRows } from './linearSums.js';
import { KERNEL_MIN } from './passes.js';
import type { LinearFit } from './types.js';

/** Rows per block of the one-sweep sums (a few columns of it stay in the L1/L2 cache). */
const BLOCK = 2048;

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
  // Every sum of products below is taken in order of k, as one loop per sum would take it, but
  // over blocks of rows that stay in cache: all the sums in one sweep over the data.
  const sq = new Float64Array(p);
  const xy = new Float64Array(p);
  const cross = new Float64Array(p * p);
  let check = 0;
  // Many rows of two or three columns (the residual and recording detectors' fits): through the
  // WebAssembly kernel, the same sums (linearSums.ts).
  const kernel = n >= KERNEL_MIN ? linearRows(columns, y) : null;
  if (kernel !== null) check = kernel.sums(sq, xy, cross);
  else if (p === 2) check = sumsOfTwo(columns[0]!, columns[1]!, y, sq, xy, cross);
  else if (p === 3) check = sumsOfThree(columns[0]!, columns[1]!, columns[2]!, y, sq, xy, cross);
  else for (let k0 = 0; k0 < n; k0 += BLOCK) {
    const k1 = Math.min(n, k0 + BLOCK);
    // 0 while every y is finite; NaN from the first one that is not.
    for (let k = k0; k < k1; k++) check += y[k]! * 0;
    for (let i = 0; i < p; i++) {
      const ci = columns[i]!;
      let s = sq[i]!, b = xy[i]!;
      for (let k = k0; k < k1; k++) { const v = ci[k]!; s += v * v; b += v * y[k]!; }
      sq[i] = s; xy[i] = b;
      for (let j = i + 1; j < p; j++) {
        const cj = columns[j]!;
        let c = cross[i * p + j]!;
        for (let k = k0; k < k1; k++) c += ci[k]! * cj[k]!;
        cross[i * p + j] = c;
      }
    }
  }
  // A value that is not finite makes its sums not finite: then find it as a check in order would.
  let suspect = !(check === 0);
  for (let i = 0; i < p; i++) if (!Number.isFinite(sq[i]!)) suspect = true;
  if (suspect) {
    for (let k = 0; k < n; k++) if (!Number.isFinite(y[k]!)) throw new RangeError(`${fn}: y[${k}] must be finite (got ${y[k]})`);
    for (let j = 0; j < p; j++) {
      const c = columns[j]!;
      for (let k = 0; k < n; k++) if (!Number.isFinite(c[k]!)) throw new RangeError(`${fn}: columns[${j}][${k}] must be finite (got ${c[k]})`);
    }
  }
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) scale[j] = sq[j]! > 0 ? Math.sqrt(sq[j]!) : 1;
  const A = new Matrix(p, p);
  const b = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    b[i] = xy[i]! / scale[i]!;
    for (let j = i; j < p; j++) {
      // Σ c_i² is the sum the scale came from (the same terms in the same order).
      const s = j === i ? sq[i]! : cross[i * p + j]!;
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
  const ssr = kernel !== null ? kernel.ssr(beta) : sumOfSquaredResiduals(columns, beta, y);
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

/**
 * Σ_k (y_k − Σ_j β_j·x_jk)², each residual formed as y − β₀x₀ − β₁x₁ − … in that order (written
 * out for up to four columns, the loop over columns beyond).
 */
export function sumOfSquaredResiduals(columns: readonly Float64Array[], beta: Float64Array, y: Float64Array): number {
  const n = y.length;
  const p = columns.length;
  let ssr = 0;
  if (p === 2) {
    const c0 = columns[0]!, c1 = columns[1]!, b0 = beta[0]!, b1 = beta[1]!;
    for (let k = 0; k < n; k++) { const e = y[k]! - b0 * c0[k]! - b1 * c1[k]!; ssr += e * e; }
  } else if (p === 3) {
    const c0 = columns[0]!, c1 = columns[1]!, c2 = columns[2]!, b0 = beta[0]!, b1 = beta[1]!, b2 = beta[2]!;
    for (let k = 0; k < n; k++) { const e = y[k]! - b0 * c0[k]! - b1 * c1[k]! - b2 * c2[k]!; ssr += e * e; }
  } else if (p === 4) {
    const c0 = columns[0]!, c1 = columns[1]!, c2 = columns[2]!, c3 = columns[3]!, b0 = beta[0]!, b1 = beta[1]!, b2 = beta[2]!, b3 = beta[3]!;
    for (let k = 0; k < n; k++) { const e = y[k]! - b0 * c0[k]! - b1 * c1[k]! - b2 * c2[k]! - b3 * c3[k]!; ssr += e * e; }
  } else {
    for (let k = 0; k < n; k++) {
      let e = y[k]!;
      for (let j = 0; j < p; j++) e -= beta[j]! * columns[j]![k]!;
      ssr += e * e;
    }
  }
  return ssr;
}

/**
 * The sums of the normal equations for two columns in one loop (each sum in order of k, as the
 * blocked loop of `fitLinearModel` takes it): Σa², Σb² into sq, Σa·y, Σb·y into xy, Σa·b into
 * cross[1]; returns Σ y·0 (0, or NaN when some y is not finite).
 */
export function sumsOfTwo(a: Float64Array, b: Float64Array, y: Float64Array, sq: Float64Array, xy: Float64Array, cross: Float64Array): number {
  const n = y.length;
  let check = 0, aa = 0, bb = 0, ay = 0, by = 0, ab = 0;
  for (let k = 0; k < n; k++) {
    const u = a[k]!, v = b[k]!, w = y[k]!;
    check += w * 0;
    aa += u * u; ay += u * w; ab += u * v;
    bb += v * v; by += v * w;
  }
  sq[0] = aa; sq[1] = bb; xy[0] = ay; xy[1] = by; cross[1] = ab;
  return check;
}

/** `sumsOfTwo` for three columns (cross[p·i + j] for i < j, p = 3). */
export function sumsOfThree(a: Float64Array, b: Float64Array, c: Float64Array, y: Float64Array, sq: Float64Array, xy: Float64Array, cross: Float64Array): number {
  const n = y.length;
  let check = 0, aa = 0, bb = 0, cc = 0, ay = 0, by = 0, cy = 0, ab = 0, ac = 0, bc = 0;
  for (let k = 0; k < n; k++) {
    const u = a[k]!, v = b[k]!, t = c[k]!, w = y[k]!;
    check += w * 0;
    aa += u * u; ay += u * w; ab += u * v; ac += u * t;
    bb += v * v; by += v * w; bc += v * t;
    cc += t * t; cy += t * w;
  }
  sq[0] = aa; sq[1] = bb; sq[2] = cc; xy[0] = ay; xy[1] = by; xy[2] = cy;
  cross[1] = ab; cross[2] = ac; cross[5] = bc;
  return check;
}
