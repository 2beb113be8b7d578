import { createRandom } from '@motorprint/model';
import { Matrix, SingularValueDecomposition } from '@motorprint/estimate/matrices';
import { describe, expect, it } from 'vitest';
import { autocorrelationInto } from '../autocorrelationInto.js';
import { detectResidualDelay } from '../detectResidualDelay.js';
import { fitLinearModel } from '../fitLinearModel.js';
import { laggedSumsInto, laggedSumsScalarInto, laggedSumsSimdInto } from '../laggedSums.js';
import { residualStats } from '../residualStats.js';
import { runsTest } from '../runsTest.js';

/** Invented noisy signal: a slow sine plus Gaussian noise, quantised to 1/64, on an offset. */
function quantised(n: number, seed: number, offset = 5): Float64Array {
  const rng = createRandom(seed);
  return Float64Array.from({ length: n }, (_, k) => Math.round((Math.sin(k / 37) + 0.3 * rng.normal()) * 64) / 64 + offset);
}

/** The one-lag-at-a-time loop the kernels replace (reference). */
function directLagged(a: Float64Array, b: Float64Array, from: number, to: number, first: number, last: number): number[] {
  const out: number[] = [];
  for (let lag = first; lag <= last; lag++) {
    let s = 0;
    for (let t = from; t + lag < to; t++) s += a[t]! * b[t + lag]!;
    out.push(s);
  }
  return out;
}

/** The autocorrelation by its definition, one lag per loop (reference). */
function directAutocorrelation(x: Float64Array, m: number): number[] {
  const n = x.length;
  let mean = 0;
  for (let t = 0; t < n; t++) mean += x[t]!;
  mean /= n;
  let c0 = 0;
  for (let t = 0; t < n; t++) c0 += (x[t]! - mean) * (x[t]! - mean);
  const r = [1];
  for (let k = 1; k <= m; k++) {
    let s = 0;
    for (let t = 0; t + k < n; t++) s += (x[t]! - mean) * (x[t + k]! - mean);
    r.push(s / c0);
  }
  return r;
}

