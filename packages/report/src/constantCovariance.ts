import type { MotorFit } from '@motorprint/estimate';
import type { ConstantCovariance, ConstantName } from './types.js';

const NAMES: ConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];

/** The part of a `MotorFit` this function reads. */
export type CovarianceSource = Pick<MotorFit, 'parameters' | 'constantCovariance'>;

/**
 * The motor constants' covariance in propagation coordinates u = (ln R, ln L, ln Kt, ln Ke, ln J,
 * ln b, ln Tc), taken from the fit's own statement of it (`MotorFit.constantCovariance`, the
 * covariance of ln p the estimator computes once, nuisances marginalised) — the report does not
 * recompute it. A model without Coulomb friction has Tc = 0 exactly.
 *
 * @param fit - the fit (`fitMotor` result)
 * @returns values, flags, the 7×7 covariance of u and the Student-t quantile; a fixed constant has
 *   zero variance, a missing or unidentifiable one NaN variance
 * @example
 * const c = constantCovariance(fit);
 * Math.sqrt(c.covariance[0]); // relative standard error of R, e.g. ≈ 4e-4
 */
export function constantCovariance(fit: CovarianceSource): ConstantCovariance {
  const values = new Float64Array(7);
  const fitted: boolean[] = new Array<boolean>(7).fill(false);
  const identifiable: boolean[] = new Array<boolean>(7).fill(false);
  const covariance = new Float64Array(49).fill(NaN);
  const src = fit.constantCovariance;
  const at = NAMES.map((c) => (src === undefined ? -1 : src.names.indexOf(c)));
  NAMES.forEach((c, i) => {
    const est = fit.parameters[c];
    values[i] = est === undefined ? (c === 'Tc' ? 0 : NaN) : est.value;
    if (est === undefined && c === 'Tc') identifiable[i] = true;
    else if (at[i]! >= 0 && src!.usable[at[i]!]) { identifiable[i] = true; fitted[i] = est?.fixed !== true; }
  });
  const m = src?.names.length ?? 0;
  for (let i = 0; i < 7; i++) {
    for (let k = 0; k < 7; k++) {
      if (!identifiable[i] || !identifiable[k]) continue;
      const a = at[i]!, b = at[k]!;
      covariance[i * 7 + k] = a < 0 || b < 0 ? 0 : src!.logCovariance[a * m + b]!;
    }
  }
  return {
    names: NAMES.slice(), values, fitted, identifiable, covariance,
    degreesOfFreedom: src?.degreesOfFreedom ?? NaN, tQuantile: src?.tQuantile ?? NaN,
  };
}
