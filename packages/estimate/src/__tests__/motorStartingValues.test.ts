import { describe, expect, it } from 'vitest';
import type { DetailedParams } from '@motorprint/model';
import { fitMotor } from '../motor/fitMotor.js';
import type { MotorConstantName, MotorExperimentKind, MotorFit, MotorRecordingInput } from '../motor/types.js';
import { INVENTED_MOTORS, invented } from './motorFixtures.js';

/** Coulomb friction of 5 % of the 12 V stall torque Kt·12/R (an invented, moderate level). */
function withFriction(m: DetailedParams): DetailedParams {
  return { ...m, Tc: (0.05 * m.Kt * 12) / m.R };
}

function zScores(fit: MotorFit, m: DetailedParams): Record<string, number> {
  const truth: Record<string, number> = { R: m.R, L: m.L, Kt: m.Kt, Ke: m.Ke, J: m.J, b: m.b, Tc: m.Tc ?? 0 };
  const z: Record<string, number> = {};
  for (const [name, e] of Object.entries(fit.parameters)) if (!e.fixed) z[name] = (e.value - truth[name]!) / e.standardError!;
  return z;
}

/** Starting values off by `factor` for every constant the recordings use. */
function offStart(m: DetailedParams, names: MotorConstantName[], factor: number): Partial<Record<MotorConstantName, number>> {
  const truth: Partial<Record<MotorConstantName, number>> = { R: m.R, L: m.L, Kt: m.Kt, Ke: m.Ke, J: m.J, b: m.b, Tc: m.Tc ?? 0 };
  const out: Partial<Record<MotorConstantName, number>> = {};
  for (const k of names) out[k] = truth[k]! * factor;
  return out;
}

const KINDS: { kind: MotorExperimentKind; names: MotorConstantName[]; friction: boolean; fixJ: boolean }[] = [
  { kind: 'locked-rotor', names: ['R', 'L'], friction: false, fixJ: false },
  { kind: 'step', names: ['R', 'L', 'Kt', 'Ke', 'J', 'b'], friction: false, fixJ: false },
  { kind: 'prbs', names: ['R', 'L', 'Kt', 'Ke', 'J', 'b'], friction: false, fixJ: false },
  { kind: 'steady-state', names: ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'], friction: true, fixJ: false },
  { kind: 'coast-down', names: ['b', 'Tc'], friction: true, fixJ: true },
];

describe('fitMotor converges from starting values 3× off in either direction', () => {
  for (const motor of Object.keys(INVENTED_MOTORS)) {
    for (const c of KINDS) {
      for (const factor of [3, 1 / 3]) {
        it(`${c.kind} of the invented "${motor}" motor, start ×${factor === 3 ? '3' : '1/3'}: converged, every constant within 3 SE`, () => {
          const m = c.friction ? withFriction(INVENTED_MOTORS[motor]!) : INVENTED_MOTORS[motor]!;
          const rec = invented(m, c.kind, 12);
          const fit = fitMotor([{ recording: rec, kind: c.kind }], { initial: offStart(m, c.names, factor), ...(c.fixJ ? { fix: { J: m.J } } : {}), coulomb: c.friction });
          expect(fit.converged, fit.stopReason).toBe(true);
          expect(fit.starts.filter((s) => s.chosen)).toHaveLength(1);
          for (const [name, z] of Object.entries(zScores(fit, m))) expect(Math.abs(z), `${name}: z ${z.toFixed(2)}`).toBeLessThanOrEqual(3);
        });
      }
    }
    // Without Coulomb friction in the truth, and the lumped model asked for; the cases with Tc > 0
    // (rotor stuck at rest until breakaway) are in motorCoulombStart.test.ts.
    it(`joint locked-rotor + step + coast-down of the invented "${motor}" motor, start ×3: converged, within 3 SE`, () => {
      const m = INVENTED_MOTORS[motor]!;
      const recs: MotorRecordingInput[] = [
        { recording: invented(m, 'locked-rotor', 31), kind: 'locked-rotor', name: 'held' },
        { recording: invented(m, 'step', 32), kind: 'step', name: 'step' },
        { recording: invented(m, 'coast-down', 33), kind: 'coast-down', name: 'coast' },
      ];
      const fit = fitMotor(recs, { initial: offStart(m, ['R', 'L', 'Kt', 'Ke', 'J', 'b'], 3) });
      expect(fit.converged, fit.stopReason).toBe(true);
      const z = zScores(fit, m);
      expect(Object.keys(z).sort()).toEqual(['J', 'Ke', 'Kt', 'L', 'R', 'b']);
      for (const [name, v] of Object.entries(z)) expect(Math.abs(v), `${name}: z ${v.toFixed(2)}`).toBeLessThanOrEqual(3);
    });
  }
  // Multisine: the sine-fit coefficients are nuisance parameters with voltage rows, so the
  // reported standard errors include the input uncertainty.
  for (const factor of [3, 1 / 3]) {
    it(`multisine of the invented "facts-example" motor, start ×${factor === 3 ? '3' : '1/3'}: converged, every constant within 3 SE`, () => {
      const m = INVENTED_MOTORS['facts-example']!;
      const rec = invented(m, 'multisine', 12);
      const fit = fitMotor([{ recording: rec, kind: 'multisine' }], { initial: offStart(m, ['R', 'L', 'Kt', 'Ke', 'J', 'b'], factor) });
      expect(fit.converged, fit.stopReason).toBe(true);
      expect(fit.recordings[0]!.input.method).toBe('sine-fit');
      expect(fit.fittedNames.filter((x) => x.startsWith('input coefficient')).length).toBeGreaterThan(0);
      for (const [name, z] of Object.entries(zScores(fit, m))) expect(Math.abs(z), `${name}: z ${z.toFixed(2)}`).toBeLessThanOrEqual(3);
    });
  }
});
