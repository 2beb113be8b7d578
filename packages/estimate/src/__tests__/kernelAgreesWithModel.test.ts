/**
 * The streamed linear kernel (`motor/sweepLinearModel.ts`, the lumped fit's fast path) against the
 * model package's simulator, which is the reference: on noise-free invented recordings made by
 * `generateRecording` (model's simulator), the lumped fit started at the true constants must stay
 * there, its residuals at the round-off level. A kernel that drifted from model's physics (a ZOH
 * term, the locked-rotor closed form, a sign) would leave residuals and move the constants.
 */
import { describe, expect, it } from 'vitest';
import { fitMotor } from '../motor/fitMotor.js';
import { INVENTED_MOTORS, invented } from './motorFixtures.js';

const ZERO = { voltage: 0, current: 0, speed: 0 };

describe('the streamed linear kernel agrees with the model package\'s simulator', () => {
  for (const [name, m] of Object.entries(INVENTED_MOTORS)) {
    it(`locked-rotor + step + prbs of the invented "${name}" motor, noise-free: constants kept to 1e-6, residuals below 1e-12 of full scale (measured about 2e-15)`, () => {
      const recs = (['locked-rotor', 'step', 'prbs'] as const).map((kind) => ({ recording: invented(m, kind, 1, ZERO), kind, name: kind }));
      // Noise-free data give no noise level of their own: weight with fixed, small SDs.
      const sI = 1e-6 * (12 / m.R), sW = 1e-6 * (12 / m.Ke);
      const fit = fitMotor(recs, {
        initial: { R: m.R, L: m.L, Kt: m.Kt, Ke: m.Ke, J: m.J, b: m.b },
        noise: recs.map(() => ({ current: sI, speed: sW })), reweight: false, keepResiduals: true,
      });
      expect(fit.variant.extensions ?? []).toEqual([]);
      for (const c of ['R', 'L', 'Kt', 'J', 'b'] as const) {
        const got = fit.parameters[c]!.value;
        expect(Math.abs(got / m[c] - 1), `${c}: ${got} vs ${m[c]}`).toBeLessThan(1e-6);
      }
      for (const r of fit.recordings) {
        for (const ch of r.channels) {
          if (ch.channel !== 'current' && ch.channel !== 'speed') continue;
          const scale = ch.channel === 'current' ? 12 / m.R : 12 / m.Ke;
          expect(ch.rms / scale, `${r.name} ${ch.channel} RMS ${ch.rms}`).toBeLessThan(1e-12);
        }
      }
    });
  }
});
