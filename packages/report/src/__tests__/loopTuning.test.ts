import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { loopTuning } from '../loopTuning.js';
import { readParameterSet } from '../readParameterSet.js';
import { formatParameterSetMarkdown } from '../formatParameterSetMarkdown.js';
import { formatParameterSetCsv } from '../formatParameterSetCsv.js';
import { buildParameterSet } from '../buildParameterSet.js';
import { renderHtmlReport } from '../renderHtmlReport.js';
import type { ConstantCovariance, ConstantName } from '../types.js';
import { INVENTED_PROVENANCE, inventedFit } from './inventedFit.js';

// FACTS.md §5 worked example motor (invented constants): R 2.0 Ω, L 1.0e-3 H, Kt = Ke 0.05 N·m/A,
// J 2.0e-5 kg·m², b 1.0e-5 N·m·s/rad. The log-variances below are invented for the test.
const NAMES: ConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];
function covOf(b: number, logVar: Partial<Record<ConstantName, number>>, cross: [ConstantName, ConstantName, number][] = []): ConstantCovariance {
  const c = new Float64Array(49);
  NAMES.forEach((n, i) => { c[i * 7 + i] = logVar[n] ?? 0; });
  for (const [a, bb, v] of cross) { const i = NAMES.indexOf(a), j = NAMES.indexOf(bb); c[i * 7 + j] = v; c[j * 7 + i] = v; }
  return {
    names: NAMES, values: Float64Array.of(2, 1e-3, 0.05, 0.05, 2e-5, b, NaN), fitted: [true, true, true, true, true, b > 0, false],
    identifiable: [true, true, true, true, true, true, false], covariance: c, degreesOfFreedom: 1000, tQuantile: 1.96,
  };
}

describe('loopTuning', () => {
  it('current loop by pole–zero cancellation: Kp = L·ωc, Ki = R·ωc, intervals from ln L and ln R', () => {
    const t = loopTuning(covOf(1e-5, { R: 1e-4, L: 4e-4 }), {});
    const wc = 2 * Math.PI * 1000; // default 1 kHz
    // Derived here: Kp = 1e-3·2π·1000 = 6.283185307 V/A; Ki = 2·2π·1000 = 12566.37061 V/(A·s).
    expectClose(t.currentLoop.Kp.value!, 1e-3 * wc, { rel: 1e-12 }, 'Kp');
    expectClose(t.currentLoop.Ki.value!, 2 * wc, { rel: 1e-12 }, 'Ki');
    expectClose(t.currentLoop.Kp.ci95![1], 1e-3 * wc * Math.exp(1.96 * 0.02), { rel: 1e-8 }, 'Kp upper (ln L SD 0.02)');
    expectClose(t.currentLoop.Ki.ci95![0], 2 * wc * Math.exp(-1.96 * 0.01), { rel: 1e-8 }, 'Ki lower (ln R SD 0.01)');
    expect(t.settings.currentBandwidthHz.source).toBe('default');
    expect(t.settings.phaseMarginDeg.value).toBe(60);
  });
  it('speed loop with b = 0: Kp = J·ωs·sin φm/Kt, Ki = J·ωs²·cos φm/Kt, interval from ln J − ln Kt', () => {
    const t = loopTuning(covOf(0, { J: 1e-4, Kt: 4e-6 }, [['J', 'Kt', 1e-6]]), { speedBandwidthHz: 50, phaseMarginDeg: 45 });
    const ws = 2 * Math.PI * 50, pm = Math.PI / 4;
    // Derived here: Kp = 2e-5·314.159·0.70711/0.05 = 0.0888577 A·s/rad; Ki = Kp·ωs/tan φm = 27.9155 A/rad.
    expectClose(t.speedLoop.Kp.value!, (2e-5 * ws * Math.sin(pm)) / 0.05, { rel: 1e-12 }, 'Kp');
    expectClose(t.speedLoop.Ki.value!, (2e-5 * ws * ws * Math.cos(pm)) / 0.05, { rel: 1e-12 }, 'Ki');
    const s = Math.sqrt(1e-4 + 4e-6 - 2 * 1e-6);
    expectClose(t.speedLoop.Kp.ci95![1] / t.speedLoop.Kp.value!, Math.exp(1.96 * s), { rel: 1e-6 }, 'Kp interval');
  });
  it('speed loop with b: |L(jωs)| = 1 and the phase margin hold in complex arithmetic', () => {
    const fsb = 20, pmDeg = 55;
    const t = loopTuning(covOf(1e-5, {}), { speedBandwidthHz: fsb, phaseMarginDeg: pmDeg });
    const ws = 2 * Math.PI * fsb;
    const Kp = t.speedLoop.Kp.value!, Ki = t.speedLoop.Ki.value!;
    // L(jω) = (Kp + Ki/(jω))·Kt/(J·jω + b), as (re, im) pairs.
    const c = { re: Kp, im: -Ki / ws };
    const den = { re: 1e-5, im: 2e-5 * ws };
    const d2 = den.re * den.re + den.im * den.im;
    const p = { re: (0.05 * den.re) / d2, im: (-0.05 * den.im) / d2 };
    const L = { re: c.re * p.re - c.im * p.im, im: c.re * p.im + c.im * p.re };
    expectClose(Math.hypot(L.re, L.im), 1, { rel: 1e-12 }, '|L(jωs)|');
    expectClose((Math.atan2(L.im, L.re) * 180) / Math.PI + 180, pmDeg, { rel: 1e-10 }, 'phase margin [°]');
  });
  it('warns when a bandwidth exceeds 1/10 of the controller rate, and names bad options', () => {
    const t = loopTuning(covOf(1e-5, {}), { controllerRateHz: 5000 });
    expect(t.warnings.some((w) => /current-loop bandwidth 1000 Hz exceeds 1\/10 of the controller rate 5000 Hz/.test(w))).toBe(true);
    expect(loopTuning(covOf(1e-5, {}), { controllerRateHz: 20000 }).warnings).toEqual([]);
    expect(() => loopTuning(covOf(1e-5, {}), { phaseMarginDeg: 95 })).toThrow(/options\.phaseMarginDeg/);
    expect(() => loopTuning(covOf(1e-5, {}), { currentBandwidthHz: -1 })).toThrow(/options\.currentBandwidthHz/);
  });
  it('goes into the parameter set, reads back, and shows in Markdown and CSV', () => {
    const set = buildParameterSet(inventedFit(), { provenance: INVENTED_PROVENANCE, tuning: { controllerRateHz: 20000 } });
    expect(set.tuning).toBeDefined();
    const again = readParameterSet(JSON.stringify(set));
    expect(again.tuning).toEqual(JSON.parse(JSON.stringify(set.tuning)));
    expect(formatParameterSetMarkdown(set)).toMatch(/## Loop tuning/);
    expect(formatParameterSetCsv(set)).toMatch(/tuning\.speedLoop\.Kp/);
    const fit = inventedFit();
    const html = renderHtmlReport({ parameterSet: buildParameterSet(fit, { provenance: INVENTED_PROVENANCE, tuning: {} }), fit });
    expect(html).toMatch(/<h2>Loop tuning<\/h2>/);
    expect(html).toMatch(/current-loop bandwidth 1000 Hz \(default\)/);
    expect(buildParameterSet(inventedFit(), { provenance: INVENTED_PROVENANCE }).tuning).toBeUndefined();
  });
});
