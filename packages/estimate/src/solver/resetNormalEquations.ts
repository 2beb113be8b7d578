import type { NormalEquations } from './types.js';

/**
 * Zeroes an accumulator so it can be filled again for a new parameter vector.
 *
 * @param acc - accumulator to clear (modified in place)
 * @returns the same accumulator
 * @example
 * resetNormalEquations(acc).ssr; // => 0
 */
export function resetNormalEquations(acc: NormalEquations): NormalEquations {
  acc.JtJ.fill(0);
  acc.Jtr.fill(0);
  acc.high.fill(0);
  acc.low.fill(0);
  acc.ssr = 0;
  acc.rows = 0;
  return acc;
}
