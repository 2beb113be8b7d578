import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { linearModelForms, lockedRotorHoldTime, motorFigures, simulate, simulateDetailed, stepResponse } from '../index.js';

// FACTS.md §5 worked example motor (invented parameters).
const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 };

/** e^{M} of a small dense matrix by scaling and squaring with a 30-term Taylor series (derived here; test-only). */
function expm(M: number[][]): number[][] {
  const norm = Math.max(...M.map((r) => r.reduce((s, v) => s + Math.abs(v), 0)));
  const sq = Math.max(0, Math.ceil(Math.log2(norm)) + 1);
  const A = M.map((r) => r.map((v) => v / 2 ** sq));
  const mul = (X: number[][], Y: number[][]): number[][] => X.map((r) => Y[0]!.map((_, j) => r.reduce((s, v, k) => s + v * Y[k]![j]!, 0)));
  let E: number[][] = A.map((r, i) => r.map((_, j): number => (i === j ? 1 : 0)));
  let term = E.map((r) => r.slice());
  for (let k = 1; k <= 30; k++) {
    term = mul(term, A).map((r) => r.map((v) => v / k));
    E = E.map((r, i) => r.map((v, j) => v + term[i]![j]!));
  }
  for (let s = 0; s < sq; s++) E = mul(E, E);
  return E;
}

describe('linearModelForms exports the model the simulator runs', () => {
  const dt = 2e-4;
  const f = linearModelForms(motor, dt);
  it('continuous A, B give the discrete Φ, Γ through e^{[[A, B], [0, 0]]·dt} (to 1e-12)', () => {
    const { A, B } = f.stateSpace;
    const aug = [
      [A[0]![0]! * dt, A[0]![1]! * dt, B[0]![0]! * dt, B[0]![1]! * dt],
      [A[1]![0]! * dt, A[1]![1]! * dt, B[1]![0]! * dt, B[1]![1]! * dt],
      [0, 0, 0, 0], [0, 0, 0, 0],
    ];
    const E = expm(aug);
    const d = f.discrete!;
    for (let i = 0; i < 2; i++) {
      for (let j = 0; j < 2; j++) {
        expectClose(d.Phi[i]![j]!, E[i]![j]!, { rel: 1e-12, abs: 1e-15 }, `Φ${i}${j}`);
        expectClose(d.Gamma[i]![j]!, E[i]![2 + j]!, { rel: 1e-12, abs: 1e-18 }, `Γ${i}${j}`);
      }
    }
  });
  it('the discrete recursion reproduces simulate() on a varying input with a load torque (to 1e-12)', () => {
    const n = 400;
    const v = Float64Array.from({ length: n }, (_, k) => 12 * Math.sin(k / 17) + (k % 50 < 25 ? 3 : -2));
    const tau = 2e-3;
    const ref = simulate(motor, v, dt, { loadTorque: tau });
    const { Phi: P, Gamma: G } = f.discrete!;
    let i = 0, w = 0;
    for (let k = 0; k < n; k++) {
      expectClose(i, ref.current[k]!, { rel: 1e-12, abs: 1e-12 }, `i[${k}]`);
      expectClose(w, ref.speed[k]!, { rel: 1e-12, abs: 1e-10 }, `ω[${k}]`);
      const i2 = P[0]![0]! * i + P[0]![1]! * w + G[0]![0]! * v[k]! + G[0]![1]! * tau;
      const w2 = P[1]![0]! * i + P[1]![1]! * w + G[1]![0]! * v[k]! + G[1]![1]! * tau;
      i = i2; w = w2;
    }
  });
  it('the transfer functions give the closed-form step response by partial fractions (to 1e-12)', () => {
    const [, a1, a0] = f.transfer.voltageToSpeed.denominator as [number, number, number];
    const disc = Math.sqrt(a1 * a1 - 4 * a0);
    const p1 = (-a1 + disc) / 2, p2 = (-a1 - disc) / 2; // real and distinct for this motor (FACTS.md §5)
    const [kw] = f.transfer.voltageToSpeed.numerator as [number];
    const [c1, c0] = f.transfer.voltageToCurrent.numerator as [number, number];
    // Step of 12 V: y(t) = 12·Σ residues of N(s)·e^{st}/(s·(s − p1)(s − p2)).
    const step = (N: (s: number) => number, t: number): number =>
      12 * (N(0) / (p1 * p2) + (N(p1) * Math.exp(p1 * t)) / (p1 * (p1 - p2)) + (N(p2) * Math.exp(p2 * t)) / (p2 * (p2 - p1)));
    for (const t of [1e-4, 5e-4, 2e-3, 1e-2, 5e-2]) {
      const r = stepResponse(motor, 12, t);
      expectClose(step(() => kw, t), r.speed, { rel: 1e-12 }, `ω(${t})`);
      expectClose(step((s) => c1 * s + c0, t), r.current, { rel: 1e-11, abs: 1e-12 }, `i(${t})`);
    }
    const fig = motorFigures(motor, 12);
    expectClose((12 * kw) / a0, fig.steadySpeed, { rel: 1e-12 }, 'DC gain V → ω');
  });
  it('names a bad sample time', () => {
    expect(() => linearModelForms(motor, 0)).toThrow(/dt must be a finite number > 0/);
    expect(() => linearModelForms({ ...motor, L: -1 })).toThrow(/params\.L/);
  });
});

describe('lockedRotorHoldTime', () => {
  it('adiabatic with constant current matches the closed form and the detailed model\'s heating', () => {
    // Derived here: adiabatic, R(θ) = R0·(1 + α'θ), Cth·dθ/dt = I²R0(1 + α'θ) ⇒ t = ln(1 + α'ΔT)/(I²R0α'/Cth).
    const R = 1.9, I = 3.16, Cth = 1, rise = 20, alpha = 1 / (234.5 + 20);
    const h = lockedRotorHoldTime({ R, current: I, riseK: rise });
    expect(h.thermalData).toBe('default');
    expect(h.note).toMatch(/conservative default/);
    expectClose(h.holdSeconds, (Cth * Math.log1p(alpha * rise)) / (I * I * R * alpha), { rel: 1e-12 }, 'hold');
  });
  it('with cooling agrees with the detailed model\'s thermal integration at a held current', () => {
    // The detailed model at its current limit holds I = Imax; its winding temperature after the
    // computed hold must be the start plus ΔT (Rth, Cth invented).
    const Rth = 8, Cth = 3, rise = 15, I = 2.5;
    const h = lockedRotorHoldTime({ R: motor.R, current: I, riseK: rise, Rth, Cth });
    expect(h.thermalData).toBe('given');
    const n = 2001;
    const dt = h.holdSeconds / (n - 1);
    const tr = simulateDetailed({ ...motor, Rth, Cth, Imax: I, Ts: Number.MAX_VALUE, Tc: 0 }, new Float64Array(n).fill(100), dt, { relativeTolerance: 1e-11, initialCurrent: I });
    expectClose(tr.temperature[n - 1]! - tr.temperature[0]!, rise, { rel: 1e-6 }, 'rise after the hold');
  });
  it('is unbounded when cooling holds the winding below the rise, and names bad options', () => {
    expect(lockedRotorHoldTime({ R: 1, current: 1, riseK: 20, Rth: 1, Cth: 1 }).holdSeconds).toBe(Infinity);
    expect(() => lockedRotorHoldTime({ R: 0, current: 1 })).toThrow(/options\.R/);
    expect(() => lockedRotorHoldTime({ R: 1, current: 1, Cth: -1 })).toThrow(/options\.Cth/);
  });
});
