import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { expectClose } from '@motorprint/testkit';
import { simulateInto, zohInto } from '../index.js';
import type { LinearOptions, LinearTrace, MotorParams } from '../index.js';

// The uniform-interval path of simulateInto advances the state two samples at a time
// (x_{k+2} = Φ²x_k + ΦΓ·u_k + Γ·u_{k+1}), two such blocks per loop pass after (n − 1) mod 4 single
// steps, with a separate loop when the load torque is exactly 0.
// These tests compare both loops with the plain one-step recursion x_{k+1} = Φx_k + Γv·v_k + Γτ·τ
// written out here independently, sample by sample.

/** Reference: one step at a time, matrices per interval from zohInto, left-to-right sums. */
function singleStep(p: MotorParams, v: Float64Array, time: number | Float64Array, o: LinearOptions): LinearTrace {
  const n = v.length;
  const out = { current: new Float64Array(n), speed: new Float64Array(n) };
  const m = new Float64Array(8);
  const tau = o.loadTorque ?? 0;
  let i = o.initialCurrent ?? 0, w = o.initialSpeed ?? 0;
  out.current[0] = i;
  out.speed[0] = w;
  for (let k = 1; k < n; k++) {
    zohInto(m, p, typeof time === 'number' ? time : time[k]! - time[k - 1]!);
    const iNext = m[0]! * i + m[1]! * w + m[4]! * v[k - 1]! + m[6]! * tau;
    w = m[2]! * i + m[3]! * w + m[5]! * v[k - 1]! + m[7]! * tau;
    i = iNext;
    out.current[k] = i;
    out.speed[k] = w;
  }
  return out;
}

/** Largest |a − b| over a channel divided by the channel's largest |b| (the signal scale). */
function scaledDifference(a: Float64Array, b: Float64Array): number {
  let d = 0, s = 0;
  for (let k = 0; k < b.length; k++) {
    d = Math.max(d, Math.abs(a[k]! - b[k]!));
    s = Math.max(s, Math.abs(b[k]!));
  }
  return s > 0 ? d / s : d;
}

function run(p: MotorParams, v: Float64Array, time: number | Float64Array, o: LinearOptions): LinearTrace {
  const n = v.length;
  return simulateInto({ current: new Float64Array(n), speed: new Float64Array(n) }, p, v, time, o);
}

// FACTS.md §5 worked example motor (invented parameters).
const facts: MotorParams = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 };

const logUniform = (lo: number, hi: number) =>
  fc.double({ min: Math.log(lo), max: Math.log(hi), noNaN: true }).map((x) => Math.exp(x));
// Random motors spanning R 0.1–20 Ω, L 20 µH–10 mH, J 1e-7–1e-3 kg·m², Kt 0.005–0.5, Ke/Kt 0.8–1.25,
// b 1e-9–1e-3 (the ranges of agreement.test.ts; invented).
const motorArb = fc.record({
  R: logUniform(0.1, 20), L: logUniform(20e-6, 10e-3), Kt: logUniform(0.005, 0.5),
  ratio: fc.double({ min: 0.8, max: 1.25, noNaN: true }), J: logUniform(1e-7, 1e-3), b: logUniform(1e-9, 1e-3),
}).map(({ ratio, ...m }) => ({ ...m, Ke: m.Kt * ratio }) as MotorParams);

/** Electrical time constant L/R [s]: intervals are drawn relative to it. */
const tauE = (p: MotorParams) => p.L / p.R;

// Agreement bound, relative to the signal scale: 1e-12 (the brief's target; common practice for
// "same map, different rounding order" comparisons, no source). Measured with the 2-block kernel:
// over 10⁶ samples 1.9e-14 (load) / 1.3e-14 (no load) for FACTS.md §5 and 5.0e-13 (load) / 1.4e-13
// (no load) for the slow motor — where merely reordering the one-step sums already differs by
// 3.8e-13 (ε amplified by the lightly damped mode, measured with the earlier 4-block kernel).
const TOL = 1e-12;

