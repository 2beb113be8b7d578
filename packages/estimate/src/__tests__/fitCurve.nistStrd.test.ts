/**
 * fitCurve reaches the NIST StRD certified values on all 27 nonlinear datasets.
 *
 * Data: NIST ITL Statistical Reference Datasets, nonlinear regression (packages/estimate/
 * test-data/nist-strd, provenance in README.md there). Certified values, certified standard
 * deviations and certified residual sums of squares are read from the files themselves.
 *
 * Score: LRE = −log10(|a − c|/|c|), clipped to 11 (the certified digits), as in McCullough (1998).
 *
 * Thresholds below are set one digit under what this solver reached when the table was written
 * (derived here: floor(observed LRE) − 1, capped at 9), except where stated. They are per file and
 * per start; `null` marks a start from which this solver does NOT reach the certified solution
 * (documented, and asserted as a failure so the table is revisited if that changes). Runs listed
 * in STRD_RUN_OPTIONS (fitStrd.ts; only MGH10 Start 1) use geodesic acceleration.
 */
import { describe, expect, it } from 'vitest';
import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import { logRelativeError } from '../solver/logRelativeError.js';
import { fitStrd, STRD_OPTIONS, strdRunOptions } from './strd/fitStrd.js';
import { loadStrd } from './strd/loadStrd.js';
import { STRD_NAMES } from './strd/strdModels.js';

interface Row {
  /** Least parameter LRE from Start 1 (null: documented failure from this start). */
  start1: number | null;
  /** Least parameter LRE from Start 2. */
  start2: number | null;
  /** LRE of the residual sum of squares (null: see the Lanczos1 note). */
  rss: number | null;
  /** Least LRE of the standard deviations (null: see the Lanczos1 note). */
  sd: number | null;
}

// Observed LREs when written (analytic Jacobian, tolerances 1e-15): see the report of this task.
const TABLE: Record<(typeof STRD_NAMES)[number], Row> = {
  Misra1a: { start1: 8, start2: 9, rss: 9, sd: 8 },
  Chwirut2: { start1: 7, start2: 7, rss: 9, sd: 7 },
  Chwirut1: { start1: 8, start2: 7, rss: 9, sd: 7 },
  Lanczos3: { start1: 9, start2: 9, rss: 9, sd: 9 },
  Gauss1: { start1: 7, start2: 7, rss: 9, sd: 7 },
  Gauss2: { start1: 8, start2: 8, rss: 9, sd: 8 },
  DanWood: { start1: 9, start2: 9, rss: 9, sd: 9 },
  Misra1b: { start1: 9, start2: 9, rss: 9, sd: 9 },
  Kirby2: { start1: 8, start2: 9, rss: 9, sd: 8 },
  Hahn1: { start1: 9, start2: 7, rss: 9, sd: 8 },
  // b2 = 5.6e-9 with an SD of 6.1e-9: the SSR is flat to ~1e-15 relative over the last digits;
  // Start 2 stops at LRE 6.5 (derived here), so the stated 6 has half a digit of margin.
  // Start 1 reaches LRE 7.2 with the default trust region (9.1 without it; derived here): stated 6.
  Nelson: { start1: 6, start2: 6, rss: 9, sd: 6 },
  MGH17: { start1: 8, start2: 9, rss: 9, sd: 8 },
  // Certified RSS 1.43e-25 cannot be reproduced in double precision from 11-digit data (MANIFEST.md);
  // the SDs scale with √RSS, so they are checked after rescaling to the certified σ² instead.
  Lanczos1: { start1: 9, start2: 9, rss: null, sd: null },
  Lanczos2: { start1: 9, start2: 7, rss: 8, sd: 7 },
  Gauss3: { start1: 7, start2: 7, rss: 9, sd: 6 },
  Misra1c: { start1: 9, start2: 9, rss: 9, sd: 9 },
  Misra1d: { start1: 8, start2: 9, rss: 9, sd: 8 },
  Roszman1: { start1: 9, start2: 7, rss: 9, sd: 7 },
  // Observed 6.8 from both starts (b8 is the least determined): stated 6.
  ENSO: { start1: 6, start2: 6, rss: 9, sd: 7 },
  MGH09: { start1: 7, start2: 6, rss: 9, sd: 6 },
  Thurber: { start1: 7, start2: 6, rss: 9, sd: 5 },
  // Start 1 (b2 = 1): without a trust region the first Gauss–Newton steps drive b2 → ~115, onto the
  // plateau b1 = mean(y) (SSR 9771.5). With the default initialStepBound 1 it reaches LRE 8.6
  // (derived here), stated 7.
  BoxBOD: { start1: 7, start2: 6, rss: 9, sd: 6 },
  Rat42: { start1: 8, start2: 9, rss: 9, sd: 8 },
  // Start 1 (b1 = 2, b2 = 4e5, b3 = 2.5e4): with the default solver it drifts to b1 → 0 along a
  // valley and stalls (SSR ≈ 1.45e6 vs the certified 87.9; asserted below). With geodesic
  // acceleration and dampingScale 'current' (STRD_RUN_OPTIONS) it reaches LRE 9.1 in 3898 trials
  // (derived here), stated 8; RSS LRE 11.0, SD LRE 9.2 (derived here) are covered by rss/sd.
  MGH10: { start1: 8, start2: 9, rss: 9, sd: 9 },
  Eckerle4: { start1: 8, start2: 8, rss: 9, sd: 8 },
  // Start 1 reaches LRE 7.7 with the default trust region (9.6 without it; derived here): stated 6.
  Rat43: { start1: 6, start2: 8, rss: 9, sd: 7 },
  Bennett5: { start1: 6, start2: 6, rss: 9, sd: 6 },
};

