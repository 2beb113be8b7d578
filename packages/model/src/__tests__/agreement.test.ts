import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { expectClose } from '@motorprint/testkit';
import {
  coastDownResponse, createSensitivityState, lockedRotorResponse, simulate, simulateChunkInto, simulateDetailed,
  simulateWithSensitivities, stepResponse, zohInto, zohSensitivitiesInto,
} from '../index.js';
import type { MotorParams } from '../index.js';

const logUniform = (lo: number, hi: number) =>
  fc.double({ min: Math.log(lo), max: Math.log(hi), noNaN: true }).map((x) => Math.exp(x));
// Random motors spanning R 0.1–20 Ω, L 20 µH–10 mH, J 1e-7–1e-3 kg·m², K 0.005–0.5, b 0–1e-3;
// both real and complex poles occur (checked below).
const motorArb = fc.record({
  R: logUniform(0.1, 20), L: logUniform(20e-6, 10e-3), Kt: logUniform(0.005, 0.5),
  ratio: fc.double({ min: 0.8, max: 1.25, noNaN: true }), J: logUniform(1e-7, 1e-3), b: logUniform(1e-9, 1e-3),
}).map(({ ratio, ...m }) => ({ ...m, Ke: m.Kt * ratio }) as MotorParams);

const span = (p: MotorParams) => {
  const tauE = p.L / p.R;
  const tauM = (p.J * p.R) / (p.R * p.b + p.Kt * p.Ke);
  return Math.max(tauE, tauM);
};

describe('closed form, exact ZOH simulation and the adaptive integrator agree on random motors', () => {
  it('at 40 sample times spanning ~3 time constants, from a running state (tolerance rel 1e-7 of the signal scale)', () => {
    let complex = 0, real = 0;
    fc.assert(
      fc.property(motorArb, fc.double({ min: -2, max: 2, noNaN: true }), fc.double({ min: -100, max: 100, noNaN: true }), (p, i0, w0) => {
        const dt = (3 * span(p)) / 40;
        const n = 41;
        const v = new Float64Array(n).fill(12);
        const opts = { initialCurrent: i0, initialSpeed: w0 };
        const z = simulate(p, v, dt, opts);
        const d = simulateDetailed(p, v, dt, { ...opts, relativeTolerance: 1e-11 });
        const iScale = 12 / p.R + Math.abs(i0), wScale = 12 / p.Ke + Math.abs(w0);
        for (let k = 0; k < n; k += 5) {
          const c = stepResponse(p, 12, k * dt, opts);
          if (k === 0) (c.kind === 'complex' ? complex++ : real++);
          expectClose(z.current[k]!, c.current, { abs: 1e-9 * iScale }, `ZOH i[${k}]`);
          expectClose(z.speed[k]!, c.speed, { abs: 1e-9 * wScale }, `ZOH ω[${k}]`);
          expectClose(d.current[k]!, c.current, { abs: 1e-7 * iScale }, `adaptive i[${k}]`);
          expectClose(d.speed[k]!, c.speed, { abs: 1e-7 * wScale }, `adaptive ω[${k}]`);
        }
      }),
      { seed: 20240611, numRuns: 150 },
    );
    expect(complex).toBeGreaterThan(5); // the random set really covers both pole kinds
    expect(real).toBeGreaterThan(5);
  });

  it('the series/squaring matrices of zohSensitivitiesInto equal the closed-form zohInto (rel 1e-11) over h from 1e-9 to 10 s', () => {
    fc.assert(
      fc.property(motorArb, logUniform(1e-9, 10), (p, h) => {
        const a = zohInto(new Float64Array(8), p, h);
        const b = zohSensitivitiesInto(new Float64Array(56), p, h, new Float64Array(128));
        const scale = [Math.abs(a[0]!) + Math.abs(a[1]!), Math.abs(a[0]!) + Math.abs(a[1]!), Math.abs(a[2]!) + Math.abs(a[3]!), Math.abs(a[2]!) + Math.abs(a[3]!)];
        // squaring accumulates a few ulp per doubling: allow rel 1e-9 of the row scale plus 1e-13 of ‖Φ(0)‖ = 1
        for (let e = 0; e < 4; e++) expectClose(b[e]!, a[e]!, { abs: 1e-9 * scale[e]! + 1e-13 }, `Φ[${e}]`);
        for (let e = 4; e < 8; e++) expectClose(b[e]!, a[e]!, { rel: 1e-9, abs: 1e-11 * (Math.abs(a[4]!) + Math.abs(a[6]!) + Math.abs(a[5]!) + Math.abs(a[7]!)) }, `Γ[${e}]`);
      }),
      { seed: 7, numRuns: 300 },
    );
  });
});

