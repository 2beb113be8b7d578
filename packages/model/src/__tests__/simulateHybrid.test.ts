import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { coastDownResponse, simulate, simulateDetailed, simulateHybrid } from '../index.js';
import type { DetailedParams } from '../index.js';

const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 }; // FACTS.md §5 motor
const n = 2000;
const h = 1e-4;
const time = Float64Array.from({ length: n }, (_, k) => k * h);
// 12 V from sample 10, −6 V from sample 1000: a start, a reversal and a stop for the friction terms.
const drive = Float64Array.from({ length: n }, (_, k) => (k < 10 ? 0 : k < 1000 ? 12 : -6));

function maxDev(a: Float64Array, b: Float64Array): number {
  let e = 0;
  for (let k = 0; k < a.length; k++) e = Math.max(e, Math.abs(a[k]! - b[k]!));
  return e;
}

describe('simulateHybrid reproduces the lumped linear model exactly', () => {
  it('agrees with the zero-order-hold simulation to 1e-11 A and 1e-9 rad/s', () => {
    const lin = simulate(motor, drive, h);
    const hy = simulateHybrid(motor, { time, input: drive });
    // tolerance: both are exact solutions of the same equations; the gap is rounding (derived here:
    // ~1e-13 seen, 100× margin)
    expect(maxDev(lin.current, hy.current)).toBeLessThan(1e-11);
    expect(maxDev(lin.speed, hy.speed)).toBeLessThan(1e-9);
  });

  it('gives the position as the integral of the speed (trapezoid check at 0.1 ms samples)', () => {
    const hy = simulateHybrid(motor, { time, input: drive });
    let th = 0, worst = 0;
    for (let k = 1; k < n; k++) {
      th += 0.5 * (hy.speed[k]! + hy.speed[k - 1]!) * h;
      worst = Math.max(worst, Math.abs(th - hy.position[k]!));
    }
    // tolerance: trapezoid error h²/12·|Δω'| ≤ 1e-8·(2·3.5e4 rad/s²)/12 ≈ 6e-5 rad (derived here)
    expect(worst).toBeLessThan(6e-5);
  });

  it('coasts down with the circuit open as the closed form says', () => {
    const steady = simulateHybrid(motor, { time, input: new Float64Array(n).fill(12), initial: 'steady', openFrom: 0.05 });
    const w0 = steady.speed[0]!;
    // ω_ss = Kt·V/(R·b + Kt·Ke) (FACTS.md §4)
    expectClose(w0, (0.05 * 12) / (2 * 1e-5 + 0.05 * 0.05), { rel: 1e-12 }, 'steady speed before the cut');
    const k = 1500;
    const cf = coastDownResponse(motor.J, motor.b, 0, w0, time[k]! - 0.05).speed;
    expectClose(steady.speed[k]!, cf, { rel: 1e-10 }, 'coast-down speed 0.1 s after the cut');
    expect(steady.current[k]).toBe(0);
    expectClose(steady.terminalVoltage[k]!, 0.05 * steady.speed[k]!, { rel: 1e-12 }, 'open-circuit voltage Ke·ω');
  });
});

describe('simulateHybrid agrees with the adaptive reference simulator on every effect', () => {
  const cases: [string, Partial<DetailedParams>, number, number][] = [
    // [name, effect, tolerance on i [A], tolerance on ω [rad/s]] — tolerances: the reference is
    // integrated at rtol 1e-11; the hybrid kernel is exact between events, events located to 1e-13
    // of a sample, drag linearised per sample (second order: ~h²·ω''·2c|ω|/J), heating first order
    // in h (derived here from the observed 1e-9…3e-4 A, with margin).
    ['Coulomb friction', { Tc: 2e-3 }, 1e-7, 1e-6],
    ['stiction above Coulomb', { Tc: 2e-3, Ts: 4e-3 }, 1e-7, 1e-6],
    ['speed-squared drag', { cd: 2e-8 }, 1e-6, 1e-4],
    ['drive voltage limit', { Vmax: 8 }, 1e-8, 1e-8],
    ['drive current limit', { Imax: 2 }, 1e-6, 1e-5],
    ['supply resistance', { Rs: 0.5 }, 1e-8, 1e-8],
    ['winding heating (fast: Rth·Cth = 0.1 s)', { Rth: 2, Cth: 0.05, ambientTemperature: 25, initialTemperature: 25 }, 1e-3, 1e-2],
    ['all friction and limits together', { Tc: 2e-3, Ts: 3e-3, cd: 1e-8, Imax: 3, Vmax: 10 }, 1e-6, 1e-4],
  ];
  it.each(cases)('%s', (_name, extra, tolI, tolW) => {
    const p = { ...motor, ...extra };
    const ref = simulateDetailed(p, drive, h, { relativeTolerance: 1e-11 });
    const hy = simulateHybrid(p, { time, input: drive });
    expect(maxDev(ref.current, hy.current)).toBeLessThan(tolI);
    expect(maxDev(ref.speed, hy.speed)).toBeLessThan(tolW);
    expect(maxDev(ref.position, hy.position)).toBeLessThan(tolW * 0.1);
  });

  it('keeps a stuck rotor at rest below the breakaway torque and moves it above', () => {
    const weak = simulateHybrid({ ...motor, Tc: 0.05 * 12 / 2 * 1.01 }, { time, input: drive });
    // stall torque Kt·V/R = 0.05·12/2 = 0.3 N·m < Ts = 0.303 N·m: never moves (derived here)
    expect(Math.max(...weak.speed.map(Math.abs))).toBe(0);
    const strong = simulateHybrid({ ...motor, Tc: 0.05 * 12 / 2 * 0.99 }, { time, input: drive });
    expect(Math.max(...strong.speed)).toBeGreaterThan(0);
  });

  it('follows an input on its own grid between jittered samples', () => {
    // Samples 30 µs late on odd indices; the input switches on the nominal 0.1 ms grid.
    const jittered = Float64Array.from(time, (t, k) => t + (k % 2 ? 3e-5 : 0));
    const a = simulateHybrid(motor, { time: jittered, input: drive, inputTime: time });
    const fine = simulateHybrid(motor, { time, input: drive });
    // At the even (on-grid) samples both see the same input history.
    let e = 0;
    for (let k = 0; k < n; k += 2) e = Math.max(e, Math.abs(a.current[k]! - fine.current[k]!));
    expect(e).toBeLessThan(1e-11);
  });
});
