import type { NormalEquations } from './types.js';

/**
 * Allocates an empty accumulator for the normal equations (JᵀJ, Jᵀr, rᵀr) of a p-parameter
 * problem.
 *
 * @param p - number of parameters (integer ≥ 1)
 * @param compensated - add chunk totals with Neumaier compensation (default true)
 * @returns a zeroed {@link NormalEquations}
 * @throws RangeError when `p` is not an integer ≥ 1
 * @example
 * const acc = createNormalEquations(3);
 * acc.JtJ.length; // => 9
 */
export function createNormalEquations(p: number, compensated = true): NormalEquations {
  if (!Number.isInteger(p) || p < 1) {
    throw new RangeError(`createNormalEquations: p must be an integer >= 1 (got ${p})`);
  }
  const m = (p * (p + 1)) / 2 + p + 1;
  return {
    p,
    compensated,
    JtJ: new Float64Array(p * p),
    Jtr: new Float64Array(p),
    ssr: 0,
    rows: 0,
    high: new Float64Array(m),
    low: new Float64Array(m),
    chunk: new Float64Array(m),
  };
}
