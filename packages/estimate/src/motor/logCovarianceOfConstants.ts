import { tQuantile } from '../distributions.js';
import type { ConstantCovariance } from './types.js';

/** How one constant depends on θ: d ln p / dθ_j for the entries it reads. */
export interface ConstantMap {
  name: string;
  value: number;
  /** `pinned`: known exactly; `fitted`: moves with θ by `gradient`; `absent`: no usable variance. */
  status: 'pinned' | 'fitted' | 'absent';
  /** Sparse gradient d ln p / dθ: [θ index, factor] pairs. */
  gradient: [number, number][];
}

/**
 * The covariance of the logarithms of a fit's constants from the covariance of θ, by the delta
 * method: C = G·Σθ·Gᵀ with G_ij = ∂ ln p_i/∂θ_j (1 for θ = ln p; 1/p·scale for a linear entry).
 * Internal to the estimator: both the streamed linear fit and the detailed fit state their
 * constants' statistics through it, so every reader gets the same numbers.
 *
 * @param maps - one entry per constant
 * @param thetaCov - covariance of θ (p×p) or null
 * @param identifiable - per θ entry, whether the covariance kept its direction
 * @param p - length of θ
 * @param dof - rows − p
 * @returns the constants' log covariance
 */
export function logCovarianceOfConstants(maps: ConstantMap[], thetaCov: Float64Array | null, identifiable: boolean[], p: number, dof: number): ConstantCovariance {
  const m = maps.length;
  const C = new Float64Array(m * m);
  const usable = maps.map((c) => {
    if (c.status === 'pinned') return true;
    if (c.status === 'absent' || thetaCov === null || !(c.value > 0)) return false;
    return c.gradient.length > 0 && c.gradient.every(([j, f]) => f === 0 || identifiable[j] === true) && c.gradient.every(([, f]) => Number.isFinite(f));
  });
  for (let a = 0; a < m; a++) {
    for (let b = 0; b < m; b++) {
      if (!usable[a] || !usable[b]) { C[a * m + b] = NaN; continue; }
      let s = 0;
      for (const [i, fi] of maps[a]!.gradient) for (const [j, fj] of maps[b]!.gradient) s += fi * fj * thetaCov![i * p + j]!;
      C[a * m + b] = s;
    }
  }
  return {
    names: maps.map((c) => c.name), values: maps.map((c) => c.value), usable, logCovariance: C,
    degreesOfFreedom: dof, tQuantile: dof > 0 ? tQuantile(0.975, dof) : NaN,
  };
}
