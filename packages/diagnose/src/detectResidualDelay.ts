import { sig } from './internal.js';
import { delaySteps } from './passes.js';
import { laggedSumsInto } from './laggedSums.js';
import type { Finding } from './types.js';

/**
 * Looks for residuals that follow the input (`unmodelled-delay`, `residual-follows-input`): in a
 * right model the residual is independent of past inputs, so a cross-correlation between the
 * voltage changes and the residual means the model misses dynamics — most often a delay between
 * the channels (logger skew, drive dead time).
 *
 * ## Method
 * c(ℓ) = Σ Δv(k)·e(k + ℓ) / √(ΣΔv²·Σe²) for ℓ = 0…20 over the fitted samples (e the residual,
 * Δv the first difference of the measured voltage). Under independence each c(ℓ) has SD ≈ 1/√n;
 * fire when max |c| > 5/√n. The delay is then estimated by regressing e(k) on
 * ŷ(k) − ŷ(k − d) for d = 1…20 (ŷ the model output: a channel logged d samples late leaves
 * exactly that residual) and keeping the d with the largest share R² of the residual explained.
 * `unmodelled-delay` when R² ≥ 0.5, else `residual-follows-input`.
 *
 * ## References
 * L. Ljung (1999), System Identification: Theory for the User, 2nd ed., §16.6 (cross-correlation
 * of residuals and past inputs).
 *
 * @param voltage - measured voltage [V]
 * @param residual - model − measured [channel unit], NaN where not fitted
 * @param predicted - model output ŷ = measured + residual [channel unit]
 * @param sampleInterval - sample interval [s]
 * @returns the finding, or null
 * @throws TypeError when the series are not Float64Arrays of one length
 * @example
 * detectResidualDelay(voltage, currentResidual, currentModel, 1e-4)?.evidence['delay [samples]']; // => 3 for a current logged 3 samples late
 */
export function detectResidualDelay(voltage: Float64Array, residual: Float64Array, predicted: Float64Array, sampleInterval: number): Finding | null {
  const n = residual.length;
  if (!(voltage instanceof Float64Array) || !(residual instanceof Float64Array) || !(predicted instanceof Float64Array) || voltage.length !== n || predicted.length !== n) {
    throw new TypeError('detectResidualDelay: voltage, residual and predicted must be Float64Arrays of one length');
  }
  const M = 20;
  if (n < 10 * M) return null;
  // The voltage steps once (every lag below reads them), and both series with 0 where a term is
  // left out: a left-out term then adds ±0, which leaves every sum below as it was.
  // (Every residual finite, the usual case: the residual itself is that series.)
  const { finite, steps, kept, vv, ee, rows } = delaySteps(voltage, residual);
  if (!(vv > 0 && ee > 0) || rows < 10 * M) return null;
  const norm = Math.sqrt(vv * ee);
  // s(ℓ) = Σ_{k≥1} Δv(k)·e(k + ℓ) over the terms with both finite, summed in order of k.
  const sums = laggedSumsInto(new Float64Array(M + 1), steps, kept, 1, n, 0, M);
  let best = -1, peak = 0;
  for (let lag = 0; lag <= M; lag++) {
    const s = sums[lag]!;
    if (Math.abs(s / norm) > Math.abs(peak)) { peak = s / norm; best = lag; }
  }
  const band = 5 / Math.sqrt(rows);
  if (!(Math.abs(peak) > band)) return null;
  const shares = finite && differencesFinite(predicted) ? delaySharesFinite(residual, predicted, M) : delayShares(residual, predicted, M);
  let bestD = 0, bestR2 = 0;
  for (let d = 1; d <= M; d++) {
    const r2 = shares[d]!;
    if (r2 > bestR2) { bestR2 = r2; bestD = d; }
  }
  const delay = bestR2 >= 0.5;
  return {
    code: delay ? 'unmodelled-delay' : 'residual-follows-input', severity: 'warning',
    title: delay ? 'The channel lags the model by a fixed delay' : 'The residual follows the input: the model misses some dynamics',
    evidence: {
      'peak input–residual correlation': sig(peak), 'at lag [samples]': best, 'band 5/√n': sig(band),
      'delay [samples]': delay ? bestD : 'none found', 'delay [s]': delay ? sig(bestD * sampleInterval) : 'none found', 'share explained by the delay': sig(bestR2),
    },
    advice: delay
      ? 'Align the channels (logger skew, filter group delay) or add the delay to the model before fitting; a delay biases L and the mechanical constants.'
      : 'The linear model leaves a part of the response to the input unexplained (unmodelled friction, saturation or a filter in the sensor chain): read the other findings, and compare with a held-out recording.',
  };
}

