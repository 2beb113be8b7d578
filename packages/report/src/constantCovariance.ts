import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { covarianceFromNormalMatrix } from '@motorprint/estimate';
import type { MotorFit } from '@motorprint/estimate';
import type { ConstantCovariance, ConstantName } from './types.js';

const NAMES: ConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];

/** The part of a `MotorFit` this function reads. */
export type CovarianceSource = Pick<MotorFit, 'parameters' | 'fittedNames' | 'theta' | 'normalMatrix' | 'ssr' | 'rows'>;

/**
 * Covariance of the motor constants in propagation coordinates u = (ln R, ln L, ln Kt, ln Ke,
 * ln J, ln b, Tc), marginalised over the nuisance parameters of the fit (voltage levels, offsets,
 * initial speeds), ready for the delta method.
 *
 * ## Method
 * C_θ = σ²(JᵀJ)⁺ on the fitted scale (`covarianceFromNormalMatrix`, σ² = SSR/(n − p)); then
 * C_u = G·C_θ·Gᵀ with G the 7×p map from θ to u: `ln R` → u_R, `ln K` (Kt = Ke imposed) → both
 * u_Kt and u_Ke (so they are fully correlated), `Tc` → u_Tc with the solver's scale
 * Tc/θ_Tc (or SE(Tc)/SE(θ_Tc) when θ_Tc = 0). Taking the u-block of C_θ is the marginal
 * covariance: the nuisance parameters are accounted for, not fixed. Student-t quantile
 * t(0.975, n − p) from @stdlib.
 *
 * @param fit - the fit (`fitMotor` result)
 * @returns values, flags, the 7×7 covariance and the Student-t quantile; a constant that is fixed
 *   has zero variance, one that is missing or not identifiable has NaN variance
 * @throws TypeError when `fit.theta`, `fit.fittedNames` and `fit.normalMatrix` do not agree in size
 * @example
 * const c = constantCovariance(fit);
 * Math.sqrt(c.covariance[0]); // relative standard error of R, e.g. ≈ 4e-4
 */
export function constantCovariance(fit: CovarianceSource): ConstantCovariance {
  const fn = 'constantCovariance';
  const p = fit.theta.length;
  if (fit.fittedNames.length !== p) {
    throw new TypeError(`${fn}: fit.fittedNames has ${fit.fittedNames.length} names but fit.theta has ${p} values`);
  }
  if (!(fit.normalMatrix instanceof Float64Array) || fit.normalMatrix.length !== p * p) {
    throw new TypeError(`${fn}: fit.normalMatrix must be a Float64Array of length ${p * p} (got ${fit.normalMatrix?.length})`);
  }
  const values = new Float64Array(7);
  const fitted: boolean[] = new Array<boolean>(7).fill(false);
  const identifiable: boolean[] = new Array<boolean>(7).fill(false);
  const covariance = new Float64Array(49);
  NAMES.forEach((c, i) => {
    const est = fit.parameters[c];
    values[i] = est === undefined ? (c === 'Tc' ? 0 : NaN) : est.value;
    // Fixed constants and an absent Tc (model without Coulomb friction) are known exactly.
    if ((est?.fixed === true || (est === undefined && c === 'Tc')) && Number.isFinite(values[i]!)) identifiable[i] = true;
  });
  const dof = fit.rows - p;
  let Ct: Float64Array | null = null;
  let thetaIdentifiable: boolean[] = [];
  let thetaSe: Float64Array = new Float64Array(0);
  if (p > 0 && dof > 0 && Number.isFinite(fit.ssr)) {
    try {
      const s = covarianceFromNormalMatrix(fit.normalMatrix, p, fit.ssr, fit.rows);
      Ct = s.covariance;
      thetaIdentifiable = s.identifiable;
      thetaSe = s.standardErrors;
    } catch {
      Ct = null;
    }
  }
  // G: for each constant i, the θ index it reads and the factor du_i/dθ_j.
  const source = new Int32Array(7).fill(-1);
  const factor = new Float64Array(7);
  fit.fittedNames.forEach((name, j) => {
    const put = (c: ConstantName, f: number): void => {
      const i = NAMES.indexOf(c);
      source[i] = j;
      factor[i] = f;
      fitted[i] = true;
    };
    if (name === 'ln K') { put('Kt', 1); put('Ke', 1); }
    else if (name.startsWith('ln ')) {
      const c = name.slice(3) as ConstantName;
      if (NAMES.includes(c)) put(c, 1);
    } else if (name === 'Tc') {
      const th = fit.theta[j]!;
      const se = fit.parameters.Tc?.standardError;
      const scale = th !== 0 ? values[6]! / th : se !== undefined && thetaSe[j]! > 0 ? se / thetaSe[j]! : NaN;
      put('Tc', scale);
    }
  });
  for (let i = 0; i < 7; i++) {
    const ji = source[i]!;
    if (ji < 0) {
      if (!identifiable[i]) for (let k = 0; k < 7; k++) { covariance[i * 7 + k] = NaN; covariance[k * 7 + i] = NaN; }
      continue;
    }
    const ok = Ct !== null && thetaIdentifiable[ji] === true && Number.isFinite(factor[i]!) && Number.isFinite(values[i]!);
    identifiable[i] = ok;
  }
  for (let i = 0; i < 7; i++) {
    for (let k = 0; k < 7; k++) {
      const ji = source[i]!, jk = source[k]!;
      if (ji < 0 || jk < 0) {
        if (identifiable[i] && identifiable[k]) covariance[i * 7 + k] = 0;
        else covariance[i * 7 + k] = NaN;
        continue;
      }
      covariance[i * 7 + k] = identifiable[i] && identifiable[k] && Ct !== null ? factor[i]! * factor[k]! * Ct[ji * p + jk]! : NaN;
    }
  }
  const t = dof > 0 ? tQuantile(0.975, dof) : NaN;
  return { names: NAMES.slice(), values, fitted, identifiable, covariance, degreesOfFreedom: dof > 0 ? dof : NaN, tQuantile: t };
}
