/**
 * The probability distributions motorprint takes from stdlib (Student t quantiles for the intervals;
 * the F, χ² and normal CDFs of the diagnosis's tests), imported in this one module and read by the
 * other packages through `@motorprint/estimate/distributions`. The workspace build (`pnpm build`,
 * scripts/build.mjs) replaces its compiled `dist/distributions.js` by one bundle of the stdlib code it
 * imports, so a process loads one file instead of the ~430 small modules stdlib's packages spread
 * it over (about 0.1 s of every command that fits). The functions and their results are stdlib's,
 * unchanged.
 */
export { default as chisquareCdf } from '@stdlib/stats-base-dists-chisquare-cdf';
export { default as fCdf } from '@stdlib/stats-base-dists-f-cdf';
export { default as normalCdf } from '@stdlib/stats-base-dists-normal-cdf';
export { default as tQuantile } from '@stdlib/stats-base-dists-t-quantile';
