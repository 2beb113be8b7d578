import { describe, expect, it } from 'vitest';
import type { DetailedParams } from '@motorprint/model';
import { createMotorProblem } from '../motor/createMotorProblem.js';
import type { ParameterLayout } from '../motor/createMotorProblem.js';
import { fitMotor } from '../motor/fitMotor.js';
import { prepareRecording } from '../motor/prepareRecording.js';
import type { MotorConstantName, MotorFit, MotorRecordingInput } from '../motor/types.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { INVENTED_MOTORS, invented } from './motorFixtures.js';

/** Invented motor with Coulomb friction at `fraction` of its 12 V stall torque Kt·12/R (FACTS.md §4 stall-torque relation). */
function withFriction(motor: string, fraction: number): DetailedParams {
  const m = INVENTED_MOTORS[motor]!;
  return { ...m, Tc: (fraction * m.Kt * 12) / m.R };
}

function zScores(fit: MotorFit, m: DetailedParams): Record<string, number> {
  const truth: Record<string, number> = { R: m.R, L: m.L, Kt: m.Kt, Ke: m.Ke, J: m.J, b: m.b, Tc: m.Tc ?? 0 };
  const z: Record<string, number> = {};
  // Constants the fit pins down (derived ratios such as b/J left out).
  for (const [name, e] of Object.entries(fit.parameters)) if (!e.fixed && truth[name] !== undefined) z[name] = (e.value - truth[name]!) / e.standardError!;
  return z;
}

describe('fitMotor holds the rotor at rest until Kt·i exceeds the Coulomb torque', () => {
  // Invented cases: Tc at 10 % of the stall torque on every invented motor, 2 % on one of them.
  const cases: [string, number][] = [['facts-example', 0.1], ['tiny-20ohm', 0.1], ['big-0.1ohm', 0.1], ['facts-example', 0.02]];
  for (const [motor, fraction] of cases) {
    it(`joint locked-rotor + step + coast-down of the invented "${motor}" motor with Tc = ${fraction * 100} % of stall torque, start ×3: every constant within 3 SE`, () => {
      const m = withFriction(motor, fraction);
      const recs: MotorRecordingInput[] = [
        { recording: invented(m, 'locked-rotor', 31), kind: 'locked-rotor', name: 'held' },
        { recording: invented(m, 'step', 32), kind: 'step', name: 'step' },
        { recording: invented(m, 'coast-down', 33), kind: 'coast-down', name: 'coast' },
      ];
      const initial: Partial<Record<MotorConstantName, number>> = { R: m.R * 3, L: m.L * 3, Kt: m.Kt * 3, Ke: m.Ke * 3, J: m.J * 3, b: m.b * 3 };
      const fit = fitMotor(recs, { initial, coulomb: true });
      expect(fit.converged, fit.stopReason).toBe(true);
      expect(fit.variant.coulomb).toBe(true);
      const z = zScores(fit, m);
      expect(Object.keys(z).sort()).toEqual(['J', 'Ke', 'Kt', 'L', 'R', 'Tc', 'b']);
      for (const [name, v] of Object.entries(z)) expect(Math.abs(v), `${name}: z ${v.toFixed(2)}`).toBeLessThanOrEqual(3);
    });
  }
  for (const seed of [12, 13, 14]) {
    it(`steady-state sweep of the invented "tiny-20ohm" motor with Tc = 2e-3 N·m (FACTS.md §5 value), seed ${seed}: every constant within 3 SE`, () => {
      const m = { ...INVENTED_MOTORS['tiny-20ohm']!, Tc: 2e-3 };
      const fit = fitMotor([{ recording: invented(m, 'steady-state', seed), kind: 'steady-state' }], { coulomb: true });
      expect(fit.converged, fit.stopReason).toBe(true);
      const z = zScores(fit, m);
      expect(Object.keys(z)).toContain('Tc');
      for (const [name, v] of Object.entries(z)) expect(Math.abs(v), `${name}: z ${v.toFixed(2)}`).toBeLessThanOrEqual(3);
    });
  }
});

describe('the stuck-start model has an exact gradient (the breakaway-time term vanishes)', () => {
  it('Jᵀr of a step from rest with Tc = 10 % of stall torque matches central differences of the SSR', () => {
    const m = withFriction('facts-example', 0.1);
    const rec = prepareRecording({ recording: invented(m, 'step', 5), kind: 'step' }, 0, 'auto');
    expect(rec.levels).not.toBeNull();
    const nc = rec.levels!.classes.length;
    const names = ['ln R', 'ln L', 'ln K', 'ln J', 'ln b', 'Tc'];
    // A point off the optimum (every constant 2–5 % off) so that the gradient is not ~0.
    const theta = [Math.log(m.R * 1.02), Math.log(m.L * 0.97), Math.log(m.Kt * 1.03), Math.log(m.J * 0.95), Math.log(m.b * 1.05), 1.04];
    const level: number[] = [];
    for (let j = 0; j < nc; j++) { names.push(`level ${j}`); theta.push(rec.levels!.classes[j]!.mean / 12); level.push(theta.length - 1); }
    const layout: ParameterLayout = {
      names, iR: 0, iL: 1, iKt: 2, iKe: 2, iJ: 3, iB: 4, iTc: 5, tcScale: m.Tc!,
      fixed: { R: m.R, L: m.L, Kt: m.Kt, Ke: m.Ke, J: m.J, b: m.b, Tc: m.Tc! },
      recordings: [{ level, levelScale: 12, offset: -1, offsetScale: 1, load: -1, loadScale: 1, w0: -1, w0Scale: 1, sine: [], sineScale: 1 }],
    };
    const problem = createMotorProblem([rec], layout, theta, null);
    const p = problem.parameterCount;
    const acc = createNormalEquations(p);
    const t0 = Float64Array.from(theta);
    problem.evaluate(t0, true, acc);
    const ssrAt = (t: Float64Array): number => problem.evaluate(t, false, createNormalEquations(p));
    for (let j = 0; j < p; j++) {
      // Step 1e-6 on the log / scaled parameters: central-difference error O(h²) far below the 1e-4 tolerance (common practice, no source).
      const h = 1e-6;
      const up = Float64Array.from(t0); up[j] = t0[j]! + h;
      const dn = Float64Array.from(t0); dn[j] = t0[j]! - h;
      const fd = (ssrAt(up) - ssrAt(dn)) / (2 * h);
      const analytic = 2 * acc.Jtr[j]!;
      expect(Math.abs(fd - analytic), `${names[j]}: analytic ${analytic}, central difference ${fd}`).toBeLessThanOrEqual(1e-4 * Math.abs(analytic) + 1e-6 * Math.sqrt(acc.ssr));
    }
  });
});
