import { describe, it, expect } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { simulate, simulateDetailed } from '../index.js';
import type { DetailedParams } from '../index.js';

const motor = { R: 2.0, L: 1.0e-3, Kt: 0.05, Ke: 0.05, J: 2.0e-5, b: 1.0e-5 }; // FACTS.md §5 motor

describe('simulateDetailed keeps the energy books: input = copper + friction + ΔKE + magnetic + load (+ mismatch)', () => {
  // 0.2 s of a square wave 12 V / −6 V, 0.1 ms samples: reversals exercise every friction term.
  const n = 2001;
  const v = new Float64Array(n);
  for (let k = 0; k < n; k++) v[k] = Math.floor(k / 400) % 2 === 0 ? 12 : -6;
  const cases: [string, Partial<DetailedParams>][] = [
    ['no effect', {}],
    ['Coulomb + stiction', { Tc: 2e-3, Ts: 3e-3 }],
    ['drag', { cd: 1e-7 }],
    ['voltage clip', { Vmax: 8 }],
    ['current limit', { Imax: 3 }],
    ['thermal R(T)', { Rth: 2, Cth: 0.05, referenceTemperature: 20, ambientTemperature: 25 }],
    ['source resistance', { Rs: 0.5 }],
    ['load', { loadInertia: 1e-5, loadTorque: 5e-3, loadDamping: 2e-5 }],
    ['Kt ≠ Ke', { Kt: 0.06 }],
  ];
  it.each(cases)('%s: |balance| ≤ 1e-8 of the electrical input', (_name, extra) => {
    const r = simulateDetailed({ ...motor, ...extra }, v, 1e-4);
    const e = r.energy;
    // tolerance: stated here, 1e-8 relative (integrator rtol 1e-9)
    expect(Math.abs(e.balance)).toBeLessThanOrEqual(1e-8 * Math.abs(e.electricalInput));
    expect(e.copperLoss).toBeGreaterThan(0);
    if (extra.Tc !== undefined || extra.cd !== undefined) expect(e.frictionLoss).toBeGreaterThan(1e-5 * e.electricalInput);
    if (extra.loadTorque !== undefined) expect(Math.abs(e.loadWork)).toBeGreaterThan(0);
    if (extra.Kt !== undefined) expect(Math.abs(e.conversionMismatch)).toBeGreaterThan(0);
    if (extra.Imax !== undefined) {
      let peak = 0;
      for (const i of r.current) peak = Math.max(peak, Math.abs(i));
      expectClose(peak, 3, { rel: 1e-6 }, 'current held at Imax'); // the limit itself
    }
    if (extra.Vmax !== undefined) for (const vt of r.terminalVoltage) expect(Math.abs(vt)).toBeLessThanOrEqual(8);
    if (extra.Rth !== undefined) expect(r.temperature[n - 1]!).toBeGreaterThan(25);
  });
});

describe('simulateDetailed stick–slip', () => {
  const p = { ...motor, Tc: 2e-3, Ts: 4e-3 };
  // breakaway needs Kt·i > Ts, i.e. i > 0.08 A, i.e. V > 0.16 V at stall (derived here: Ts/Kt·R)
  it('keeps the rotor at rest below the breakaway torque', () => {
    const r = simulateDetailed(p, new Float64Array(1001).fill(0.15), 1e-4);
    for (const w of r.speed) expect(w).toBe(0);
    expect(r.stats.breakawayEvents).toBe(0);
  });
  it('moves above it', () => {
    const r = simulateDetailed(p, new Float64Array(1001).fill(0.2), 1e-4);
    expect(r.stats.breakawayEvents).toBe(1);
    expect(r.speed[1000]!).toBeGreaterThan(0);
  });
  it('does not chatter: under a slow ±0.3 V sine the speed changes sign only at true reversals/sticks', () => {
    const n = 20001;
    const v = new Float64Array(n);
    for (let k = 0; k < n; k++) v[k] = 0.3 * Math.sin((2 * Math.PI * k * 1e-4) / 0.5); // 2 Hz, 2 s → 4 periods
    const r = simulateDetailed(p, v, 1e-4);
    let changes = 0, prev = 0;
    for (const w of r.speed) {
      const s = Math.sign(w);
      if (s !== 0 && prev !== 0 && s !== prev) changes++;
      if (s !== 0) prev = s;
    }
    // 4 periods → at most 8 direction changes (derived here: two per period)
    expect(changes).toBeLessThanOrEqual(8);
    expect(changes).toBeGreaterThanOrEqual(6);
    expect(r.stats.stickEvents + r.stats.reversals).toBeLessThanOrEqual(9);
    expect(Math.abs(r.energy.balance)).toBeLessThanOrEqual(1e-8 * r.energy.electricalInput);
  });
});

describe('simulateDetailed input checks', () => {
  const v = new Float64Array(10).fill(12);
  it('rejects NaN / ∞ samples, bad constants and bad times with named messages', () => {
    const bad = v.slice(); bad[3] = Number.NaN;
    expect(() => simulateDetailed(motor, bad, 1e-4)).toThrow('simulateDetailed: voltage[3] must be finite (got NaN)');
    bad[3] = Infinity;
    expect(() => simulate(motor, bad, 1e-4)).toThrow('simulate: voltage[3] must be finite (got Infinity)');
    expect(() => simulateDetailed({ ...motor, J: 0 }, v, 1e-4)).toThrow('simulateDetailed: params.J must be > 0 (got 0)');
    expect(() => simulateDetailed({ ...motor, Tc: 3e-3, Ts: 1e-3 }, v, 1e-4)).toThrow('params.Ts must be >= params.Tc');
    expect(() => simulate(motor, v, -1e-4)).toThrow('simulate: time (sample interval) must be a finite number > 0 (got -0.0001)');
    expect(() => simulate(motor, v, Float64Array.of(0, 1, 1, 2, 3, 4, 5, 6, 7, 8))).toThrow('time must increase strictly (time[2] = 1');
    expect(() => simulate(motor, [1, 2] as unknown as Float64Array, 1e-4)).toThrow(TypeError);
  });
  it('rejects a sample interval far too large for the explicit integrator instead of hanging', () => {
    expect(() => simulateDetailed(motor, v, 100, { maxStepsPerInterval: 1000 })).toThrow(
      /simulateDetailed: sample interval 100 s before sample 1 is too large for the adaptive integrator/,
    );
  });
  it('while the exact ZOH kernel stays stable for the same huge interval (it lands on the steady state)', () => {
    const r = simulate(motor, v, 100);
    // FACTS.md §5: ω_ss = 238.09523809523807 rad/s, i_ss = 0.047619047619047 A
    expectClose(r.speed[9]!, 238.09523809523807, { rel: 1e-12 }, 'ω after 100 s');
    expectClose(r.current[9]!, 0.047619047619047, { rel: 1e-12 }, 'i after 100 s');
  });
});
