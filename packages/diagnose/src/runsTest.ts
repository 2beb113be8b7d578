import { normalCdf } from '@motorprint/estimate/distributions';
import type { RunsTestResult } from './types.js';

/**
 * Wald–Wolfowitz runs test on the signs of a series about a centre: too few runs mean the
 * residuals stay on one side for long stretches (model error that varies slowly), too many mean
 * they alternate (over-fitting or negatively correlated noise).
 *
 * ## Method
 * Values equal to the centre are left out; n₁ above, n₂ below, n = n₁ + n₂, R runs.
 * E[R] = 2n₁n₂/n + 1, Var[R] = 2n₁n₂(2n₁n₂ − n)/(n²(n − 1)); z = (R − E[R])/√Var[R] with the normal
 * approximation (fine for n₁, n₂ ≳ 20) and a two-sided p-value 2·Φ(−|z|) (stdlib normal CDF).
 *
 * ## References
 * A. Wald, J. Wolfowitz (1940), "On a test whether two samples are from the same population",
 * Ann. Math. Statist. 11(2):147–162, doi:10.1214/aoms/1177731909.
 *
 * @param x - the series (NaN values are skipped)
 * @param centre - the level signs are taken about. @default 0
 * @returns the {@link RunsTestResult}; z and pValue NaN when either side has fewer than 2 values
 * @throws TypeError when `x` is not a Float64Array
 * @example
 * runsTest(Float64Array.of(1, -1, 1, -1, 1, -1)).runs; // => 6
 */
export function runsTest(x: Float64Array, centre = 0): RunsTestResult {
  if (!(x instanceof Float64Array)) throw new TypeError('runsTest: x must be a Float64Array');
  if (!Number.isFinite(centre)) throw new RangeError(`runsTest: centre must be finite (got ${centre})`);
  let above = 0;
  let below = 0;
  let runs = 0;
  let last = 0;
  const n = x.length;
  for (let t = 0; t < n; t++) {
    const v = x[t]!;
    if (v !== v || v === centre) continue; // NaN or on the centre
    const s = v > centre ? 1 : -1;
    if (s > 0) above++;
    else below++;
    if (s !== last) runs++;
    last = s;
  }
  return runsFromCounts(runs, above, below);
}

/** The runs test from its counts (R runs, n₁ above, n₂ below): E[R], z and the p-value as `runsTest` states them. */
export function runsFromCounts(runs: number, above: number, below: number): RunsTestResult {
  const m = above + below;
  const expectedRuns = m > 0 ? (2 * above * below) / m + 1 : NaN;
  if (above < 2 || below < 2) return { runs, above, below, expectedRuns, z: NaN, pValue: NaN };
  const prod = 2 * above * below;
  const variance = (prod * (prod - m)) / (m * m * (m - 1));
  const z = (runs - expectedRuns) / Math.sqrt(variance);
  return { runs, above, below, expectedRuns, z, pValue: 2 * normalCdf(-Math.abs(z), 0, 1) };
}
