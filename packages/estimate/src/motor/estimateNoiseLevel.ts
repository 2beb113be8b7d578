import type { NoiseLevel } from './types.js';

/** 1/Φ⁻¹(3/4): makes the median absolute deviation a consistent SD estimate for Gaussian noise. */
const MAD_TO_SD = 1.482602218505602;
/** √6: the SD of the second difference of white noise is √6·σ (see the Method section). */
const SQRT6 = Math.sqrt(6);
/**
 * Most second differences entering the MAD. With N = 2¹⁵ of them the MAD-based σ has a relative
 * standard error of about 1.17/√N ≈ 0.65 % for Gaussian noise (asymptotic variance of the MAD
 * scale estimate 1.36·σ²/N, from memory; neighbouring differences are correlated only when the
 * stride is 1), well below what matters for weights.
 */
const MAX_DIFFERENCES = 32768;
/** √12: the SD of rounding error with quantum q is q/√12 (uniform on ±q/2). */
const SQRT12 = Math.sqrt(12);

/**
 * Estimates the standard deviation of the white measurement noise on one channel from the data
 * alone, so that channels in different units can be weighted honestly in a joint fit.
 *
 * ## Method
 * Second differences d_k = x_{k+1} − 2·x_k + x_{k−1} remove any signal that is smooth on the
 * scale of two samples (a constant and a slope vanish exactly, curvature leaves x''·h²). For
 * independent noise e_k of variance σ² the three terms are independent, so
 * var(d_k) = (1² + 2² + 1²)·σ² = 6σ² and σ = SD(d)/√6. The SD of d is taken robustly as
 * 1.4826·MAD(d), so the few samples at a step or an edge do not inflate it. Records longer than
 * 2¹⁵ + 2 samples use every s-th second difference, s = ⌈(n − 2)/2¹⁵⌉, spread evenly over the
 * record (O(n) reads, O(2¹⁵) selection work).
 *
 * Fallbacks, in order, when the MAD is zero (a quantised signal such as an encoder-derived speed,
 * where most second differences are exactly 0): the quantisation floor q/√12 with q the smallest
 * non-zero |x_{k+1} − x_k|, or the RMS of d/√6 when that is larger (a quantised signal still
 * carries rounding noise that the MAD cannot see); then, when no two neighbours differ but the
 * second differences are not all finite, the SD about the mean of the quietest tenth of the
 * record (a settled segment). A constant channel gives σ = 0 with method `constant`.
 *
 * ## References
 * F. R. Hampel (1974), "The influence curve and its role in robust estimation", J. Am. Stat.
 * Assoc. 69(346), 383–393, doi:10.1080/01621459.1974.10482962 (the MAD scale factor).
 *
 * @param values - the channel, at least 8 samples; non-finite samples are skipped
 * @returns σ in the channel's unit, which estimator gave it, and the quantum when one was seen
 * @throws TypeError when `values` is not a Float64Array
 * @throws RangeError when fewer than 8 finite samples are present
 * @example
 * estimateNoiseLevel(Float64Array.from({ length: 1000 }, (_, k) => 0.01 * k)).sigma; // => 0 (a ramp has no noise)
 */
export function estimateNoiseLevel(values: Float64Array): NoiseLevel {
  const fn = 'estimateNoiseLevel';
  if (!(values instanceof Float64Array)) throw new TypeError(`${fn}: values must be a Float64Array`);
  const n = values.length;
  // One pass: finite count and the smallest non-zero step (the quantum; a step next to a
  // non-finite sample is NaN and never counts).
  let finite = 0;
  let quantum = Infinity;
  if (n > 0 && Number.isFinite(values[0]!)) finite++;
  for (let k = 1; k < n; k++) {
    const x = values[k]!;
    if (Number.isFinite(x)) finite++;
    const step = Math.abs(x - values[k - 1]!);
    if (step > 0 && step < quantum) quantum = step;
  }
  if (finite < 8) throw new RangeError(`${fn}: values must hold at least 8 finite samples (got ${finite})`);
  // Long records: every stride-th second difference (at most MAX_DIFFERENCES of them, spread over
  // the whole record) is enough for the MAD; the quantum still looks at every step.
  const stride = n - 2 > MAX_DIFFERENCES ? Math.ceil((n - 2) / MAX_DIFFERENCES) : 1;
  const d = new Float64Array(Math.ceil(Math.max(n - 2, 0) / stride));
  let m = 0;
  let sumSq = 0;
  for (let k = 1; k + 1 < n; k += stride) {
    const v = values[k + 1]! - 2 * values[k]! + values[k - 1]!;
    if (Number.isFinite(v)) {
      d[m++] = v;
      sumSq += v * v;
    }
  }
  const sd2 = d.subarray(0, m);
  const med = median(sd2);
  for (let k = 0; k < m; k++) sd2[k] = Math.abs(sd2[k]! - med);
  const mad = median(sd2);
  if (mad > 0) return { sigma: (MAD_TO_SD * mad) / SQRT6, method: 'second-difference', quantum: null };
  const rms = Math.sqrt(sumSq / Math.max(m, 1)) / SQRT6;
  if (Number.isFinite(quantum)) {
    return { sigma: Math.max(quantum / SQRT12, rms), method: 'quantisation', quantum };
  }
  const settled = quietestSegmentSd(values);
  if (settled > 0) return { sigma: settled, method: 'settled-segment', quantum: null };
  return { sigma: 0, method: 'constant', quantum: null };
}

/** Median by Hoare's selection (expected O(n)) on a copy; the input is left as it is. */
function median(a: Float64Array): number {
  const n = a.length;
  if (n === 0) return NaN;
  const s = Float64Array.from(a);
  const h = n >> 1;
  const hi = select(s, h);
  if (n % 2 === 1) return hi;
  // The lower middle is the largest value left of position h after the selection.
  let lo = -Infinity;
  for (let k = 0; k < h; k++) if (s[k]! > lo) lo = s[k]!;
  return 0.5 * (lo + hi);
}

/** Rearranges `s` so that s[k] holds the k-th smallest value, smaller ones left of it; returns it. */
function select(s: Float64Array, k: number): number {
  let left = 0, right = s.length - 1;
  while (right > left) {
    const mid = (left + right) >> 1;
    // Median of three as the pivot.
    const a = s[left]!, b = s[mid]!, c = s[right]!;
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b);
    let i = left, j = right;
    while (i <= j) {
      while (s[i]! < pivot) i++;
      while (s[j]! > pivot) j--;
      if (i <= j) { const t = s[i]!; s[i] = s[j]!; s[j] = t; i++; j--; }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else break;
  }
  return s[k]!;
}

function quietestSegmentSd(values: Float64Array): number {
  const n = values.length;
  const w = Math.max(8, Math.floor(n / 10));
  let best = Infinity;
  for (let start = 0; start + w <= n; start += Math.max(1, w >> 1)) {
    let s = 0;
    let c = 0;
    for (let k = start; k < start + w; k++) if (Number.isFinite(values[k]!)) { s += values[k]!; c++; }
    if (c < 4) continue;
    const mean = s / c;
    let q = 0;
    for (let k = start; k < start + w; k++) if (Number.isFinite(values[k]!)) q += (values[k]! - mean) * (values[k]! - mean);
    const sd = Math.sqrt(q / (c - 1));
    if (sd < best) best = sd;
  }
  return Number.isFinite(best) ? best : 0;
}
