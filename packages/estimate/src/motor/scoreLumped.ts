import { createNormalEquations } from '../solver/createNormalEquations.js';
import { scoreGroups } from '../detailed/scoreDetailed.js';
import type { ExtensionScore, ScoreGroup } from '../detailed/scoreDetailed.js';
import { UNITS } from '../detailed/fitDetailed.js';
import { createMotorProblem } from './createMotorProblem.js';
import type { ParameterLayout } from './createMotorProblem.js';
import type { PreparedRecording } from './prepareRecording.js';

/** Copper constant plus reference temperature of the heating model's resistance law [°C] (copper law, FACTS.md §3: k = 234.5 °C, R referred to 20 °C). */
const COPPER = 234.5 + 20;

/** The groups the lumped score test can take. */
export type LumpedScoreGroup = 'Tc' | 'c' | 'heating';

/**
 * Rao's score tests of Coulomb friction, drag and winding heating at a lumped fit without
 * Coulomb friction, from one pass of the streamed linear kernel: the fit's own problem (same
 * rows, weights and nuisance parameters, every coefficient free) with four effect columns added
 * (`EffectColumns`: the linear model's responses to Tc·sgn ω, c·ω|ω| and a heating rise of
 * thermal time constant τ, its size and its course). The statistic is that of `scoreDetailed`
 * (`scoreGroups`), which takes the same columns from the hybrid simulator by secants; here they
 * are the model's first-order responses, exact for the linear model with the inputs held over
 * each interval, and computed in one pass instead of one simulation per constant.
 *
 * A score statistic is a valid test for any fixed regressor columns: a column that is a little
 * off the true effect direction costs power, not size (the false-alarm rate under the null stays
 * at α). The one-step values of Tc and c are the linearised estimates in SI with their standard
 * errors, as in `scoreDetailed`.
 *
 * ## References
 * C. R. Rao (1948), Proc. Camb. Phil. Soc. 44(1), 50–57, doi:10.1017/S0305004100023987.
 * D. M. Bates, D. G. Watts (1988), Nonlinear Regression Analysis and Its Applications, Wiley, §3.5.
 *
 * @param recs - prepared recordings of the fit (noise levels as fitted), none a coast-down
 * @param layout - the fit's parameter layout (no Tc entry)
 * @param theta - the fit's full θ
 * @param groups - the groups to test
 * @param tau - thermal time constant of the heating columns [s]
 * @returns per group its score, or null where it cannot be computed
 */
export function scoreLumped(recs: PreparedRecording[], layout: ParameterLayout, theta: ArrayLike<number>, groups: LumpedScoreGroup[], tau: number): (ExtensionScore | null)[] {
  if (layout.iTc >= 0 || layout.fixed.Tc !== 0) throw new RangeError('scoreLumped: the fitted model must not have Coulomb friction');
  const problem = createMotorProblem(recs, layout, theta, null, { tau, copper: COPPER });
  const p = problem.parameterCount;
  // The fit's p entries, then the four effect columns.
  const P = p + 4;
  const acc = createNormalEquations(P);
  const ssr = problem.evaluate(problem.toFree(theta), true, acc);
  const held = new Uint8Array(P);
  held.fill(1, p);
  const column: Record<LumpedScoreGroup, number[]> = { Tc: [p], c: [p + 1], heating: [p + 2, p + 3] };
  const spec = groups.map((g): ScoreGroup => ({
    tested: g === 'heating' ? ['Rth', 'Cth'] : [g],
    columns: column[g],
    bounds: g === 'heating' ? [] : [{ name: g, column: column[g][0]!, scale: 1, nullValue: 0, unit: UNITS[g] ?? '' }],
  }));
  return scoreGroups(acc.JtJ, acc.Jtr, P, ssr, acc.rows, held, spec, () => 1);
}
