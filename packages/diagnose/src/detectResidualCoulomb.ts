import { sig } from './internal.js';
import { coulombRows } from './passes.js';
import { fitLinearModel } from './fitLinearModel.js';
import type { Finding } from './types.js';

/**
 * Looks for residuals that follow the sign of the speed (`coulomb-friction`, from the fit
 * residuals): the model has no Coulomb friction Tc·sgn(ω), yet the measured current sits above
 * the model whenever the rotor turns (or the measured speed below it).
 *
 * ## Method
 * s = sgn(ω) with a dead band of 3 speed-noise SDs (0 at rest). Least squares of the residual
 * (model − measured) on [1, s] over the fitted samples; the standard error of the s coefficient γ
 * is inflated by √((1 + r₁)/(1 − r₁)) for serially correlated residuals. Missing friction makes
 * γ < 0 on a current residual (the measured current is higher by Tc/Kt while moving) and γ > 0 on
 * a speed residual. Fires when the signed z exceeds 5. No verdict when s takes one value on more
 * than 95 % of the fitted samples (then s and the constant cannot be told apart).
 *
 * @param speed - measured speed [rad/s]
 * @param residual - model − measured of the current [A] or speed [rad/s] channel, NaN where not fitted
 * @param channel - which channel `residual` belongs to
 * @param speedSigma - noise SD of the speed [rad/s] (sets the dead band)
 * @returns the finding, or null
 * @throws TypeError when the series are not Float64Arrays of one length
 * @example
 * detectResidualCoulomb(speed, currentResidual, 'current', 0.48)?.evidence['Tc/Kt seen [A]']; // ≈ 0.04 with Tc 2 mN·m, Kt 0.05
 */
export function detectResidualCoulomb(speed: Float64Array, residual: Float64Array, channel: 'current' | 'speed', speedSigma: number): Finding | null {
  if (!(speed instanceof Float64Array) || !(residual instanceof Float64Array) || speed.length !== residual.length) {
    throw new TypeError('detectResidualCoulomb: speed and residual must be Float64Arrays of one length');
  }
  const dead = 3 * (speedSigma > 0 ? speedSigma : 0);
  // The fitted rows, with s and the residual on them (typed arrays filled in one pass).
  const { m, pos, neg, rest, s, y, lagOne } = coulombRows(speed, residual, dead);
  if (m < 50 || Math.max(pos, neg, rest) > 0.95 * m) return null;
  const fit = fitLinearModel([onesOf(m), s], y);
  const g = fit.coefficients[1]!, se = fit.standardErrors[1]!;
  if (!(se > 0)) return null;
  // Lag-1 autocorrelation of the regression residuals over consecutive fitted rows.
  const [ss, s1] = lagOne(fit.coefficients[0]!, g);
  const r1 = ss > 0 ? Math.min(0.98, Math.max(0, s1 / ss)) : 0;
  const seAdj = se * Math.sqrt((1 + r1) / (1 - r1));
  const z = (channel === 'current' ? -g : g) / seAdj;
  if (!(z > 5)) return null;
  const unit = channel === 'current' ? 'A' : 'rad/s';
  return {
    code: 'coulomb-friction', severity: 'warning', title: `The ${channel} residual follows the sign of the speed: Coulomb friction the model leaves out`,
    evidence: {
      [channel === 'current' ? 'Tc/Kt seen [A]' : `speed shortfall while moving [${unit}]`]: sig(Math.abs(g)),
      'z (serial-corrected)': sig(z), 'lag-1 autocorrelation': sig(r1), 'moving samples': pos + neg, 'still samples': rest,
    },
    advice: 'Fit with Coulomb friction in the model and compare the two fits; a constant friction torque otherwise biases b, J and the current offset.',
  };
}

/** The column of ones, kept for the next call (fitLinearModel only reads its columns). */
let ones = new Float64Array(0);

/** A column of m ones (a view of the kept one, grown when too short). */
function onesOf(m: number): Float64Array {
  if (ones.length < m) ones = new Float64Array(m).fill(1);
  return ones.subarray(0, m);
}
