import { covarianceFromNormalMatrix } from '@motorprint/estimate';
import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { autocorrelationInto } from '../autocorrelationInto.js';
import { compareNestedModels } from '../compareNestedModels.js';
import { confidenceIntervals } from '../confidenceIntervals.js';
import { correlationFromCovariance } from '../correlationFromCovariance.js';
import { fitLinearModel } from '../fitLinearModel.js';
import { informationCriteria } from '../informationCriteria.js';
import { likelihoodRatioTest } from '../likelihoodRatioTest.js';
import { ljungBoxTest } from '../ljungBoxTest.js';
import { nestedFTest } from '../nestedFTest.js';
import { residualStats } from '../residualStats.js';
import { runsTest } from '../runsTest.js';

describe('confidenceIntervals uses Student-t quantiles that match the printed tables', () => {
  // Standard t table, from memory: t(0.975, 1) = 12.706, t(0.975, 10) = 2.228, t(0.975, 30) = 2.042.
  const cases: [number, number][] = [[1, 12.706], [10, 2.228], [30, 2.042]];
  for (const [dof, table] of cases) {
    it(`t(0.975, ${dof}) ≈ ${table}`, () => {
      const p = 1;
      // One parameter, JᵀJ = 1, SSR = dof so that s² = 1 and SE = 1 (derived here: SSR/(n − p) = dof/dof).
      const s = covarianceFromNormalMatrix(Float64Array.of(1), p, dof, dof + 1);
      const rep = confidenceIntervals(['a'], [5], s);
      expectClose(rep.tQuantile, table, { abs: 5e-4 }, `t quantile dof ${dof}`);
      expectClose(rep.parameters[0]!.interval![1] - 5, table, { abs: 5e-4 }, 'half-width = t·SE with SE 1');
    });
  }
  it('a parameter the covariance marks unidentifiable gets no interval, not a huge one', () => {
    // JᵀJ = [[1, 1], [1, 1]] is singular (derived here): the second column repeats the first.
    const s = covarianceFromNormalMatrix(Float64Array.of(1, 1, 1, 1), 2, 1, 10);
    const rep = confidenceIntervals(['a', 'b'], [1, 2], s);
    expect(rep.parameters.map((q) => q.identifiable)).toEqual([false, false]);
    expect(rep.parameters[0]!.interval).toBeNull();
    expect(rep.conditionNumber).toBeGreaterThan(1e6);
  });
  it('reports the correlation matrix of the covariance', () => {
    // cov [[4, 2], [2, 9]] → ρ = 2/√36 = 1/3 (derived here).
    const r = correlationFromCovariance(Float64Array.of(4, 2, 2, 9), 2);
    expectClose(r[1]!, 1 / 3, { rel: 1e-15 }, 'ρ12');
    expect(r[0]).toBe(1);
  });
  it('rejects a level outside (0, 1) and mismatched names', () => {
    const s = covarianceFromNormalMatrix(Float64Array.of(1), 1, 1, 5);
    expect(() => confidenceIntervals(['a'], [1], s, 1.5)).toThrow('level must be in (0, 1) (got 1.5)');
    expect(() => confidenceIntervals(['a', 'b'], [1, 2], s)).toThrow('names has 2 entries');
  });
});

describe('p-values of the χ² and F tests match the printed tables', () => {
  it('the Ljung–Box p-value at the χ² 5 % point of 10 degrees of freedom is 0.05', () => {
    // Standard χ² table, from memory: χ²(0.95, 10) = 18.307. Build r_k so that Q = 18.307 exactly
    // (derived here): equal r_k² = c with n(n+2)·c·Σ1/(n−k) = 18.307.
    const n = 200, m = 10;
    let s = 0;
    for (let k = 1; k <= m; k++) s += 1 / (n - k);
    const r = Math.sqrt(18.307 / (n * (n + 2) * s));
    const acf = new Float64Array(m + 1).fill(r);
    acf[0] = 1;
    const lb = ljungBoxTest(acf, n);
    expectClose(lb.statistic, 18.307, { rel: 1e-12 }, 'Q');
    expectClose(lb.pValue, 0.05, { abs: 2e-5 }, 'p at χ²(0.95, 10)');
  });
  it('the likelihood-ratio p-value at 3.841 with 1 degree of freedom is 0.05', () => {
    // Standard χ² table, from memory: χ²(0.95, 1) = 3.841. n·ln(SSR1/SSR2) = 3.841 with n = 100 → ratio e^0.03841 (derived here).
    const lr = likelihoodRatioTest(100 * Math.exp(0.03841), 2, 100, 3, 100);
    expectClose(lr.statistic, 3.841, { rel: 1e-12 }, 'LR');
    expectClose(lr.pValue, 0.05, { abs: 5e-5 }, 'p');
  });
  it('the nested F-test p-value at F(0.95; 2, 10) = 4.10 is 0.05', () => {
    // Standard F table, from memory: F(0.95; 2, 10) = 4.10 (4.1028 to 4 decimals).
    // SSR2 = 10 with n − p2 = 10 gives s² = 1; SSR1 − SSR2 = 2·4.1028 (derived here).
    const f = nestedFTest(10 + 2 * 4.1028, 1, 10, 3, 13);
    expectClose(f.statistic, 4.1028, { rel: 1e-12 }, 'F');
    expectClose(f.pValue, 0.05, { abs: 1e-4 }, 'p');
    expect(f.df1).toBe(2);
    expect(f.df2).toBe(10);
  });
  it('AIC and BIC follow n·ln(SSR/n) + penalty', () => {
    // Derived here: n = 100, SSR = 100 → ln 1 = 0; k = p + 1 = 3 → AIC 6, BIC 3·ln 100 = 13.8155…
    const ic = informationCriteria(100, 100, 2);
    expect(ic.aic).toBe(6);
    expectClose(ic.bic, 3 * Math.log(100), { rel: 1e-15 }, 'BIC');
    // AICc = 6 + 2·3·4/(100 − 4) = 6.25 (derived here).
    expectClose(ic.aicc, 6.25, { rel: 1e-15 }, 'AICc');
  });
  it('compareNestedModels prefers the fuller model only when the F-test and AIC agree', () => {
    // 20 less SSR for 1 parameter with s² = 2 → F = 10 (derived here), p ≈ 0.0027 < 0.01.
    const c = compareNestedModels('line vs quadratic', { name: 'line', ssr: 120, parameters: 2 }, { name: 'quadratic', ssr: 100, parameters: 3 }, 53);
    expectClose(c.fStatistic, 10, { rel: 1e-12 }, 'F');
    expect(c.preferred).toBe('full');
    const d = compareNestedModels('line vs quadratic', { name: 'line', ssr: 101, parameters: 2 }, { name: 'quadratic', ssr: 100, parameters: 3 }, 53);
    expect(d.preferred).toBe('restricted');
  });
  it('rejects parameter counts out of order', () => {
    expect(() => nestedFTest(10, 3, 9, 3, 20)).toThrow('pFull must be an integer > pRestricted = 3 (got 3)');
    expect(() => likelihoodRatioTest(0, 1, 1, 2, 10)).toThrow('ssrRestricted must be finite and > 0 (got 0)');
  });
});

