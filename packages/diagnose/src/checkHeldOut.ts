import { fitMotor } from '@motorprint/estimate';
import type { ModelExtensions, MotorFit, MotorRecordingInput } from '@motorprint/estimate';
import type { HeldOutCheck } from './types.js';

const PINNABLE = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rth', 'Cth'] as const;

/**
 * Predicts a held-out recording with a fit's constants: the recording is passed through the
 * estimator with every constant of the fit pinned and the same model extensions, so only its own
 * input levels, offsets and initial state are estimated; the NRMSE per channel says how well the
 * constants predict data they were not fitted to.
 *
 * @param fit - the fit whose constants are checked
 * @param item - the held-out recording
 * @param index - its position (for the default name)
 * @returns name, kind, convergence and NRMSE per channel
 * @throws TypeError / RangeError from `fitMotor` for an unusable recording
 * @example
 * checkHeldOut(fit, { recording: prbs, name: 'prbs.csv' }, 0).channels[0].nrmse; // ≈ 0.02
 */
export function checkHeldOut(fit: MotorFit, item: MotorRecordingInput, index: number): HeldOutCheck {
  const fix: Record<string, number> = {};
  for (const c of PINNABLE) {
    const p = fit.parameters[c];
    if (p !== undefined && Number.isFinite(p.value) && p.value > 0) fix[c] = p.value;
  }
  const ext: ModelExtensions = {};
  for (const e of fit.variant.extensions ?? []) ext[e as keyof ModelExtensions] = true;
  if (fit.variant.coulomb) ext.coulomb = true;
  const check = fitMotor([item], { fix, extensions: ext, coulomb: ext.coulomb === true });
  const rec = check.recordings[0];
  return {
    name: item.name ?? `held-out recording ${index}`,
    kind: rec?.kind ?? 'unknown',
    converged: check.converged || check.stopReason === 'nothing-to-fit',
    channels: (rec?.channels ?? []).map((c) => ({ channel: c.channel, rms: c.rms, nrmse: c.nrmse, samples: c.samples })),
  };
}
