import { sig, slopeWithSerialCorrection } from './internal.js';
import { trendSums } from './passes.js';
import type { Finding, RecordingKind } from './types.js';

/**
 * Looks for a trend in the residual series of a fit (`residual-trend`): the model misses
 * something that changes slowly through the record — on a still rotor's current, the winding
 * heating (R grows, the current falls below the model); otherwise a sensor or supply drift.
 *
 * ## Method
 * Least squares of the residual on [1, t] over the fitted (finite) samples; the slope's standard
 * error is inflated by √((1 + r₁)/(1 − r₁)) for serially correlated residuals (r₁ the lag-1
 * autocorrelation of the detrended residual). Fires when |slope/SE| > 5 and the change over the
 * record, |slope|·T, exceeds half the residual SD (so a trend too small to matter stays quiet).
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., §7 (serial correlation in
 * residuals).
 *
 * @param time - sample times [s]
 * @param residual - model − measured [channel unit], NaN where not fitted
 * @param channel - which channel the residual belongs to
 * @param kind - experiment kind (a still-rotor current trend is read as winding heating)
 * @returns the finding, or null
 * @throws TypeError when the series are not Float64Arrays of one length
 * @example
 * detectResidualTrend(time, lockedRotorCurrentResidual, 'current', 'locked-rotor')?.code; // => 'residual-trend' while the winding heats
 */
export function detectResidualTrend(time: Float64Array, residual: Float64Array, channel: 'current' | 'speed', kind: RecordingKind): Finding | null {
  if (!(time instanceof Float64Array) || !(residual instanceof Float64Array) || time.length !== residual.length) {
    throw new TypeError('detectResidualTrend: time and residual must be Float64Arrays of one length');
  }
  // The line fit's passes and the time span of the fitted samples, over one copy of the series.
  const sums = trendSums(time, residual);
  const f = slopeWithSerialCorrection(time, residual, sums);
  if (!Number.isFinite(f.se) || !(f.se > 0)) return null;
  const z = f.slope / f.se;
  const { x0: t0, x1: t1 } = sums.range();
  const change = f.slope * (t1 - t0);
  if (!(Math.abs(z) > 5) || !(Math.abs(change) > 0.5 * f.sd)) return null;
  const unit = channel === 'current' ? 'A' : 'rad/s';
  const heating = channel === 'current' && kind === 'locked-rotor' && f.slope > 0;
  return {
    code: 'residual-trend', severity: 'warning',
    title: heating ? 'The current falls behind the model through the still-rotor run: the winding heats' : `The ${channel} residual drifts through the record`,
    evidence: {
      [`slope [${unit}/s]`]: sig(f.slope), 'slope / SE': sig(z), [`change over the record [${unit}]`]: sig(change),
      [`residual SD [${unit}]`]: sig(f.sd), 'lag-1 autocorrelation': sig(f.lag1),
    },
    advice: heating
      ? 'R rises with the copper temperature (about 0.39 %/K): shorten the locked-rotor run, let the motor cool between runs, or log the winding temperature and normalise R.'
      : 'Something changes slowly through the record (temperature, supply, sensor offset drift): check the channel for drift, or split the record and fit the parts apart.',
  };
}
