import { chisquareCdf } from '@motorprint/estimate/distributions';
import type { LjungBoxResult } from './types.js';

/**
 * Ljung–Box portmanteau test: are the first m autocorrelations of a residual series jointly
 * consistent with white noise?
 *
 * ## Method
 * Q = n(n + 2)·Σ_{k=1}^{m} r_k²/(n − k), referred to χ²(m − fittedParameters); the p-value is
 * the upper tail (stdlib χ² CDF). A small p-value says the residuals are correlated: the model
 * leaves structure in them, or the noise is coloured.
 *
 * ## References
 * G. M. Ljung, G. E. P. Box (1978), "On a measure of lack of fit in time series models",
 * Biometrika 65(2):297–303, doi:10.1093/biomet/65.2.297.
 *
 * @param autocorrelation - r_0…r_m (from `autocorrelationInto`)
 * @param n - number of samples the autocorrelation came from
 * @param fittedParameters - ARMA-type parameters to subtract from the degrees of freedom. @default 0
 * @returns the {@link LjungBoxResult}; NaN statistic and p-value when any r_k is not finite
 * @throws RangeError when m < 1, n ≤ m or the degrees of freedom would be < 1
 * @example
 * ljungBoxTest(Float64Array.of(1, 0.1, 0.1), 100).statistic; // ≈ 2.0724 (= 100·102·(0.01/99 + 0.01/98))
 */
export function ljungBoxTest(autocorrelation: Float64Array, n: number, fittedParameters = 0): LjungBoxResult {
  const fn = 'ljungBoxTest';
  if (!(autocorrelation instanceof Float64Array)) throw new TypeError(`${fn}: autocorrelation must be a Float64Array`);
  const m = autocorrelation.length - 1;
  if (m < 1) throw new RangeError(`${fn}: autocorrelation must hold lags 0…m with m >= 1 (got length ${autocorrelation.length})`);
  if (!Number.isInteger(n) || n <= m) throw new RangeError(`${fn}: n must be an integer > m = ${m} (got ${n})`);
  if (!Number.isInteger(fittedParameters) || fittedParameters < 0 || m - fittedParameters < 1) {
    throw new RangeError(`${fn}: fittedParameters must be an integer in [0, ${m - 1}] (got ${fittedParameters})`);
  }
  let s = 0;
  for (let k = 1; k <= m; k++) {
    const r = autocorrelation[k]!;
    s += (r * r) / (n - k);
  }
  const statistic = n * (n + 2) * s;
  const df = m - fittedParameters;
  return { statistic, lags: m, degreesOfFreedom: df, pValue: Number.isFinite(statistic) ? 1 - chisquareCdf(statistic, df) : NaN };
}
