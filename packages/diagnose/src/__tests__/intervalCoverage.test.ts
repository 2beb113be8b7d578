import { fitCurve } from '@motorprint/estimate';
import { createRandom, lockedRotorResponse } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import { confidenceIntervals } from '../confidenceIntervals.js';

// Invented locked-rotor test: the FACTS.md §5 motor (R 2 Ω, L 1 mH, 12 V step), current noise
// 0.2 % of the stall current (common practice, no source), sampled 10× faster than τe for 12·τe.
const R = 2, L = 1e-3, V = 12, SIGMA = 0.012;
const DT = 5e-5, N = 120;

function fitOnce(seed: number): { R: [number, number] | null; L: [number, number] | null } {
  const rng = createRandom(seed);
  const t = Float64Array.from({ length: N }, (_, k) => k * DT);
  const y = Float64Array.from(t, (tk) => lockedRotorResponse(R, L, V, tk).current + SIGMA * rng.normal());
  const fit = fitCurve({
    x: t, y, start: [1.5, 1.5e-3],
    model: (th, [x], out) => { for (let k = 0; k < out.length; k++) out[k] = lockedRotorResponse(th[0]!, th[1]!, V, x![k]!).current; },
    jacobian: (th, [x], J) => {
      const n = x!.length;
      for (let k = 0; k < n; k++) {
        const r = lockedRotorResponse(th[0]!, th[1]!, V, x![k]!);
        J[k] = r.dR;
        J[n + k] = r.dL;
      }
    },
  });
  const rep = confidenceIntervals(['R', 'L'], fit.theta, fit.covariance);
  return { R: rep.parameters[0]!.interval, L: rep.parameters[1]!.interval };
}

describe('95 % intervals from confidenceIntervals cover the true values 93–97 % of the time', () => {
  it('locked-rotor R, L fit with fitCurve, 1000 noise seeds', () => {
    // 1000 seeds: binomial SD √(0.95·0.05/1000) = 0.69 %, so 93–97 % is ±2.9 SD (derived here).
    let cR = 0, cL = 0;
    const seeds = 1000;
    for (let s = 0; s < seeds; s++) {
      const iv = fitOnce(s + 1);
      if (iv.R && iv.R[0] <= R && R <= iv.R[1]) cR++;
      if (iv.L && iv.L[0] <= L && L <= iv.L[1]) cL++;
    }
    expect(cR / seeds, `R coverage ${cR / seeds}`).toBeGreaterThanOrEqual(0.93);
    expect(cR / seeds, `R coverage ${cR / seeds}`).toBeLessThanOrEqual(0.97);
    expect(cL / seeds, `L coverage ${cL / seeds}`).toBeGreaterThanOrEqual(0.93);
    expect(cL / seeds, `L coverage ${cL / seeds}`).toBeLessThanOrEqual(0.97);
  });
});