describe('fitCurve on NIST StRD nonlinear datasets (analytic Jacobians)', () => {
  for (const name of STRD_NAMES) {
    const ds = loadStrd(name);
    const row = TABLE[name];
    for (const start of [1, 2] as const) {
      const wanted = start === 1 ? row.start1 : row.start2;
      if (wanted === null) {
        it(`NIST StRD ${name} from Start ${start}: documented failure — stops away from the certified values`, () => {
          const { fit, parameterLre } = fitStrd(ds, start);
          expect(Math.min(...parameterLre)).toBeLessThan(1);
          expect(fit.ssr).toBeGreaterThan(2 * ds.certifiedRss);
          // Honest report: a stop away from a stationary point is not convergence.
          expect(fit.converged).toBe(false);
          expect(fit.stopReason).toBe('stalled');
        });
        continue;
      }
      it(`NIST StRD ${name} from Start ${start}: parameters agree to >= ${wanted} digits, converged`, () => {
        const { fit, parameterLre, rssLre, sdLre } = fitStrd(ds, start, true, strdRunOptions(name, start));
        expect(fit.converged, `${name} stopReason ${fit.stopReason}`).toBe(true);
        // Default stationarityTolerance 1e-3 (Bates & Watts' level); observed at most 2.5e-6 except
        // Lanczos1 (≈1e-3, rounding-level residuals, accepted through its negligible Gauss–Newton step).
        if (name !== 'Lanczos1') expect(fit.stationarity).toBeLessThan(1e-3);
        parameterLre.forEach((lre, j) => {
          expect(lre, `${name} start ${start} b${j + 1} = ${fit.theta[j]} vs ${ds.certified[j]}`).toBeGreaterThanOrEqual(
            wanted,
          );
        });
        if (row.rss !== null) {
          expect(rssLre, `${name} RSS ${fit.ssr} vs ${ds.certifiedRss}`).toBeGreaterThanOrEqual(row.rss);
        } else {
          // Lanczos1: certified RSS 1.4307867721E-25; double precision gives ~1e-25..1e-24 here.
          expect(fit.ssr).toBeLessThan(1e-20);
        }
        const sdFloor = row.sd ?? 4;
        const sds =
          row.sd !== null
            ? sdLre
            : ds.certifiedSd.map((c, j) =>
                logRelativeError(fit.covariance.standardErrors[j]! * Math.sqrt(ds.certifiedRss / fit.ssr), c),
              );
        sds.forEach((lre, j) => {
          expect(lre, `${name} SD of b${j + 1}: ${fit.covariance.standardErrors[j]} vs ${ds.certifiedSd[j]}`).toBeGreaterThanOrEqual(
            sdFloor,
          );
        });
        expect(fit.covariance.rank).toBe(ds.certified.length);
        expect(fit.covariance.identifiable.every(Boolean)).toBe(true);
      });
    }
  }
});

