import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { derivedFigures } from '../derivedFigures.js';

// FACTS.md §5 worked example constants (invented there), Tc = 0 unless stated.
const M = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 0 };
const tol = { rel: 1e-12, abs: 0 };

describe('derivedFigures', () => {
  it('reproduces the FACTS.md §5 worked example at 12 V', () => {
    const f = derivedFigures(M, 12);
    expectClose(f.electricalTimeConstant!.value!, 5e-4, tol, 'τe (FACTS.md §5)');
    expectClose(f.mechanicalTimeConstant!.value!, 0.016, tol, 'τm (FACTS.md §5)');
    expectClose(f.mechanicalTimeConstantViscous!.value!, 0.015873015873015872, tol, 'τm′ (FACTS.md §5)');
    expectClose(f.noLoadSpeed!.value!, 238.09523809523807, tol, 'ω_ss, Tc = 0 (FACTS.md §5)');
    expectClose(f.noLoadSpeedRpm!.value!, 2273.6420441699333, tol, 'ω_ss in r/min (FACTS.md §5)');
    // FACTS.md §5 prints i_ss = 0.047619047619047 (15 digits, truncated); b·ω_ss/Kt = 1/21 exactly.
    expectClose(f.noLoadCurrent!.value!, 0.047619047619047, { rel: 1e-13, abs: 0 }, 'i_ss (FACTS.md §5)');
    expectClose(f.stallTorque!.value!, 0.3, tol, 'T_stall (FACTS.md §5)');
    expectClose(f.stallCurrent!.value!, 6, tol, 'I_stall (FACTS.md §5)');
    expectClose(f.idealNoLoadSpeed!.value!, 240, tol, 'ω_nl = V/Ke (FACTS.md §5)');
    expectClose(f.motorConstant!.value!, 0.035355339059327376, tol, 'Km = Kt/√R (FACTS.md §5)');
    expectClose(f.backEmfConstantPerKrpm!.value!, 5.235987755982989, tol, 'Ke in V/krpm (FACTS.md §5)');
    expectClose(f.torqueConstantOzfIn!.value!, 7.080596633061748, tol, 'Kt in ozf·in/A (FACTS.md §5)');
    expectClose(f.torqueConstant!.value!, 0.05, tol, 'Kt in N·m/A (FACTS.md §5)');
    expectClose(f.torqueConstantMilli!.value!, 50, tol, 'Kt in mN·m/A (derived here: 1000 × 0.05)');
  });

  it('uses the FACTS.md §2 unit factors (rpm, V/krpm, ozf·in)', () => {
    const f = derivedFigures(M, 12);
    // ω_nl = 240 rad/s = 2291.831180523293 r/min (FACTS.md §5); the §2 factor rad/s → r/min is 60/(2π).
    expectClose(f.idealNoLoadSpeed!.value! * (60 / (2 * Math.PI)), 2291.831180523293, tol, 'ω_nl in r/min (FACTS.md §5/§2)');
    // FACTS.md §2: V/krpm → V·s/rad factor 0.0095492965855137202.
    expectClose(f.backEmfConstantPerKrpm!.value! * 0.0095492965855137202, M.Ke, tol, 'V/krpm ↔ V·s/rad (FACTS.md §2)');
    // FACTS.md §2: ozf·in → N·m factor 0.00706155181422604375.
    expectClose(f.torqueConstantOzfIn!.value! * 0.00706155181422604375, M.Kt, tol, 'ozf·in ↔ N·m (FACTS.md §2)');
    // FACTS.md §2: Kv = 9.5492965855137202 / Ke (r/min per V).
    expectClose(f.speedConstant!.value!, 9.5492965855137202 / 0.05, tol, 'Kv (FACTS.md §2)');
  });

  it('includes Coulomb friction in the no-load speed and current (FACTS.md §5, Tc = 2e-3 N·m)', () => {
    const f = derivedFigures({ ...M, Tc: 2e-3 }, 12);
    expectClose(f.noLoadSpeed!.value!, 236.50793650793648, tol, 'ω_ss with Tc (FACTS.md §5)');
    // FACTS.md §5 prints 0.0873015873015879; (b·ω + Tc)/Kt = 11/126 = 0.087301587301587301… (derived here), 7e-15 relative apart.
    expectClose(f.noLoadCurrent!.value!, 0.0873015873015879, { rel: 1e-13, abs: 0 }, 'i_ss with Tc (FACTS.md §5)');
  });

  it('gives the frictionless maximum power V²/(4R) and the textbook peak efficiency (1 − √(i0/Is))² with Coulomb friction only', () => {
    // Derived here: with b = Tc = 0, P(ω) = ω·(Kt·V/R − Kt·Ke·ω/R) peaks at V²·Kt/(4·R·Ke) = 144/8 = 18 W.
    const f0 = derivedFigures({ ...M, b: 0 }, 12);
    expectClose(f0.maxOutputPower!.value!, 18, tol, 'P_max = V²/(4R) (derived here)');
    // Derived here (docs/derived-figures.md): b = 0, Kt = Ke gives η_max = (1 − √(i0/Is))², i0 = Tc/Kt, Is = V/R;
    // Tc = 2e-3 → i0 = 0.04 A, Is = 6 A.
    const f1 = derivedFigures({ ...M, b: 0, Tc: 2e-3 }, 12);
    const r = 0.04 / 6;
    expectClose(f1.peakEfficiency!.value!, 100 * (1 - Math.sqrt(r)) ** 2, { rel: 1e-12, abs: 0 }, 'η_max (derived here)');
    expectClose(f1.peakEfficiencyCurrent!.value!, 6 * Math.sqrt(r), { rel: 1e-12, abs: 0 }, 'i at η_max = Is·√(i0/Is) (derived here)');
  });

  it('finds the peak efficiency with viscous friction at the maximum of a dense scan of η(ω)', () => {
    const f = derivedFigures(M, 12);
    // Brute force: η(ω) = T·ω/(V·i) on a 1e6-point grid from 0 to ω_ss (common practice, no source).
    let best = 0, wBest = 0;
    const wMax = 238.09523809523807;
    for (let k = 1; k < 1_000_000; k++) {
      const w = (wMax * k) / 1_000_000;
      const i = (12 - 0.05 * w) / 2;
      const eta = ((0.05 * i - 1e-5 * w) * w) / (12 * i);
      if (eta > best) { best = eta; wBest = w; }
    }
    expectClose(f.peakEfficiency!.value! / 100, best, { rel: 1e-9, abs: 0 }, 'η_max vs scan');
    expectClose(f.peakEfficiencySpeed!.value!, wBest, { rel: 1e-5, abs: 0 }, 'ω* vs scan (grid step 2.4e-4 rad/s)');
  });

  it('leaves figures without a value, and says why, when a constant or the voltage is missing', () => {
    const f = derivedFigures({ ...M, J: NaN }, null);
    expect(f.mechanicalTimeConstant!.value).toBeNull();
    expect(f.mechanicalTimeConstant!.note).toContain('needs J');
    expect(f.stallTorque!.value).toBeNull();
    expect(f.stallTorque!.note).toContain('no rated voltage');
    expect(f.electricalTimeConstant!.value).toBe(5e-4); // L/R = 1e-3/2 (FACTS.md §5)
  });

  it('rejects a rated voltage that is not a finite number > 0', () => {
    expect(() => derivedFigures(M, -1)).toThrow('derivedFigures: ratedVoltage must be a finite number > 0 or null (got -1)');
    expect(() => derivedFigures(M, NaN)).toThrow(RangeError);
  });
});
