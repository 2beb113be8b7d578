import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import { tQuantile } from '../distributions.js';
import type { Constants, ParameterLayout } from './createMotorProblem.js';
import { UNITS } from './informationMap.js';
import type { LumpedName } from './informationMap.js';
import { logCovarianceOfConstants } from './logCovarianceOfConstants.js';
import type { ConstantMap } from './logCovarianceOfConstants.js';
import type { ConstantCovariance, FitInformation, MotorConstantName, ParameterEstimate, UninformedConstant } from './types.js';


/** Input of `lumpedStatistics`: the lumped fit's optimum and its layout. */
export interface LumpedStatisticsInput {
  sol: { theta: Float64Array; JtJ: Float64Array; ssr: number; rows: number };
  constants: Constants;
  layout: ParameterLayout;
  names: readonly LumpedName[];
  /** Constants held fixed (by the caller or by the model, e.g. Tc = 0 without Coulomb friction). */
  fixed: Partial<Record<LumpedName, number>>;
  /** Constants the caller pinned. */
  pinnedByCaller: Partial<Record<MotorConstantName, number>>;
  coulomb: boolean;
  separate: boolean;
  notInformed: UninformedConstant[];
  informedBy: Partial<Record<LumpedName, string[]>>;
}

/**
 * The lumped fit's statistics, stated once: covariance s²(JᵀJ)⁺ at the optimum
 * (`covarianceFromNormalMatrix`, s² = SSR/(rows − p)), each constant's standard error by the delta
 * method and its 95 % interval Student-t on the fitted scale (log scale for the positive constants,
 * linear for Tc), Kt/Ke when both are fitted apart (var(ln Kt − ln Ke) = C_tt + C_ee − 2·C_te), the
 * covariance of ln p for every reader, and the information at the optimum.
 *
 * @param input - the optimum, the layout and who informs what
 * @returns parameters, θ covariance, the constants' log covariance and the information summary
 */
export function lumpedStatistics(input: LumpedStatisticsInput): {
  parameters: Record<string, ParameterEstimate>; covariance: Float64Array | null; constantCovariance: ConstantCovariance; information: FitInformation | undefined;
} {
  const { sol, constants, layout, names, fixed, pinnedByCaller, coulomb, separate, notInformed, informedBy } = input;
  const p = sol.theta.length;
  const dof = sol.rows - p;
  let se: Float64Array | null = null;
  let covariance: Float64Array | null = null;
  let identifiable: boolean[] = new Array<boolean>(p).fill(true);
  let information: FitInformation | undefined;
  if (dof > 0 && Number.isFinite(sol.ssr)) {
    try {
      const cov = covarianceFromNormalMatrix(sol.JtJ, p, sol.ssr, sol.rows);
      se = cov.standardErrors;
      covariance = cov.covariance;
      identifiable = cov.identifiable;
      const constantIndex: Record<string, number> = {};
      for (const [c, i] of [['R', layout.iR], ['L', layout.iL], ['Kt', layout.iKt], ['Ke', layout.iKe], ['J', layout.iJ], ['b', layout.iB], ['Tc', layout.iTc]] as const) if (i >= 0) constantIndex[c] = i;
      information = { constantIndex, singularValues: cov.singularValues, conditionNumber: cov.conditionNumber, identifiable: cov.identifiable, rank: cov.rank };
    } catch {
      se = null;
    }
  }
  const tq = tQuantile(0.975, Math.max(dof, 1));
  const uninformed = new Set(notInformed.map((u) => u.name));
  const parameters: Record<string, ParameterEstimate> = {};
  for (const c of names) {
    if (!coulomb && c === 'Tc' && fixed.Tc === 0 && pinnedByCaller.Tc === undefined) continue;
    if (fixed[c] !== undefined) { parameters[c] = { value: fixed[c]!, unit: UNITS[c], fixed: true }; continue; }
    if (uninformed.has(c)) continue;
    const i = c === 'R' ? layout.iR : c === 'L' ? layout.iL : c === 'Kt' ? layout.iKt : c === 'Ke' ? layout.iKe : c === 'J' ? layout.iJ : c === 'b' ? layout.iB : layout.iTc;
    if (i < 0) continue;
    const value = constants[c];
    const est: ParameterEstimate = { value, unit: UNITS[c], informedBy: informedBy[c] };
    if (se !== null && identifiable[i] && Number.isFinite(se[i]!)) {
      const s = se[i]!;
      if (c === 'Tc') {
        est.standardError = s * layout.tcScale;
        est.interval95 = [value - tq * s * layout.tcScale, value + tq * s * layout.tcScale];
      } else {
        est.standardError = value * s;
        est.interval95 = [value * Math.exp(-tq * s), value * Math.exp(tq * s)];
      }
    }
    parameters[c] = est;
  }
  // Kt/Ke when both are fitted apart: var(ln Kt − ln Ke) = C_tt + C_ee − 2·C_te (delta method).
  if (separate && layout.iKt >= 0 && layout.iKe >= 0 && layout.iKt !== layout.iKe) {
    const a = layout.iKt, b = layout.iKe;
    const value = constants.Kt / constants.Ke;
    const est: ParameterEstimate = { value, unit: '1 (N·m/A per V·s/rad)', informedBy: informedBy.Kt };
    if (covariance !== null && identifiable[a] && identifiable[b]) {
      const v = covariance[a * p + a]! + covariance[b * p + b]! - 2 * covariance[a * p + b]!;
      if (v >= 0 && Number.isFinite(v)) {
        est.standardError = value * Math.sqrt(v);
        est.interval95 = [value * Math.exp(-tq * Math.sqrt(v)), value * Math.exp(tq * Math.sqrt(v))];
      }
    }
    parameters['Kt/Ke'] = est;
  }
  // The constants' joint statistics (ln p), for every reader.
  const maps: ConstantMap[] = (['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] as const)
    .filter((c) => parameters[c] !== undefined)
    .map((c) => {
      const est = parameters[c]!;
      if (est.fixed === true) return { name: c, value: est.value, status: 'pinned' as const, gradient: [] };
      const i = c === 'R' ? layout.iR : c === 'L' ? layout.iL : c === 'Kt' ? layout.iKt : c === 'Ke' ? layout.iKe : c === 'J' ? layout.iJ : c === 'b' ? layout.iB : layout.iTc;
      if (i < 0) return { name: c, value: est.value, status: 'absent' as const, gradient: [] };
      // θ = ln p, except Tc = θ·scale: d ln Tc/dθ = scale/Tc.
      return { name: c, value: est.value, status: 'fitted' as const, gradient: [[i, c === 'Tc' ? layout.tcScale / est.value : 1]] as [number, number][] };
    });
  const constantCovariance = logCovarianceOfConstants(maps, covariance, identifiable, p, dof);
  return { parameters, covariance, constantCovariance, information };
}
