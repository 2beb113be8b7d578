/**
 * Akaike and Bayesian information criteria of a least-squares fit with Gaussian errors of
 * unknown variance, up to a constant common to all models fitted to the same n observations.
 *
 * ## Method
 * AIC = n·ln(SSR/n) + 2k, AICc = AIC + 2k(k + 1)/(n − k − 1), BIC = n·ln(SSR/n) + k·ln n, where
 * k = p + 1 counts the noise variance as a parameter. Lower is better; only differences between
 * models on the same data mean anything.
 *
 * ## References
 * H. Akaike (1974), "A new look at the statistical model identification", IEEE Trans. Autom.
 * Control 19(6):716–723, doi:10.1109/TAC.1974.1100705.
 * G. Schwarz (1978), "Estimating the dimension of a model", Ann. Statist. 6(2):461–464,
 * doi:10.1214/aos/1176344136.
 * C. M. Hurvich, C.-L. Tsai (1989), "Regression and time series model selection in small samples",
 * Biometrika 76(2):297–307, doi:10.1093/biomet/76.2.297 (AICc).
 *
 * @param ssr - residual sum of squares, > 0
 * @param n - number of observations
 * @param p - number of fitted mean parameters
 * @returns `{ aic, aicc, bic }` (aicc is NaN when n ≤ p + 2)
 * @throws RangeError for a non-positive SSR, n < 1 or p < 0
 * @example
 * informationCriteria(100, 100, 2).aic; // => 6 (= 100·ln 1 + 2·3)
 */
export function informationCriteria(ssr: number, n: number, p: number): { aic: number; aicc: number; bic: number } {
  const fn = 'informationCriteria';
  if (!(ssr > 0) || !Number.isFinite(ssr)) throw new RangeError(`${fn}: ssr must be finite and > 0 (got ${ssr})`);
  if (!Number.isInteger(n) || n < 1) throw new RangeError(`${fn}: n must be an integer >= 1 (got ${n})`);
  if (!Number.isInteger(p) || p < 0) throw new RangeError(`${fn}: p must be an integer >= 0 (got ${p})`);
  const k = p + 1;
  const base = n * Math.log(ssr / n);
  const aic = base + 2 * k;
  return { aic, aicc: n - k - 1 > 0 ? aic + (2 * k * (k + 1)) / (n - k - 1) : NaN, bic: base + k * Math.log(n) };
}