describe('simulateChunkInto sensitivities match central finite differences', () => {
  const names = ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const;
  it('for all 8 directions on random motors (step 1e-6 relative; tolerance 1e-6 relative + 1e-5 of the signal scale)', () => {
    fc.assert(
      fc.property(motorArb, (p) => {
        const dt = (2 * span(p)) / 50;
        const n = 51;
        const v = new Float64Array(n);
        for (let k = 0; k < n; k++) v[k] = k < 25 ? 12 : 4; // step down halfway: excites both states
        const opts = { initialCurrent: 0.3, initialSpeed: 5, loadTorque: 1e-3 };
        const s = simulateWithSensitivities(p, v, dt, opts);
        const iScale = 12 / p.R, wScale = 12 / p.Ke;
        const dirs: [string, (d: number) => [MotorParams, typeof opts], number][] = [
          ...names.map((nm) => [nm, (d: number) => [{ ...p, [nm]: p[nm] + d }, opts], p[nm] * 1e-6] as [string, (d: number) => [MotorParams, typeof opts], number]),
          ['i0', (d: number) => [p, { ...opts, initialCurrent: opts.initialCurrent + d }], 1e-6],
          ['omega0', (d: number) => [p, { ...opts, initialSpeed: opts.initialSpeed + d }], 1e-6],
        ];
        dirs.forEach(([nm, make, d], j) => {
          const [pp, op] = make(d);
          const [pm, om] = make(-d);
          const up = simulate(pp, v, dt, op), dn = simulate(pm, v, dt, om);
          const th = j < 6 ? p[names[j]!] : 1;
          for (let k = 0; k < n; k += 10) {
            const fdI = (up.current[k]! - dn.current[k]!) / (2 * d);
            const fdW = (up.speed[k]! - dn.speed[k]!) / (2 * d);
            // compare θ·∂x/∂θ (log-parameter scale) against 1e-5 of the signal scale
            expectClose(th * s.currentSensitivity[8 * k + j]!, th * fdI, { rel: 1e-6, abs: 1e-5 * iScale }, `∂i/∂${nm}[${k}]`);
            expectClose(th * s.speedSensitivity[8 * k + j]!, th * fdW, { rel: 1e-6, abs: 1e-5 * wScale }, `∂ω/∂${nm}[${k}]`);
          }
        });
      }),
      { seed: 99, numRuns: 40 },
    );
  });

  it('gives the same numbers whether the record is processed in one chunk or in ragged chunks, with jittered times', () => {
    const p = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 }; // FACTS.md §5 motor
    const n = 1000;
    const t = new Float64Array(n), v = new Float64Array(n);
    for (let k = 0; k < n; k++) { t[k] = k * 1e-4 + (k % 7) * 1e-6; v[k] = 6 + 6 * Math.sin(k / 30); }
    const whole = simulateWithSensitivities(p, v, t);
    const st = createSensitivityState(p);
    const m = 97;
    const ch = { current: new Float64Array(m), speed: new Float64Array(m), currentSensitivity: new Float64Array(8 * m), speedSensitivity: new Float64Array(8 * m) };
    for (let k0 = 0; k0 < n; k0 += m) {
      const k1 = Math.min(n, k0 + m);
      simulateChunkInto(st, v, t, k0, k1, ch);
      for (let k = k0; k < k1; k++) {
        expect(ch.current[k - k0]).toBe(whole.current[k]);
        expect(ch.speedSensitivity[8 * (k - k0) + 4]).toBe(whole.speedSensitivity[8 * k + 4]);
      }
    }
    expect(st.nextIndex).toBe(n);
    // the plain kernel uses the closed-form matrices, the chunked one the series: equal to rounding
    const plain = simulate(p, v, t);
    for (let k = 0; k < n; k += 50) expectClose(plain.speed[k]!, whole.speed[k]!, { rel: 1e-12, abs: 1e-12 }, `ω[${k}]`);
  });

  it('writes NaN (never throws) when the chunk does not continue the state', () => {
    const p = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 };
    const st = createSensitivityState(p);
    const ch = { current: new Float64Array(4), speed: new Float64Array(4), currentSensitivity: new Float64Array(32), speedSensitivity: new Float64Array(32) };
    simulateChunkInto(st, new Float64Array(10), 1e-4, 3, 7, ch);
    expect(Number.isNaN(ch.current[0]!)).toBe(true);
    expect(st.nextIndex).toBe(0);
  });
});

