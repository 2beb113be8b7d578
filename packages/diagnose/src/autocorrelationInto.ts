import { laggedSumsInto } from './laggedSums.js';

/**
 * Sample autocorrelation r_0…r_m of a series by direct sums (kernel: writes into `out`, never
 * throws; allocates one scratch copy of the deviations).
 *
 * ## Method
 * r_k = Σ_{t=0}^{n−1−k} (x_t − x̄)(x_{t+k} − x̄) / Σ_t (x_t − x̄)², the biased estimator of
 * Box & Jenkins (its matrix is positive semi-definite). Cost n·(m + 1) multiply-adds, eight lags
 * per sweep over the series (`laggedSumsInto`: each sum still taken in order of t, so the numbers
 * are those of one loop per lag); for m ≈ 50 this beats an FFT of a 2²¹-point padded copy at
 * n = 1e6, and it is exact where an FFT's products would move the last digits.
 *
 * ## References
 * G. E. P. Box, G. M. Jenkins, G. C. Reinsel (2008), Time Series Analysis, 4th ed., Wiley, §2.1.4,
 * doi:10.1002/9781118619193.
 *
 * @param out - output, length ≥ maxLag + 1; out[k] = r_k
 * @param x - series (finite values)
 * @param maxLag - largest lag m, 0 ≤ m < n
 * @returns `out`; filled with NaN when n < 2, m is out of range, or the series is constant or not finite
 * @example
 * autocorrelationInto(new Float64Array(2), Float64Array.of(1, -1, 1, -1), 1); // => [1, -0.75]
 */
export function autocorrelationInto(out: Float64Array, x: Float64Array, maxLag: number): Float64Array {
  const n = x.length;
  const m = maxLag;
  if (n < 2 || !(m >= 0) || m >= n || m + 1 > out.length || !Number.isInteger(m)) {
    out.fill(NaN);
    return out;
  }
  let mean = 0;
  for (let t = 0; t < n; t++) mean += x[t]!;
  mean /= n;
  // The deviations once, not once per lag (the same numbers: x[t] − mean each time).
  const d = new Float64Array(n);
  let c0 = 0;
  for (let t = 0; t < n; t++) {
    const v = x[t]! - mean;
    d[t] = v;
    c0 += v * v;
  }
  return autocorrelationOfDeviations(out, d, c0, m);
}

/**
 * The autocorrelation r_0…r_m from the deviations d_t = x_t − x̄ and c0 = Σ d_t² (summed in
 * order of t), for callers that already made them: `autocorrelationInto` without its first two
 * passes, with the same numbers. NaN when c0 is not positive and finite.
 */
export function autocorrelationOfDeviations(out: Float64Array, d: Float64Array, c0: number, m: number): Float64Array {
  if (!(c0 > 0) || !Number.isFinite(c0)) {
    out.fill(NaN, 0, m + 1);
    return out;
  }
  out[0] = 1;
  if (m >= 1) {
    laggedSumsInto(out.subarray(1, m + 1), d, d, 0, d.length, 1, m);
    for (let k = 1; k <= m; k++) out[k] = out[k]! / c0;
  }
  return out;
}
