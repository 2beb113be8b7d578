import { informationCriteria } from './informationCriteria.js';
import { likelihoodRatioTest } from './likelihoodRatioTest.js';
import { nestedFTest } from './nestedFTest.js';
import type { ModelComparison, ModelSummary } from './types.js';

/**
 * Compares a restricted model with a fuller model that nests it, on the same n observations:
 * nested F-test, likelihood-ratio test, AIC and BIC, and a verdict.
 *
 * ## Method
 * See `nestedFTest`, `likelihoodRatioTest` and `informationCriteria`. The fuller model is
 * preferred when the F-test rejects the restricted one at `alpha` and its AIC is lower; BIC is
 * reported for the reader (it penalises extra terms harder on long records).
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., §6.1.
 * H. Akaike (1974), doi:10.1109/TAC.1974.1100705; G. Schwarz (1978), doi:10.1214/aos/1176344136.
 *
 * @param question - what is being compared, in plain words
 * @param restricted - `{ name, ssr, parameters }` of the restricted model
 * @param full - `{ name, ssr, parameters }` of the fuller model
 * @param n - number of observations
 * @param alpha - significance level of the F-test. @default 0.01
 * @returns the {@link ModelComparison}
 * @throws RangeError for out-of-range SSRs, counts or alpha (see the tests it calls)
 * @example
 * compareNestedModels('line vs quadratic', { name: 'line', ssr: 120, parameters: 2 },
 *   { name: 'quadratic', ssr: 100, parameters: 3 }, 53).preferred; // => 'full'
 */
export function compareNestedModels(
  question: string,
  restricted: ModelSummary,
  full: ModelSummary,
  n: number,
  alpha = 0.01,
): ModelComparison {
  const fn = 'compareNestedModels';
  if (typeof question !== 'string') throw new TypeError(`${fn}: question must be a string`);
  if (restricted === null || typeof restricted !== 'object') throw new TypeError(`${fn}: restricted must be a ModelSummary`);
  if (full === null || typeof full !== 'object') throw new TypeError(`${fn}: full must be a ModelSummary`);
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: alpha must be in (0, 1) (got ${alpha})`);
  const f = nestedFTest(restricted.ssr, restricted.parameters, full.ssr, full.parameters, n);
  const lr = likelihoodRatioTest(restricted.ssr, restricted.parameters, full.ssr, full.parameters, n);
  const ic1 = informationCriteria(restricted.ssr, n, restricted.parameters);
  const ic2 = informationCriteria(full.ssr, n, full.parameters);
  return {
    question,
    restricted: { ...restricted },
    full: { ...full },
    samples: n,
    fStatistic: f.statistic,
    fPValue: f.pValue,
    lrStatistic: lr.statistic,
    lrPValue: lr.pValue,
    aic: [ic1.aic, ic2.aic],
    bic: [ic1.bic, ic2.bic],
    preferred: f.pValue < alpha && ic2.aic < ic1.aic ? 'full' : 'restricted',
  };
}
