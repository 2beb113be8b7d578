import { chisquareCdf } from '@motorprint/estimate/distributions';

/**
 * Likelihood-ratio test of nested least-squares models with Gaussian errors of unknown variance.
 *
 * ## Method
 * With the variance profiled out, −2·ln Λ = n·ln(SSR₁/SSR₂), asymptotically χ²(p₂ − p₁) under the
 * restricted model (Wilks' theorem); the p-value is the upper tail, 1 − stdlib χ² CDF.
 *
 * ## References
 * S. S. Wilks (1938), "The large-sample distribution of the likelihood ratio for testing composite
 * hypotheses", Ann. Math. Statist. 9(1):60–62, doi:10.1214/aoms/1177732360.
 *
 * @param ssrRestricted - SSR₁ of the restricted model, > 0
 * @param pRestricted - p₁
 * @param ssrFull - SSR₂ of the fuller model, > 0
 * @param pFull - p₂ > p₁
 * @param n - number of observations
 * @returns `{ statistic, pValue, df }`
 * @throws RangeError for non-positive SSRs, parameter counts out of order or n < 1
 * @example
 * likelihoodRatioTest(110, 2, 100, 3, 100).statistic; // ≈ 9.531 (= 100·ln 1.1)
 */
export function likelihoodRatioTest(
  ssrRestricted: number,
  pRestricted: number,
  ssrFull: number,
  pFull: number,
  n: number,
): { statistic: number; pValue: number; df: number } {
  const fn = 'likelihoodRatioTest';
  if (!(ssrRestricted > 0) || !Number.isFinite(ssrRestricted)) throw new RangeError(`${fn}: ssrRestricted must be finite and > 0 (got ${ssrRestricted})`);
  if (!(ssrFull > 0) || !Number.isFinite(ssrFull)) throw new RangeError(`${fn}: ssrFull must be finite and > 0 (got ${ssrFull})`);
  if (!Number.isInteger(pRestricted) || pRestricted < 0) throw new RangeError(`${fn}: pRestricted must be an integer >= 0 (got ${pRestricted})`);
  if (!Number.isInteger(pFull) || pFull <= pRestricted) throw new RangeError(`${fn}: pFull must be an integer > pRestricted = ${pRestricted} (got ${pFull})`);
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`${fn}: n must be an integer >= 1 (got ${n})`);
  const df = pFull - pRestricted;
  const statistic = Math.max(n * Math.log(ssrRestricted / ssrFull), 0);
  return { statistic, pValue: 1 - chisquareCdf(statistic, df), df };
}
