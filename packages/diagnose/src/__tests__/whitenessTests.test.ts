import { createRandom } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import { residualStats } from '../residualStats.js';

const SEEDS = 400;
const N = 1000;

function series(seed: number, phi: number): Float64Array {
  // AR(1) x_t = φ·x_{t−1} + e_t with seeded Gaussian e (φ = 0: white noise); invented data.
  const rng = createRandom(seed);
  const x = new Float64Array(N);
  let prev = 0;
  for (let t = 0; t < N; t++) {
    prev = phi * prev + rng.normal();
    x[t] = prev;
  }
  return x;
}

describe('Ljung–Box and runs tests hold their nominal 5 % false-alarm rate on white noise and reject AR(1)', () => {
  const zero = new Float64Array(N);
  const white = Array.from({ length: SEEDS }, (_, s) => residualStats(zero, series(1000 + s, 0), 20));
  it(`white noise, ${SEEDS} seeds, n = ${N}, 20 lags: both rejection rates at 5 % lie in [2 %, 8 %]`, () => {
    // Tolerance: binomial SD √(0.05·0.95/400) = 1.09 %; ±3 % is ≈ ±2.75 SD (derived here).
    const lb = white.filter((s) => s.ljungBox.pValue < 0.05).length / SEEDS;
    const runs = white.filter((s) => s.runs.pValue < 0.05).length / SEEDS;
    expect(lb, `Ljung–Box rate ${lb}`).toBeGreaterThanOrEqual(0.02);
    expect(lb, `Ljung–Box rate ${lb}`).toBeLessThanOrEqual(0.08);
    expect(runs, `runs rate ${runs}`).toBeGreaterThanOrEqual(0.02);
    expect(runs, `runs rate ${runs}`).toBeLessThanOrEqual(0.08);
  });
  it('white-noise p-values are roughly uniform: each quartile holds 25 % ± 6 %', () => {
    // ±6 % ≈ ±2.8 binomial SD of √(0.25·0.75/400) = 2.17 % (derived here).
    for (const pick of [(s: (typeof white)[0]) => s.ljungBox.pValue, (s: (typeof white)[0]) => s.runs.pValue]) {
      const p = white.map(pick);
      for (let q = 0; q < 4; q++) {
        const frac = p.filter((v) => v >= q / 4 && v < (q + 1) / 4).length / SEEDS;
        expect(Math.abs(frac - 0.25), `quartile ${q}: ${frac}`).toBeLessThanOrEqual(0.06);
      }
    }
  });
  it('AR(1) with φ = 0.5 is rejected by both tests in at least 99 % of 100 seeds', () => {
    // Expected power ≈ 1: r1 ≈ 0.5 is 16 SDs (1/√1000) from 0, and the runs deficit is z ≈ −11 (derived here from E[R] under AR(1)).
    let lb = 0, runs = 0;
    for (let s = 0; s < 100; s++) {
      const st = residualStats(zero, series(5000 + s, 0.5), 20);
      if (st.ljungBox.pValue < 0.05) lb++;
      if (st.runs.pValue < 0.05 && st.runs.z < 0) runs++;
    }
    expect(lb).toBeGreaterThanOrEqual(99);
    expect(runs).toBeGreaterThanOrEqual(99);
  });
});