describe('autocorrelation, runs and residual statistics compute what their definitions say', () => {
  it('autocorrelationInto of an alternating series', () => {
    // Derived here: x = ±1, mean 0, c0 = 4, lag-1 sum = −3 → r1 = −0.75; lag-2 sum = 2 → 0.5.
    const r = autocorrelationInto(new Float64Array(3), Float64Array.of(1, -1, 1, -1), 2);
    expect(Array.from(r)).toEqual([1, -0.75, 0.5]);
  });
  it('autocorrelationInto returns NaN for a constant series rather than throwing', () => {
    const r = autocorrelationInto(new Float64Array(2), new Float64Array(10).fill(3), 1);
    expect(Number.isNaN(r[0])).toBe(true);
  });
  it('runsTest counts runs and uses E[R] = 2·n1·n2/n + 1', () => {
    // Derived here: + + − − − + + + − − : 4 runs, n1 = 5, n2 = 5, E[R] = 6,
    // Var = 50·(50 − 10)/(100·9) = 2.2222…, z = −2/√2.2222 = −1.3416.
    const x = Float64Array.of(1, 2, -1, -2, -3, 1, 2, 3, -1, -2);
    const t = runsTest(x);
    expect(t.runs).toBe(4);
    expect(t.expectedRuns).toBe(6);
    expectClose(t.z, -2 / Math.sqrt(2000 / 900), { rel: 1e-12 }, 'z');
    // Two-sided normal p at |z| = 1.3416: 0.1797 (standard normal table, from memory: Φ(−1.34) = 0.0901).
    expectClose(t.pValue, 0.1797, { abs: 2e-3 }, 'p');
  });
  it('residualStats gives RMS and NRMSE = RMS/SD(y), and no other fit-quality figure', () => {
    // Derived here: y = 1…10 (SD with divisor n = √8.25), residuals ±0.1 → RMS 0.1, NRMSE 0.1/√8.25.
    const y = Float64Array.from({ length: 10 }, (_, k) => k + 1);
    const yh = Float64Array.from(y, (v, k) => v + (k % 2 === 0 ? 0.1 : -0.1));
    const s = residualStats(y, yh, 2);
    expectClose(s.rms, 0.1, { rel: 1e-12 }, 'rms');
    expectClose(s.nrmse, 0.1 / Math.sqrt(8.25), { rel: 1e-12 }, 'nrmse');
    expect(Object.keys(s)).not.toContain('fitPercent');
    expect(s.runs.runs).toBe(10);
    expectClose(s.whitenessBand, 1.959963984540054 / Math.sqrt(10), { rel: 1e-15 }, 'band');
  });
  it('residualStats skips NaN (unfitted) samples and rejects short or mismatched input', () => {
    const y = Float64Array.from({ length: 20 }, (_, k) => Math.sin(k));
    const yh = y.map((v, k) => (k < 5 ? NaN : v + 0.01 * ((k * 7) % 3 - 1)));
    expect(residualStats(y, yh).samples).toBe(15);
    expect(() => residualStats(y, new Float64Array(3))).toThrow('predicted must be a Float64Array of length 20');
    expect(() => residualStats(y, new Float64Array(20).fill(NaN))).toThrow('need at least 8 finite sample pairs (got 0)');
  });
  it('fitLinearModel recovers an exact line and flags a collinear column', () => {
    const one = new Float64Array(4).fill(1);
    const x = Float64Array.of(0, 1, 2, 3);
    // Derived here: y = 1 + 2x exactly.
    const f = fitLinearModel([one, x], Float64Array.of(1, 3, 5, 7));
    expectClose(f.coefficients[0]!, 1, { abs: 1e-12 }, 'intercept');
    expectClose(f.coefficients[1]!, 2, { rel: 1e-12 }, 'slope');
    const g = fitLinearModel([one, x, Float64Array.from(x, (v) => 2 * v)], Float64Array.of(1, 3.1, 5, 7));
    expect(Number.isNaN(g.standardErrors[1]!)).toBe(true);
    expect(Number.isNaN(g.standardErrors[0]!)).toBe(false);
  });
});
