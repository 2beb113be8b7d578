import { sig } from './internal.js';
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
  let vv = 0, ee = 0, rows = 0;
  // The voltage steps once (every lag below reads them).
  const steps = new Float64Array(n);
  for (let k = 1; k < n; k++) {
    const dv = voltage[k]! - voltage[k - 1]!;
    steps[k] = dv;
    if (Number.isFinite(dv)) vv += dv * dv;
    if (Number.isFinite(residual[k]!)) { ee += residual[k]! * residual[k]!; rows++; }
  }
  if (!(vv > 0 && ee > 0) || rows < 10 * M) return null;
  const norm = Math.sqrt(vv * ee);
  let best = -1, peak = 0;
  for (let lag = 0; lag <= M; lag++) {
    let s = 0;
    for (let k = 1; k + lag < n; k++) {
      const e = residual[k + lag]!;
      if (!Number.isFinite(e)) continue;
      const dv = steps[k]!;
      if (Number.isFinite(dv)) s += dv * e;
    }
    if (Math.abs(s / norm) > Math.abs(peak)) { peak = s / norm; best = lag; }
  }
  const band = 5 / Math.sqrt(rows);
  if (!(Math.abs(peak) > band)) return null;
  let bestD = 0, bestR2 = 0;
  for (let d = 1; d <= M; d++) {
    let sxy = 0, sxx = 0, syy = 0;
    for (let k = d; k < n; k++) {
      const e = residual[k]!, x = predicted[k]! - predicted[k - d]!;
      if (!Number.isFinite(e) || !Number.isFinite(x)) continue;
      sxy += x * e; sxx += x * x; syy += e * e;
    }
    const r2 = sxx > 0 && syy > 0 ? (sxy * sxy) / (sxx * syy) : 0;
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