describe('simulateInto (uniform interval, blocked by two) agrees with the one-step recursion', () => {
  it('on the FACTS.md §5 12 V step for every record length 1…40 (all step counts mod 4) and 1001, with and without load', () => {
    for (const n of [...Array.from({ length: 40 }, (_, j) => j + 1), 1001]) {
      const v = new Float64Array(n).fill(12);
      // {} and loadTorque 0 take the loop without load terms; 2e-3 N·m (invented) the loop with them.
      for (const o of [{}, { loadTorque: 0, initialSpeed: 50 }, { loadTorque: 2e-3, initialCurrent: -1 }]) {
        const a = run(facts, v, 1e-4, o);
        const r = singleStep(facts, v, 1e-4, o);
        expect(scaledDifference(a.current, r.current), `i, n = ${n}, ${JSON.stringify(o)}`).toBeLessThanOrEqual(TOL);
        expect(scaledDifference(a.speed, r.speed), `ω, n = ${n}, ${JSON.stringify(o)}`).toBeLessThanOrEqual(TOL);
      }
    }
    // FACTS.md §5 step-response table, t = 1e-3 s (sample 10) and t = 1e-2 s (sample 100), 10 digits.
    const a = run(facts, new Float64Array(1001).fill(12), 1e-4, {});
    expectClose(a.current[10]!, 5.087117098, { rel: 1e-9 }, 'i(1 ms)');
    expectClose(a.speed[100]!, 109.6043038, { rel: 1e-9 }, 'ω(10 ms)');
  });

  it('on random motors, voltages, initial states, load torques and lengths (seeded property)', () => {
    let worst = 0;
    fc.assert(
      fc.property(
        motorArb, logUniform(0.01, 10), fc.integer({ min: 1, max: 300 }), fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: -200, max: 200, noNaN: true }),
        fc.oneof(fc.constant(0), fc.double({ min: -0.05, max: 0.05, noNaN: true })), // 0 → loop without load
        (p, hOverTauE, n, seed, i0, w0, loadTorque) => {
          const h = hOverTauE * tauE(p);
          const v = new Float64Array(n);
          let s = seed >>> 0;
          for (let k = 0; k < n; k++) { // invented ±24 V random-level signal (LCG, Numerical Recipes constants)
            s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
            v[k] = (s / 2 ** 32 - 0.5) * 48;
          }
          const o = { initialCurrent: i0, initialSpeed: w0, loadTorque };
          const a = run(p, v, h, o);
          const r = singleStep(p, v, h, o);
          const d = Math.max(scaledDifference(a.current, r.current), scaledDifference(a.speed, r.speed));
          worst = Math.max(worst, d);
          return d <= TOL;
        },
      ),
      { seed: 20241201, numRuns: 300 },
    );
    expect(worst).toBeLessThanOrEqual(TOL);
  });

  it('keeps the per-step path for non-uniform sample times (jittered, some equal runs) on random motors', () => {
    fc.assert(
      fc.property(motorArb, fc.integer({ min: 2, max: 200 }), fc.integer({ min: 0, max: 2 ** 31 - 1 }), (p, n, seed) => {
        const h = tauE(p) / 3;
        const t = new Float64Array(n);
        const v = new Float64Array(n);
        let s = seed >>> 0;
        for (let k = 1; k < n; k++) { // invented: every other interval jittered by up to ±40 %
          s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
          t[k] = t[k - 1]! + (k % 2 === 0 ? h : h * (0.6 + 0.8 * (s / 2 ** 32)));
          v[k - 1] = k % 7 < 3 ? 12 : -5;
        }
        const o = { initialCurrent: 0.5, initialSpeed: 10, loadTorque: 2e-3 };
        const a = run(p, v, t, o);
        const r = singleStep(p, v, t, o);
        return scaledDifference(a.current, r.current) <= TOL && scaledDifference(a.speed, r.speed) <= TOL;
      }),
      { seed: 31, numRuns: 150 },
    );
  });

  it('does not amplify rounding over 10⁶ samples (FACTS.md §5 motor and a lightly damped slow motor)', () => {
    const n = 1_000_000;
    const v = new Float64Array(n);
    for (let k = 0; k < n; k++) v[k] = 6 + 6 * Math.sin(k / 500) + (k % 3000 < 1500 ? 2 : -2); // invented drive
    // Invented slow motor: mechanical time constant J·R/(R·b + Kt·Ke) ≈ 0.4 s = 4000 samples, complex poles.
    const slow: MotorParams = { R: 0.5, L: 2e-3, Kt: 0.02, Ke: 0.02, J: 5e-4, b: 1e-7 };
    for (const [p, label] of [[facts, 'FACTS.md §5'], [slow, 'slow']] as const) {
      for (const loadTorque of [1e-3, 0]) { // invented load; 0 runs the loop without load terms
        const o = { initialSpeed: 3, loadTorque };
        const a = run(p, v, 1e-4, o);
        const r = singleStep(p, v, 1e-4, o);
        expect(scaledDifference(a.current, r.current), `${label} i, τ = ${loadTorque}`).toBeLessThanOrEqual(TOL);
        expect(scaledDifference(a.speed, r.speed), `${label} ω, τ = ${loadTorque}`).toBeLessThanOrEqual(TOL);
      }
    }
  });

  it('gives the same trace from the loops with and without load terms when the load is negligible', () => {
    // A load of 1e-300 N·m takes the loop with load terms but changes no result digit (its terms are
    // of order 1e-299, far below ε of the signal), so the two loops must agree to TOL with each other.
    for (const n of [2, 3, 4, 5, 999, 1000]) {
      const v = new Float64Array(n);
      for (let k = 0; k < n; k++) v[k] = k % 5 < 2 ? 24 : -3; // invented drive
      for (const p of [facts, { R: 0.5, L: 2e-3, Kt: 0.02, Ke: 0.02, J: 5e-4, b: 1e-7 }]) {
        const a = run(p, v, 1e-4, { initialCurrent: 0.3, initialSpeed: -20 });
        const b = run(p, v, 1e-4, { initialCurrent: 0.3, initialSpeed: -20, loadTorque: 1e-300 });
        expect(scaledDifference(a.current, b.current), `i, n = ${n}`).toBeLessThanOrEqual(TOL);
        expect(scaledDifference(a.speed, b.speed), `ω, n = ${n}`).toBeLessThanOrEqual(TOL);
      }
    }
  });

  it('propagates NaN from a bad sample and lands on the steady state for a huge interval', () => {
    const v = new Float64Array(9).fill(12);
    v[5] = NaN;
    const a = run(facts, v, 1e-4, {});
    expect(Number.isNaN(a.speed[5]!)).toBe(false);
    expect(Number.isNaN(a.speed[6]!)).toBe(true); // v[5] acts on [t5, t6)
    expect(Number.isNaN(a.current[8]!)).toBe(true);
    const l = run(facts, v, 1e-4, { loadTorque: 1e-3 }); // same through the loop with load terms
    expect(Number.isNaN(l.speed[5]!)).toBe(false);
    expect(Number.isNaN(l.speed[6]!)).toBe(true);
    expect(Number.isNaN(l.current[8]!)).toBe(true);
    const b = run(facts, new Float64Array(9).fill(12), 1e3, {});
    // FACTS.md §5: ω_ss = 238.09523809523807 rad/s, i_ss = 0.047619047619047 A (Tc = 0).
    expectClose(b.speed[8]!, 238.09523809523807, { rel: 1e-12 }, 'ω_ss');
    expectClose(b.current[8]!, 0.047619047619047, { rel: 1e-12 }, 'i_ss');
  });
});
