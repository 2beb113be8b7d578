import { autocorrelationOfDeviations } from './autocorrelationInto.js';
import { ljungBoxTest } from './ljungBoxTest.js';
import { runsFromCounts } from './runsTest.js';
import { residualPasses } from './passes.js';
import type { ResidualStats } from './types.js';

/** z_{0.975} of the standard normal (the ±1.96/√n whiteness band; common practice). */
const Z975 = 1.959963984540054;

/**
 * Residual statistics of one channel: RMS, NRMSE, autocorrelation with its whiteness band, the
 * Ljung–Box test and the runs test.
 *
 * ## Definitions
 * With e = ŷ − y over the samples where both are finite:
 * - RMS = √(Σe²/n) [channel unit];
 * - **NRMSE = RMS / SD(y)** (SD about the mean of the measurement, divisor n): 0 is a perfect fit,
 *   1 is no better than the mean. This is the figure the command line prints;
 * - r_k, k = 0…m, the residual autocorrelation; under whiteness |r_k| ≤ 1.96/√n for about 95 %
 *   of the lags;
 * - Ljung–Box Q at lag m and its χ²(m) p-value; the runs test on the signs of e about zero.
 *
 * ## References
 * G. M. Ljung, G. E. P. Box (1978), Biometrika 65(2):297–303, doi:10.1093/biomet/65.2.297.
 * A. Wald, J. Wolfowitz (1940), Ann. Math. Statist. 11(2):147–162, doi:10.1214/aoms/1177731909.
 *
 * @param measured - measured channel y [channel unit]
 * @param predicted - model output ŷ, same length [channel unit]; NaN samples (not fitted) are skipped
 * @param maxLag - largest autocorrelation lag m. @default min(50, n/4)
 * @returns the {@link ResidualStats}
 * @throws TypeError when the series are not Float64Arrays of equal length
 * @throws RangeError when fewer than 8 finite sample pairs remain, or maxLag is out of range
 * @example
 * residualStats(Float64Array.of(1, 2, 3, 4, 5, 6, 7, 8, 9, 10), Float64Array.of(1.1, 1.9, 3.1, 3.9, 5.1, 5.9, 7.1, 7.9, 9.1, 9.9), 2).rms; // ≈ 0.1
 */
export function residualStats(measured: Float64Array, predicted: Float64Array, maxLag?: number): ResidualStats {
  const fn = 'residualStats';
  if (!(measured instanceof Float64Array)) throw new TypeError(`${fn}: measured must be a Float64Array`);
  if (!(predicted instanceof Float64Array) || predicted.length !== measured.length) {
    throw new TypeError(`${fn}: predicted must be a Float64Array of length ${measured.length}`);
  }
  const passes = residualPasses(measured, predicted);
  const n = passes.n;
  if (n < 8) throw new RangeError(`${fn}: need at least 8 finite sample pairs (got ${n})`);
  const m = maxLag ?? Math.min(50, Math.floor(n / 4));
  if (!Number.isInteger(m) || m < 1 || m >= n) throw new RangeError(`${fn}: maxLag must be an integer in [1, ${n - 1}] (got ${maxLag})`);
  // The residuals' deviations from their mean for the autocorrelation, from the same pass as the
  // sums of squares (the numbers `autocorrelationInto` would compute: the same plain sum for the mean).
  const { se, dev, c0, see, cee, syy, cyy, above, below, runs } = passes;
  const sse = see + cee;
  const sst = syy + cyy;
  const rms = Math.sqrt(sse / n);
  const nrmse = sst > 0 ? Math.sqrt(sse / sst) : NaN;
  const acf = autocorrelationOfDeviations(new Float64Array(m + 1), dev, c0, m);
  const band = Z975 / Math.sqrt(n);
  let outside = 0;
  for (let k = 1; k <= m; k++) if (Math.abs(acf[k]!) > band) outside++;
  return {
    samples: n,
    mean: se / n,
    rms,
    nrmse,
    autocorrelation: acf,
    whitenessBand: band,
    lagsOutsideBand: outside,
    ljungBox: ljungBoxTest(acf, n),
    runs: runsFromCounts(runs, above, below),
  };
}