describe('fitCurve on NIST StRD MGH10 from Start 1: default solver vs geodesic acceleration', () => {
  it('NIST StRD MGH10 from Start 1 with the default options still stalls in the b1 → 0 valley', () => {
    const ds = loadStrd('MGH10');
    const { fit, parameterLre } = fitStrd(ds, 1, true, STRD_OPTIONS);
    // Observed (derived here): SSR 1.453e6 vs certified 8.7946e1, b1 ≈ 4e-45, 2079 trials.
    expect(Math.min(...parameterLre)).toBeLessThan(1);
    expect(fit.ssr).toBeGreaterThan(2 * ds.certifiedRss);
    expect(fit.converged).toBe(false);
    expect(fit.stopReason).toBe('stalled');
  });

  it('NIST StRD MGH10 from Start 1 with geodesic acceleration and current scaling also converges with central differences', () => {
    const ds = loadStrd('MGH10');
    const { fit, parameterLre } = fitStrd(ds, 1, false, strdRunOptions('MGH10', 1));
    // Observed LRE 9.4 in 3902 trials (derived here); the table's floor 6 for numerical Jacobians.
    expect(fit.converged, fit.stopReason).toBe(true);
    for (const lre of parameterLre) expect(lre).toBeGreaterThanOrEqual(6);
  });
});

describe('fitCurve on NIST StRD from Start 2 with central-difference Jacobians', () => {
  // Observed when written (derived here): least parameter LRE 6.8 (ENSO), least SD LRE 7.0
  // (Eckerle4); the floors 6 and 4 (the task's stated minimum for SDs) leave margin.
  for (const name of STRD_NAMES) {
    it(`NIST StRD ${name} from Start 2, numerical Jacobian: parameters >= 6 digits, SDs >= 4 digits`, () => {
      const ds = loadStrd(name);
      const { fit, parameterLre, sdLre } = fitStrd(ds, 2, false);
      expect(fit.converged, `${name} stopReason ${fit.stopReason}`).toBe(true);
      for (const lre of parameterLre) expect(lre).toBeGreaterThanOrEqual(6);
      if (name !== 'Lanczos1') for (const lre of sdLre) expect(lre).toBeGreaterThanOrEqual(4);
    });
  }
});

describe('covarianceFromNormalMatrix on NIST StRD (the streamed route)', () => {
  // Hahn1, Kirby2 and Thurber punish a naive covariance (MANIFEST.md); the diagonal scaling and
  // eigendecomposition here keep >= 4 digits (the task's stated minimum) from JᵀJ alone.
  for (const name of STRD_NAMES.filter((n) => n !== 'Lanczos1')) {
    it(`NIST StRD ${name}: standard deviations from JᵀJ at the optimum agree to >= 4 digits`, () => {
      const ds = loadStrd(name);
      const { fit } = fitStrd(ds, 2);
      const p = ds.certified.length;
      const cov = covarianceFromNormalMatrix(fit.JtJ, p, fit.ssr, ds.observations);
      ds.certifiedSd.forEach((c, j) => {
        expect(logRelativeError(cov.standardErrors[j]!, c), `${name} b${j + 1}`).toBeGreaterThanOrEqual(4);
      });
    });
  }
});

describe('NIST StRD file quirks', () => {
  it('NIST StRD Rat43: stated degrees of freedom 9, but certified SDs follow n − p = 11', () => {
    const ds = loadStrd('Rat43');
    expect(ds.statedDegreesOfFreedom).toBe(9); // as printed in Rat43.dat (MANIFEST.md quirk)
    expect(ds.observations - ds.certified.length).toBe(11);
    // Certified residual SD 2.8262414662E+01 = sqrt(8786.4049080 / 11) (MANIFEST.md).
    expect(logRelativeError(Math.sqrt(ds.certifiedRss / 11), ds.certifiedResidualSd)).toBeGreaterThanOrEqual(9);
    const { fit } = fitStrd(ds, 2);
    expect(fit.covariance.degreesOfFreedom).toBe(11);
  });

  it('NIST StRD Nelson: two predictor columns, response fitted as log(y)', () => {
    const ds = loadStrd('Nelson');
    expect(ds.x.length).toBe(2);
    expect(ds.observations).toBe(128); // Nelson.dat header: 128 observations
  });

  it('NIST StRD Roszman1: keeps the NIST b1 = 2.0196866396E-01 (principal-value arctan)', () => {
    // MANIFEST.md: this copy keeps NIST's value, not a branch-shifted one.
    expect(loadStrd('Roszman1').certified[0]).toBe(2.0196866396e-1);
  });
});
