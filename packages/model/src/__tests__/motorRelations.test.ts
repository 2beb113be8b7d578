import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { motorFigures, motorRelations as f } from '../index.js';

// An invented motor with Coulomb friction: R = 2 Ω, Kt = Ke = 0.05, b = 1e-5 N·m·s/rad, Tc = 2e-3 N·m, V = 12 V.
// By hand: R·b + Kt·Ke = 2e-5 + 2.5e-3 = 2.52e-3.
//   ω0 = (Kt·V − R·Tc)/2.52e-3 = 0.596/0.00252 = 14900/63 rad/s
//   i0 = (b·ω0 + Tc)/Kt = (0.149/63 + 0.126/63)/0.05 = 5.5/63 A
//   speed drop R/2.52e-3 = 50000/63 rad/s/(N·m)
//   a = Kt·V/R − Tc = 0.298 N·m, k = Kt·Ke/R + b = 0.00126 N·m·s/rad:
//   maximum power a²/(4k) = 0.088804/0.00504 = 22201/1260 W at ω = a/(2k) = 0.298/0.00252 rad/s
//   (b·V + Ke·Tc)/(k·V) = 2.2e-4/0.01512 = 11/756, so ω* = (V/Ke)(1 − √(11/756)) = 240(1 − √(11/756)).
const c = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 2e-3 };
const V = 12;

describe('motorRelations', () => {
  it('no-load speed and current with Coulomb friction, speed drop, stall values', () => {
    expectClose(f.noLoadSpeed(c, V), 14900 / 63, { rel: 1e-15 }, 'ω0');
    expectClose(f.noLoadCurrent(c, V), 5.5 / 63, { rel: 1e-14 }, 'i0');
    expectClose(f.speedDropPerLoadTorque(c), 50000 / 63, { rel: 1e-15 }, 'speed drop');
    expectClose(f.stallTorque(c, V), 0.3, { rel: 1e-15 }, 'stall torque');
    expectClose(f.stallCurrent(c, V), 6, { rel: 1e-15 }, 'stall current');
    expectClose(f.idealNoLoadSpeed(c, V), 240, { rel: 1e-15 }, 'V/Ke');
    expectClose(f.electricalTimeConstant(c), 5e-4, { rel: 1e-15 }, 'L/R');
    expectClose(f.mechanicalTimeConstant(c), 0.016, { rel: 1e-15 }, 'J·R/(Kt·Ke)');
    expectClose(f.mechanicalTimeConstantViscous(c), 4e-5 / 2.52e-3, { rel: 1e-15 }, 'J·R/(R·b + Kt·Ke)');
    expectClose(f.motorConstant(c), 0.05 / Math.SQRT2, { rel: 1e-15 }, 'Kt/√R');
    // Without a Tc the friction-free no-load speed Kt·V/(R·b + Kt·Ke) = 0.6/0.00252 = 5000/21.
    expectClose(f.noLoadSpeed({ ...c, Tc: undefined }, V), 5000 / 21, { rel: 1e-15 }, 'ω0 without Tc');
  });

  it('the steady operating point: no shaft torque at ω0, stall torque less Tc at rest', () => {
    const w0 = f.noLoadSpeed(c, V);
    expect(Math.abs(f.torqueAtSpeed(c, V, w0))).toBeLessThan(1e-15);
    expectClose(f.currentAtSpeed(c, V, w0), 5.5 / 63, { rel: 1e-13 }, 'i at ω0');
    expectClose(f.torqueAtSpeed(c, V, 0), 0.298, { rel: 1e-15 }, 'T at rest');
    expectClose(f.currentAtSpeed(c, V, 0), 6, { rel: 1e-15 }, 'i at rest');
  });

  it('maximum power and peak efficiency agree with the hand results and with a fine search of the curve', () => {
    expectClose(f.maxOutputPower(c, V), 22201 / 1260, { rel: 1e-14 }, 'P max');
    const wStar = 240 * (1 - Math.sqrt(11 / 756));
    expectClose(f.peakEfficiencySpeed(c, V), wStar, { rel: 1e-14 }, 'ω*');
    const iStar = (V - 0.05 * wStar) / 2, tStar = 0.05 * iStar - 1e-5 * wStar - 2e-3;
    expectClose(f.peakEfficiencyCurrent(c, V), iStar, { rel: 1e-14 }, 'i*');
    expectClose(f.peakEfficiencyTorque(c, V), tStar, { rel: 1e-12 }, 'T*');
    expectClose(f.peakEfficiency(c, V), (tStar * wStar) / (V * iStar), { rel: 1e-13 }, 'η*');
    // Search of T·ω and T·ω/(V·i) over 200 001 speeds from 0 to ω0.
    const w0 = f.noLoadSpeed(c, V);
    let pBest = 0, pAt = 0, eBest = 0;
    for (let k = 0; k <= 200000; k++) {
      const w = (w0 * k) / 200000;
      const P = f.torqueAtSpeed(c, V, w) * w;
      if (P > pBest) { pBest = P; pAt = w; }
      eBest = Math.max(eBest, f.efficiencyAtSpeed(c, V, w));
    }
    expectClose(pBest, f.maxOutputPower(c, V), { rel: 1e-9 }, 'P max by search');
    expectClose(pAt, 0.298 / 0.00252, { abs: 2 * w0 / 200000 }, 'ω at P max');
    expectClose(eBest, f.peakEfficiency(c, V), { rel: 1e-9 }, 'η* by search');
  });

  it('gives NaN, not a throw, when friction exceeds the stall torque', () => {
    const stuck = { ...c, Tc: 0.31 }; // above Kt·V/R = 0.3 N·m
    expect(f.maxOutputPower(stuck, V)).toBeNaN();
    expect(f.peakEfficiencySpeed(stuck, V)).toBeNaN();
    expect(f.peakEfficiency(stuck, V)).toBeNaN();
  });

  it('is what motorFigures reports for the friction-free motor, a Tc on the object notwithstanding', () => {
    const m = motorFigures(c, V);
    const free = { ...c, Tc: 0 };
    expect(m.steadySpeed).toBe(f.noLoadSpeed(free, V));
    expect(m.steadyCurrent).toBe(f.noLoadCurrent(free, V));
    expect(m.noLoadSpeed).toBe(f.idealNoLoadSpeed(c, V));
    expect(m.steadySpeed).not.toBe(f.noLoadSpeed(c, V));
  });
});