describe('the one-sweep kernels give the numbers of the one-sum-per-loop code, bit for bit', () => {
  it('laggedSumsInto, its plain loop and its SIMD kernel equal the direct sums for every lag range, start and length tried (including series shorter than the lags)', () => {
    const a = quantised(3001, 1), b = quantised(3001, 2, -0.25);
    for (const [from, to, first, last] of [[0, 3001, 0, 50], [1, 3001, 0, 20], [0, 2999, 3, 17], [5, 40, 0, 50], [0, 9, 0, 12], [2, 3001, 7, 7], [0, 3001, 1, 16], [0, 3001, 1, 33]] as const) {
      const label = `${from}…${to}, lags ${first}…${last}`;
      const ref = directLagged(a, b, from, to, first, last);
      const m = last - first + 1;
      expect(Array.from(laggedSumsInto(new Float64Array(m), a, b, from, to, first, last)), label).toEqual(ref);
      expect(Array.from(laggedSumsScalarInto(new Float64Array(m), a, b, from, to, first, last)), label).toEqual(ref);
      const simd = new Float64Array(m);
      // Node has WebAssembly SIMD: the kernel runs (elsewhere it declines and the plain loop is used).
      expect(laggedSumsSimdInto(simd, a, b, from, to, first, last)).toBe(true);
      expect(Array.from(simd), label).toEqual(ref);
      // The same series as both arguments (the autocorrelation's case: one copy in the kernel).
      expect(laggedSumsSimdInto(simd, a, a, from, to, first, last)).toBe(true);
      expect(Array.from(simd), `${label}, a with itself`).toEqual(directLagged(a, a, from, to, first, last));
    }
  });

  it('autocorrelationInto equals the definition on a quantised noisy signal with an offset (n = 20000, 50 lags)', () => {
    const x = quantised(20000, 3);
    const r = autocorrelationInto(new Float64Array(51), x, 50);
    expect(Array.from(r)).toEqual(directAutocorrelation(x, 50));
    // The slow sine makes the first lags large and positive (a check that the numbers are not trivial).
    expect(r[1]!).toBeGreaterThan(0.5);
  });

  it('residualStats gives the autocorrelation and runs test of its residuals (unfitted NaN samples skipped), as the separate functions do', () => {
    const y = quantised(5000, 4);
    const rng = createRandom(5);
    const yh = Float64Array.from(y, (v, k) => (k % 101 === 7 ? NaN : v + 0.02 * rng.normal() + 1e-3));
    const s = residualStats(y, yh, 30);
    const e = Float64Array.from(y.map((v, k) => yh[k]! - v).filter((v) => Number.isFinite(v)));
    expect(s.samples).toBe(e.length);
    expect(Array.from(s.autocorrelation)).toEqual(directAutocorrelation(e, 30));
    // The runs counted in residualStats' own pass are runsTest's on the same residuals.
    expect(s.runs).toEqual(runsTest(e));
    expect(s.runs.runs).toBeGreaterThan(100);
  });

  it('fitLinearModel equals a column-by-column normal-equation build on 2 to 5 columns (coefficients, SSR, covariance)', () => {
    const n = 7000;
    const cols = [new Float64Array(n).fill(1), quantised(n, 6, 0), quantised(n, 7, 2), Float64Array.from(quantised(n, 8, 0), Math.sign), quantised(n, 9, -1)];
    const rng = createRandom(10);
    const y = Float64Array.from({ length: n }, (_, k) => 0.5 + 2 * cols[1]![k]! - cols[2]![k]! + 0.1 * cols[3]![k]! + 0.05 * rng.normal());
    for (let p = 2; p <= 5; p++) {
      const X = cols.slice(0, p);
      const fit = fitLinearModel(X, y);
      const ref = referenceFit(X, y);
      expect(Array.from(fit.coefficients), `${p} columns`).toEqual(Array.from(ref.coefficients));
      expect(fit.ssr, `${p} columns`).toBe(ref.ssr);
      expect(Array.from(fit.covariance), `${p} columns`).toEqual(Array.from(ref.covariance));
    }
  });

  it('fitLinearModel still names the first value that is not finite', () => {
    const x = quantised(5000, 11), y = quantised(5000, 12);
    const badY = y.slice(); badY[4321] = NaN;
    expect(() => fitLinearModel([x], badY)).toThrow(/y\[4321\] must be finite/);
    const badX = x.slice(); badX[2500] = Infinity;
    expect(() => fitLinearModel([y, badX], y)).toThrow(/columns\[1\]\[2500\] must be finite/);
  });

  it('detectResidualDelay gives the same finding whether or not a NaN sends it down the row-by-row path', () => {
    const n = 4000;
    const rng = createRandom(13);
    // Invented: a ±1 V PRBS-like voltage, a first-order model output, and a channel read 2 samples late.
    const v = Float64Array.from({ length: n }, (_, k) => (Math.sin(k * 0.9 + Math.sin(k / 13)) > 0 ? 1 : -1));
    const truth = new Float64Array(n);
    for (let k = 1; k < n; k++) truth[k] = 0.8 * truth[k - 1]! + 0.2 * v[k - 1]!;
    const measured = Float64Array.from(truth, (x, k) => (k >= 2 ? truth[k - 2]! : 0) + 0.01 * rng.normal());
    const residual = Float64Array.from(truth, (x, k) => x - measured[k]!);
    const all = detectResidualDelay(v, residual, truth, 1e-3);
    expect(all?.code).toBe('unmodelled-delay');
    expect(all?.evidence['delay [samples]']).toBe(2);
    // A NaN in the first sample (never read by the sums) switches paths and changes nothing.
    const first = residual.slice(); first[0] = NaN;
    expect(detectResidualDelay(v, first, truth, 1e-3)).toEqual(all);
  });
});

/**
 * fitLinearModel as it was written with one loop per sum (scales, Xᵀy, XᵀX, then the SSR), the
 * same SVD solve (reference).
 */
function referenceFit(columns: Float64Array[], y: Float64Array): { coefficients: Float64Array; ssr: number; covariance: Float64Array } {
  const n = y.length, p = columns.length;
  const scale = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let k = 0; k < n; k++) s += columns[j]![k]! * columns[j]![k]!;
    scale[j] = s > 0 ? Math.sqrt(s) : 1;
  }
  const A = new Matrix(p, p);
  const b = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let bi = 0;
    for (let k = 0; k < n; k++) bi += columns[i]![k]! * y[k]!;
    b[i] = bi / scale[i]!;
    for (let j = i; j < p; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += columns[i]![k]! * columns[j]![k]!;
      A.set(i, j, s / (scale[i]! * scale[j]!));
      A.set(j, i, s / (scale[i]! * scale[j]!));
    }
  }
  const svd = new SingularValueDecomposition(A, { autoTranspose: false });
  const sv = svd.diagonal, U = svd.leftSingularVectors, V = svd.rightSingularVectors;
  const Ainv = new Float64Array(p * p);
  for (let m = 0; m < p; m++) {
    if (!(sv[m]! > 1e-10 * sv[0]!)) continue;
    for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) Ainv[i * p + j] = Ainv[i * p + j]! + (V.get(i, m) * U.get(j, m)) / sv[m]!;
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
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) covariance[i * p + j] = (s2 * Ainv[i * p + j]!) / (scale[i]! * scale[j]!);
  return { coefficients: beta, ssr, covariance };
}
