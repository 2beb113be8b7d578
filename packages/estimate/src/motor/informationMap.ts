import type { PreparedRecording } from './prepareRecording.js';
import type { MotorConstantName, MotorExperimentKind } from './types.js';

/** The lumped model's constants (the streamed linear kernel fits these). */
export type LumpedName = Extract<MotorConstantName, 'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b' | 'Tc'>;

/** SI unit of each lumped constant. */
export const UNITS: Record<LumpedName, string> = { R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m' };

/** Which recording would inform each lumped constant (said when none of the given ones does). */
export const WOULD_INFORM: Record<LumpedName, string> = {
  R: 'a locked-rotor step, or a free-run step / PRBS with current',
  L: 'a locked-rotor step sampled faster than L/R, or a PRBS / multisine with current',
  Kt: 'a free-run step, PRBS, multisine or steady-state sweep with speed (apart from Ke: a loaded run with torque)',
  Ke: 'a free-run step, PRBS, multisine or steady-state sweep with speed',
  J: 'a free-run step, PRBS or multisine with speed',
  b: 'a steady-state sweep or a free-run step (or a coast-down once J is known)',
  Tc: 'a coast-down (with J known), a steady-state sweep, or a step / PRBS / multisine with current and speed',
};

/** Which constants a recording informs (before the coast-down rule on J). */
export function informs(rec: PreparedRecording): LumpedName[] {
  const hasI = rec.current !== null;
  switch (rec.kind) {
    case 'locked-rotor': return ['R', 'L'];
    case 'coast-down': return ['b', 'Tc'];
    // A logged staircase (not a table of points) also holds the transients between its levels:
    // with current sampled through them L is informed too (the covariance says how well).
    case 'steady-state': return !rec.table && hasI ? ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] : ['R', 'Kt', 'Ke', 'J', 'b', 'Tc'];
    // With current logged, a driven run informs Tc when the model has it: it acts as a load torque
    // that, unlike b·ω, does not scale with speed (the covariance says when the speed range is too
    // narrow to tell them apart).
    case 'loaded': return ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];
    default: return hasI ? ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] : ['Kt', 'Ke', 'J', 'b'];
  }
}

/** Which constants the model of a recording uses. */
export function uses(kind: MotorExperimentKind, coulomb: boolean): LumpedName[] {
  if (kind === 'locked-rotor') return ['R', 'L'];
  if (kind === 'coast-down') return ['J', 'b', 'Tc'];
  return coulomb ? ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] : ['R', 'L', 'Kt', 'Ke', 'J', 'b'];
}