describe('locked-rotor and coast-down closed forms', () => {
  it('lockedRotorResponse: i(τe) = (V/R)(1 − e⁻¹) and its sensitivities match central differences', () => {
    const r = lockedRotorResponse(2, 1e-3, 12, 5e-4, 0.5);
    // derived here: 6 + (0.5 − 6)·e^{−1}
    expectClose(r.current, 6 + (0.5 - 6) * Math.exp(-1), { rel: 1e-15 }, 'i(τe)');
    const fd = (f: (d: number) => number, d: number) => (f(d) - f(-d)) / (2 * d);
    expectClose(r.dR, fd((d) => lockedRotorResponse(2 + d, 1e-3, 12, 5e-4, 0.5).current, 1e-6), { rel: 1e-7 }, '∂i/∂R');
    expectClose(r.dL, fd((d) => lockedRotorResponse(2, 1e-3 + d, 12, 5e-4, 0.5).current, 1e-9), { rel: 1e-6 }, '∂i/∂L');
    expectClose(r.dInitialCurrent, fd((d) => lockedRotorResponse(2, 1e-3, 12, 5e-4, 0.5 + d).current, 1e-6), { rel: 1e-8 }, '∂i/∂i0');
  });
  it('coastDownResponse agrees with the adaptive integrator (open circuit) and its sensitivities with central differences', () => {
    const J = 2e-5, b = 1e-5, Tc = 2e-3, w0 = 200; // FACTS.md §5 J, b, Tc; w0 invented
    const stop = coastDownResponse(J, b, Tc, w0, 0).stopTime;
    // derived here: (J/b)·ln(1 + b·ω0/Tc) = 2·ln(2)
    expectClose(stop, 2 * Math.log(2), { rel: 1e-14 }, 'stop time');
    const n = 301, dt = stop / 200;
    const sim = simulateDetailed({ R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J, b, Tc }, new Float64Array(n), dt, { initialSpeed: w0, openCircuitFrom: 0 });
    for (let k = 0; k < n; k += 25) {
      expectClose(sim.speed[k]!, coastDownResponse(J, b, Tc, w0, k * dt).speed, { abs: 1e-6 * w0 }, `ω[${k}]`);
    }
    expect(sim.speed[n - 1]).toBe(0);
    expect(sim.stats.stickEvents).toBe(1);
    const fd = (f: (d: number) => number, d: number) => (f(d) - f(-d)) / (2 * d);
    for (const b2 of [1e-5, 0]) {
      const t = 0.5;
      const r = coastDownResponse(J, b2, Tc, w0, t);
      expectClose(r.dJ, fd((d) => coastDownResponse(J + d, b2, Tc, w0, t).speed, 1e-11), { rel: 1e-6 }, `∂ω/∂J b=${b2}`);
      expectClose(r.dTc, fd((d) => coastDownResponse(J, b2, Tc + d, w0, t).speed, 1e-9), { rel: 1e-6 }, `∂ω/∂Tc b=${b2}`);
      expectClose(r.dInitialSpeed, fd((d) => coastDownResponse(J, b2, Tc, w0 + d, t).speed, 1e-4), { rel: 1e-8 }, `∂ω/∂ω0 b=${b2}`);
      const db = b2 === 0 ? (coastDownResponse(J, 1e-10, Tc, w0, t).speed - r.speed) / 1e-10 : fd((d) => coastDownResponse(J, b2 + d, Tc, w0, t).speed, 1e-11);
      expectClose(r.db, db, { rel: 1e-4 }, `∂ω/∂b b=${b2}`);
    }
  });
});