/**
 * R² of e(k) on ŷ(k) − ŷ(k − d) (no intercept) for d = 1…M, over the rows where both are
 * finite: shares[d]; 0 when either sum of squares is 0.
 */
function delayShares(residual: Float64Array, predicted: Float64Array, M: number): Float64Array {
  const n = residual.length;
  const shares = new Float64Array(M + 1);
  for (let d = 1; d <= M; d++) {
    let sxy = 0, sxx = 0, syy = 0;
    for (let k = d; k < n; k++) {
      const e = residual[k]!, x = predicted[k]! - predicted[k - d]!;
      if (!Number.isFinite(e) || !Number.isFinite(x)) continue;
      sxy += x * e; sxx += x * x; syy += e * e;
    }
    shares[d] = sxx > 0 && syy > 0 ? (sxy * sxy) / (sxx * syy) : 0;
  }
  return shares;
}

/** Whether every ŷ is finite and no difference of two of them can overflow. */
function differencesFinite(predicted: Float64Array): boolean {
  let big = 0;
  for (let k = 0; k < predicted.length; k++) {
    const a = Math.abs(predicted[k]!);
    if (!(a <= big)) big = a; // NaN too
  }
  return big < 8.98e307; // |a − b| ≤ 2·max|ŷ| < Number.MAX_VALUE
}

/**
 * `delayShares` when every residual is finite and every difference of ŷ is finite (no row is
 * left out): four delays per sweep, each of their sums still taken in order of k from k = d, so
 * the numbers are the same.
 */
function delaySharesFinite(residual: Float64Array, predicted: Float64Array, M: number): Float64Array {
  const n = residual.length;
  const shares = new Float64Array(M + 1);
  const sums = new Float64Array(12);
  let d = 1;
  for (; d + 3 <= M; d += 4) {
    // The first rows, where only the shorter delays have a term.
    sums.fill(0);
    for (let j = 0; j < 3; j++) {
      let sxy = 0, sxx = 0, syy = 0;
      for (let k = d + j; k < d + 3 && k < n; k++) {
        const e = residual[k]!, x = predicted[k]! - predicted[k - d - j]!;
        sxy += x * e; sxx += x * x; syy += e * e;
      }
      sums[3 * j] = sxy; sums[3 * j + 1] = sxx; sums[3 * j + 2] = syy;
    }
    let a0 = sums[0]!, b0 = sums[1]!, c0 = sums[2]!;
    let a1 = sums[3]!, b1 = sums[4]!, c1 = sums[5]!;
    let a2 = sums[6]!, b2 = sums[7]!, c2 = sums[8]!;
    let a3 = 0, b3 = 0, c3 = 0;
    for (let k = d + 3; k < n; k++) {
      const e = residual[k]!, p = predicted[k]!, ee = e * e;
      const x0 = p - predicted[k - d]!, x1 = p - predicted[k - d - 1]!, x2 = p - predicted[k - d - 2]!, x3 = p - predicted[k - d - 3]!;
      a0 += x0 * e; b0 += x0 * x0; c0 += ee;
      a1 += x1 * e; b1 += x1 * x1; c1 += ee;
      a2 += x2 * e; b2 += x2 * x2; c2 += ee;
      a3 += x3 * e; b3 += x3 * x3; c3 += ee;
    }
    shares[d] = share(a0, b0, c0);
    shares[d + 1] = share(a1, b1, c1);
    shares[d + 2] = share(a2, b2, c2);
    shares[d + 3] = share(a3, b3, c3);
  }
  for (; d <= M; d++) {
    let sxy = 0, sxx = 0, syy = 0;
    for (let k = d; k < n; k++) {
      const e = residual[k]!, x = predicted[k]! - predicted[k - d]!;
      sxy += x * e; sxx += x * x; syy += e * e;
    }
    shares[d] = share(sxy, sxx, syy);
  }
  return shares;
}

function share(sxy: number, sxx: number, syy: number): number {
  return sxx > 0 && syy > 0 ? (sxy * sxy) / (sxx * syy) : 0;
}
