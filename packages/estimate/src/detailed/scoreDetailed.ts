import { createNormalEquations } from '../solver/createNormalEquations.js';
import { gaussNewtonStep } from '../solver/gaussNewtonStep.js';
import type { PreparedRecording } from '../motor/prepareRecording.js';
import { createDetailedProblem } from './createDetailedProblem.js';
import type { DetailedConstant } from './createDetailedProblem.js';
import { layoutDetailed, UNITS } from './fitDetailed.js';
import type { DetailedFitOptions } from './fitDetailed.js';

/** Rao's score test of effect constants added to a fitted model (see `scoreMotorExtensions`). */
export interface ExtensionScore {
  /** Effect constants tested (their θ entries added to the fitted model's). */
  tested: string[];
  /** F form of the score statistic: (LM/q)/s², LM the sum-of-squares drop one Gauss–Newton step from the fitted model promises. */
  statistic: number;
  /** Numerator degrees of freedom q (constants tested). */
  df1: number;
  /** Denominator degrees of freedom (rows − parameters of the extended model). */
  df2: number;
  /** Whitened sum of squares at the fitted model (the effects at a negligible size). */
  ssr: number;
  /** Residual rows. */
  rows: number;
  /** Parameters of the fitted model (without the tested constants). */
  parameters: number;
  /**
   * Linearised estimate of each tested constant one Gauss–Newton step from the fitted model, with
   * its standard error s·√((JᵀJ)⁻¹) [SI]: where the score test finds nothing, value + 1.96·SE is
   * a 95 % upper bound. Only for constants that are zero without their effect (Tc, c).
   */
  oneStep: Record<string, { value: number; standardError: number; unit: string }>;
  /** Simulations run. */
  simulations: number;
}

/**
 * Thermal resistance of the heating test at the null, relative to its start (a 10 K rise): the
 * residuals are the fitted model's to about 1e-4 of the start's effect (its sum of squares moves
 * by ~1e-8 of that effect's). Chosen on the bench (1e-3 already moved a 1e5-sample PRBS's SSR by
 * 0.3); common practice, no source.
 */
const HEAT_FRACTION = 1e-4;
/**
 * Secant step of Tc and c from zero, in units of their starts: a friction event located a hair
 * differently (and, with heating in the model, the temperature update split at it) moves the
 * residuals by a little that does not shrink with the step, so the √ε step of the solver would
 * turn it into a slope; 1e-3 of the start keeps the secant within the effect's linear range.
 * Chosen on the bench (1e-2 … 1e-5 agree to 0.5 % without heating; 1e-5 is 0.5 % off with it).
 * Common practice, no source.
 */
const EFFECT_STEP = 1e-3;
/** Relative secant step of the heating test's log-scaled Rth and Cth (the default √ε step of a 1e-4-sized effect is near round-off). Common practice, no source. */
const HEAT_STEP = 1e-2;

/**
 * Score tests of effect constants at a fitted model: the detailed problem of the model extended by
 * all of them is built at the fitted model's θ with the new effects at a negligible size, and one
 * Jacobian (p + 1 simulations) tells, for each group, how much a Gauss–Newton step could lower the
 * sum of squares by moving that group's constants with the fitted model's.
 *
 * ## Method
 * With g = Jᵀr and A = JᵀJ of the extended problem at θ₀ (the fitted model; Tc and c at zero on
 * a linear scale, heating at 1e-4 of its start), LM = gᵀA⁻¹g − g₀ᵀA₀₀⁻¹g₀ (the drop the new directions add to what the
 * fitted model's own directions still promise, so a fit stopped a hair from its optimum adds
 * nothing), and F = (LM/q)/s² with s² = SSR/(rows − p₀). Column scaling does not change LM, so
 * the scale of a tested column is free. The tested columns are secants (`EFFECT_STEP`,
 * `HEAT_STEP`): the solver's √ε step of an effect at zero is at the level of the simulator's event
 * location. A heating model is tested with Rth small and Cth = τ/Rth, τ the start's time constant (a
 * fixed thermal time constant; both columns enter: the rise's size and its time course).
 * Asymptotically equivalent to the likelihood-ratio and Wald tests under the null; a screen, not
 * a replacement for fitting an effect the test finds.
 *
 * ## References
 * C. R. Rao (1948), "Large sample tests of statistical hypotheses concerning several parameters
 * with applications to problems of estimation", Proc. Camb. Phil. Soc. 44(1), 50–57,
 * doi:10.1017/S0305004100023987. D. M. Bates, D. G. Watts (1988), Nonlinear Regression Analysis
 * and Its Applications, Wiley, §3.5 (its F form for nested nonlinear least squares).
 *
 * @param recs - prepared recordings (noise levels set)
 * @param opts - the extended model's options, warm-started from the fitted model
 * @param groups - effect constants to test, one group per extension (Tc; c; Rth + Cth), all from one Jacobian
 * @returns per group its score, or null where the layout lacks its constants or the problem cannot be evaluated
 */
