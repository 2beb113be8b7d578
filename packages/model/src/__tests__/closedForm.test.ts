import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { copperResistance, motorFigures, simulate, stepResponse } from '../index.js';

// FACTS.md §5 worked example motor (invented parameters, computed in FACTS.md).
const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 };
// FACTS.md §5 step-response table: t [s], ω [rad/s], i [A] (closed form and Radau rtol 1e-12 agree).
const table: [number, number, number][] = [
  [1e-4, 0.140463834, 1.087389063],
  [5e-4, 2.752180009, 3.773322626],
  [1e-3, 8.437924222, 5.087117098],
  [2e-3, 21.96464641, 5.503460895],
  [5e-3, 60.16883001, 4.645056381],
  [1e-2, 109.6043038, 3.367974807],
  [1.6e-2, 151.1532724, 2.294300967],
  [5e-2, 228.5909642, 0.2932205829],
  [0.1, 237.7286089, 0.0570931734],
];
// The table prints 10 significant digits: allow 1e-9 relative plus half a unit of the last digit.
const tol = (x: number) => ({ rel: 1e-9, abs: 0.5 * 10 ** (Math.floor(Math.log10(Math.abs(x))) - 9) });

describe('stepResponse reproduces the FACTS.md §5 step-response table', () => {
  it.each(table)('at t = %s s', (t, w, i) => {
    const r = stepResponse(motor, 12, t);
    expect(r.kind).toBe('real-distinct');
    expectClose(r.speed, w, tol(w), `ω(${t})`);
    expectClose(r.current, i, tol(i), `i(${t})`);
  });
});

describe('simulate (exact ZOH) reproduces the FACTS.md §5 table at its time points', () => {
  it('with a uniform 0.1 ms interval', () => {
    const n = 1001;
    const out = simulate(motor, new Float64Array(n).fill(12), 1e-4);
    for (const [t, w, i] of table) {
      const k = Math.round(t / 1e-4);
      expectClose(out.speed[k]!, w, tol(w), `ω(${t})`);
      expectClose(out.current[k]!, i, tol(i), `i(${t})`);
    }
  });
  it('with non-uniform sample times through the same points', () => {
    const times = [0, ...table.map((r) => r[0])];
    // insert midpoints to make the intervals unequal
    const grid: number[] = [];
    for (let j = 0; j < times.length - 1; j++) grid.push(times[j]!, (2 * times[j]! + times[j + 1]!) / 3);
    grid.push(0.1);
    const t = Float64Array.from(grid);
    const out = simulate(motor, new Float64Array(t.length).fill(12), t);
    for (const [tt, w, i] of table) {
      const k = grid.indexOf(tt);
      expectClose(out.speed[k]!, w, tol(w), `ω(${tt})`);
      expectClose(out.current[k]!, i, tol(i), `i(${tt})`);
    }
  });
});

describe('motorFigures gives the FACTS.md §5 derived figures', () => {
  const f = motorFigures(motor, 12);
  it('time constants, poles, ωn, ζ', () => {
    expectClose(f.electricalTimeConstant, 5.0e-4, { rel: 1e-15 }, 'τe'); // FACTS.md §5
    expectClose(f.mechanicalTimeConstant, 0.016, { rel: 1e-15 }, 'τm'); // FACTS.md §5
    expectClose(f.mechanicalTimeConstantViscous, 0.015873015873015872, { rel: 1e-14 }, "τm'"); // FACTS.md §5
    expect(f.poles.kind).toBe('real-distinct');
    expectClose(f.poles.re1, -1935.39708068, { abs: 5e-9 }, 'p1'); // FACTS.md §5 (11 digits printed)
    expectClose(f.poles.re2, -65.10291932, { abs: 5e-9 }, 'p2'); // FACTS.md §5
    expectClose(f.naturalFrequency, 354.964786985977, { rel: 1e-13 }, 'ωn'); // FACTS.md §5
    expectClose(f.dampingRatio, 2.817885144307329, { rel: 1e-13 }, 'ζ'); // FACTS.md §5
  });
  it('steady state, stall, no-load, Km', () => {
    expectClose(f.steadySpeed, 238.09523809523807, { rel: 1e-14 }, 'ω_ss'); // FACTS.md §5
    expectClose(f.steadyCurrent, 0.047619047619047, { rel: 1e-13 }, 'i_ss'); // FACTS.md §5 (printed to 15 digits)
    expectClose(f.stallTorque, 0.3, { rel: 1e-15 }, 'T_stall'); // FACTS.md §5
    expectClose(f.stallCurrent, 6.0, { rel: 1e-15 }, 'I_stall'); // FACTS.md §5
    expectClose(f.noLoadSpeed, 240.0, { rel: 1e-15 }, 'ω_nl'); // FACTS.md §5
    expectClose(f.motorConstant, 0.035355339059327376, { rel: 1e-15 }, 'Km'); // FACTS.md §5
  });
  it('steady state with Coulomb friction as a load torque matches FACTS.md §5 (Tc = 2e-3 N·m)', () => {
    // For ω > 0 a Coulomb torque acts like a constant load torque.
    const r = stepResponse(motor, 12, 5, { loadTorque: 2.0e-3 });
    expectClose(r.speed, 236.50793650793648, { rel: 1e-12 }, 'ω_ss with Tc'); // FACTS.md §5
    expectClose(r.current, 0.0873015873015879, { rel: 1e-12 }, 'i_ss with Tc'); // FACTS.md §5
  });
  it('rejects bad constants with a message naming the field', () => {
    expect(() => motorFigures({ ...motor, L: -0.001 }, 12)).toThrow('motorFigures: params.L must be > 0 (got -0.001)');
    expect(() => motorFigures({ ...motor, R: Number.NaN }, 12)).toThrow(RangeError);
    expect(() => stepResponse(motor, 12, -1)).toThrow('stepResponse: t must be a finite number >= 0 (got -1)');
  });
});

describe('copperResistance follows the copper law of FACTS.md §3', () => {
  it('2.0 Ω at 20 °C → 75 °C with k = 234.5 (IEEE Std 113 form, "from memory" in FACTS.md)', () => {
    expectClose(copperResistance(2.0, 20, 75), 2.432220039, { abs: 5e-10 }, 'R75 IEEE'); // FACTS.md §3 worked correction
  });
  it('and with k = 235 (IEC 60034-1 form, "from memory" in FACTS.md)', () => {
    expectClose(copperResistance(2.0, 20, 75, 235), 2.431372549, { abs: 5e-10 }, 'R75 IEC'); // FACTS.md §3 worked correction
  });
  it('rejects temperatures at or below −k', () => {
    expect(() => copperResistance(2, 20, -234.5)).toThrow('copperResistance: toTemperature must be finite and above −234.5 °C (got -234.5)');
  });
});
