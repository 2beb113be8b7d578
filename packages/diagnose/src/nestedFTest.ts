import { fCdf } from '@motorprint/estimate/distributions';

/**
 * Nested-model F-test: does the fuller model (p₂ parameters) reduce the residual sum of squares
 * by more than noise would, compared with the restricted model (p₁ < p₂) it contains?
 *
 * ## Method
 * F = [(SSR₁ − SSR₂)/(p₂ − p₁)] / [SSR₂/(n − p₂)], referred to F(p₂ − p₁, n − p₂); the p-value is
 * the upper tail, 1 − stdlib F CDF. Exact for linear models with Gaussian errors, approximate
 * for nonlinear least squares.
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., Wiley, §6.1 (extra sum of
 * squares principle), doi:10.1002/9781118625590.
 *
 * @param ssrRestricted - SSR₁ of the restricted model
 * @param pRestricted - p₁, its number of parameters
 * @param ssrFull - SSR₂ of the fuller model
 * @param pFull - p₂ > p₁
 * @param n - number of observations > p₂
 * @returns `{ statistic, pValue, df1, df2 }`
 * @throws RangeError for negative or non-finite SSRs, or parameter counts out of order
 * @example
 * nestedFTest(120, 2, 100, 3, 53).statistic; // => 10 (= 20 / (100 / 50))
 */
export function nestedFTest(
  ssrRestricted: number,
  pRestricted: number,
  ssrFull: number,
  pFull: number,
  n: number,
): { statistic: number; pValue: number; df1: number; df2: number } {
  const fn = 'nestedFTest';
  if (!(ssrRestricted >= 0) || !Number.isFinite(ssrRestricted)) throw new RangeError(`${fn}: ssrRestricted must be finite and >= 0 (got ${ssrRestricted})`);
  if (!(ssrFull >= 0) || !Number.isFinite(ssrFull)) throw new RangeError(`${fn}: ssrFull must be finite and >= 0 (got ${ssrFull})`);
  if (!Number.isInteger(pRestricted) || pRestricted < 0) throw new RangeError(`${fn}: pRestricted must be an integer >= 0 (got ${pRestricted})`);
  if (!Number.isInteger(pFull) || pFull <= pRestricted) throw new RangeError(`${fn}: pFull must be an integer > pRestricted = ${pRestricted} (got ${pFull})`);
  if (!Number.isInteger(n) || n <= pFull) throw new RangeError(`${fn}: n must be an integer > pFull = ${pFull} (got ${n})`);
  const df1 = pFull - pRestricted;
  const df2 = n - pFull;
  if (ssrFull === 0) return { statistic: ssrRestricted > 0 ? Infinity : NaN, pValue: ssrRestricted > 0 ? 0 : NaN, df1, df2 };
  const statistic = (Math.max(ssrRestricted - ssrFull, 0) / df1) / (ssrFull / df2);
  return { statistic, pValue: 1 - fCdf(statistic, df1, df2), df1, df2 };
}
