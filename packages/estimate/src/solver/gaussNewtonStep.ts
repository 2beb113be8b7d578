import { solveSymmetricSystem } from './solveSymmetricSystem.js';

/**
 * The Gauss–Newton step δ = −(JᵀJ)⁻¹Jᵀr from the normal equations, solved with the columns scaled
 * to unit norm (log-scaled constants and nuisances differ by orders of magnitude in JᵀJ), over all
 * entries or — with `held` marks — over the entries not marked (the marked ones stay put, δ = 0).
 * Also the sum-of-squares drop the step promises, −Jᵀr·δ. The one scaled solve of the fitting
 * passes (the detailed fit's final steps, the lumped joint polish, the score test).
 *
 * @param JtJ - p×p row-major normal matrix
 * @param Jtr - gradient Jᵀr, length p
 * @param p - parameters
 * @param held - 1 where an entry is held, or null
 * @returns `{ step, drop }`, or null when the (scaled) system is not positive definite
 * @example
 * gaussNewtonStep(Float64Array.of(4, 0, 0, 1), Float64Array.of(-8, 2), 2, null); // => { step: [2, −2], drop: 20 }
 */
export function gaussNewtonStep(JtJ: Float64Array, Jtr: Float64Array, p: number, held: Uint8Array | null = null): { step: Float64Array; drop: number } | null {
  const keep: number[] = [];
  for (let j = 0; j < p; j++) if (held === null || held[j] === 0) keep.push(j);
  const m = keep.length;
  const d = keep.map((j) => { const v = Math.sqrt(JtJ[j * p + j]!); return v > 0 ? v : 1; });
  const A = new Float64Array(m * m);
  const g = new Float64Array(m);
  for (let a = 0; a < m; a++) {
    g[a] = -Jtr[keep[a]!]! / d[a]!;
    for (let c = 0; c < m; c++) A[a * m + c] = JtJ[keep[a]! * p + keep[c]!]! / (d[a]! * d[c]!);
  }
  const z = solveSymmetricSystem(A, g, m);
  if (z === null) return null;
  const step = new Float64Array(p);
  let drop = 0;
  for (let a = 0; a < m; a++) {
    step[keep[a]!] = z[a]! / d[a]!;
    drop -= step[keep[a]!]! * Jtr[keep[a]!]!;
  }
  return { step, drop };
}