export function scoreDetailed(recs: PreparedRecording[], opts: DetailedFitOptions, groups: DetailedConstant[][]): (ExtensionScore | null)[] {
  const { entries, theta0, index, setup } = layoutDetailed(recs, opts);
  const usable = groups.map((g) => g.length > 0 && g.every((c) => index[c] >= 0));
  if (!usable.some(Boolean)) return groups.map(() => null);
  // Effects that vanish at zero (Tc, c) are tested at zero, on a linear scale whose unit is the
  // effect's start, by a secant of EFFECT_STEP. Heating is tested at a small thermal resistance
  // on its log scale with the start's time constant held (Cth = τ/Rth; its model divides by
  // Rth), by secants of HEAT_STEP.
  const nullValue: Partial<Record<DetailedConstant, number>> = {};
  const tested = new Set(groups.flat().filter((c) => index[c] >= 0));
  for (const c of tested) {
    const j = index[c];
    const start = Math.exp(theta0[j]!);
    if (c === 'Tc' || c === 'c') {
      entries[j] = { ...entries[j]!, name: c, transform: 'linear', scale: start, step: EFFECT_STEP };
      theta0[j] = 0;
      nullValue[c] = 0;
      continue;
    }
    const v = c === 'Cth' ? start / HEAT_FRACTION : start * HEAT_FRACTION;
    theta0[j] = Math.log(v);
    nullValue[c] = v;
    entries[j] = { ...entries[j]!, step: HEAT_STEP };
  }
  const p = entries.length;
  const problem = createDetailedProblem(setup);
  const acc = createNormalEquations(p);
  const ssr = problem.evaluate(Float64Array.from(theta0), true, acc);
  const rows = acc.rows;
  const pBase = p - tested.size;
  if (!Number.isFinite(ssr) || rows <= p) return groups.map(() => null);
  // The fitted model's own directions (every tested column held).
  const held = new Uint8Array(p);
  for (const c of tested) held[index[c]] = 1;
  const without = gaussNewtonStep(acc.JtJ, acc.Jtr, p, held);
  const s2 = ssr / (rows - pBase);
  return groups.map((group, gi) => {
    if (!usable[gi] || without === null) return null;
    const q = group.length;
    const mask = Uint8Array.from(held);
    for (const c of group) mask[index[c]] = 0;
    const full = gaussNewtonStep(acc.JtJ, acc.Jtr, p, mask);
    if (full === null) return null;
    const lm = Math.max(full.drop - without.drop, 0);
    const oneStep: ExtensionScore['oneStep'] = {};
    const inv = inverseDiagonal(acc.JtJ, p, mask);
    for (const c of group) {
      if (c !== 'Tc' && c !== 'c') continue;
      const j = index[c];
      // On its linear scale the step δ moves the constant by δ·scale from zero.
      const u = entries[j]!.scale;
      const d = inv?.[j];
      const se = d !== undefined && d > 0 ? u * Math.sqrt(d * s2) : NaN;
      oneStep[c] = { value: nullValue[c]! + u * full.step[j]!, standardError: se, unit: UNITS[c] ?? '' };
    }
    return { tested: group, statistic: lm / q / s2, df1: q, df2: rows - pBase - q, ssr, rows, parameters: pBase, oneStep, simulations: problem.simulations() };
  });
}

/** Diagonal of (JᵀJ)⁻¹ over the entries not marked in `drop` (NaN elsewhere): the step for Jᵀr = −e_j is (JᵀJ)⁻¹e_j. */
function inverseDiagonal(JtJ: Float64Array, p: number, drop: Uint8Array): Float64Array | null {
  const out = new Float64Array(p).fill(NaN);
  for (let j = 0; j < p; j++) {
    if (drop[j]) continue;
    const e = new Float64Array(p);
    e[j] = -1;
    const x = gaussNewtonStep(JtJ, e, p, drop);
    if (x === null) return null;
    out[j] = x.step[j]!;
  }
  return out;
}
