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
  const held = new Uint8Array(p);
  for (const c of tested) held[index[c]] = 1;
  return scoreGroups(acc.JtJ, acc.Jtr, p, ssr, acc.rows, held, groups.map((group, gi) => (!usable[gi] ? null : {
    tested: group,
    columns: group.map((c) => index[c]),
    // On its linear scale the step δ moves the constant by δ·scale from zero.
    bounds: group.filter((c) => c === 'Tc' || c === 'c').map((c) => ({ name: c, column: index[c], scale: entries[index[c]]!.scale, nullValue: nullValue[c]!, unit: UNITS[c] ?? '' })),
  })), () => problem.simulations());
}

/** One group of a score test: its constants, their columns, and the constants that get a one-step bound. */
export interface ScoreGroup {
  tested: string[];
  columns: number[];
  /** Constants zero without their effect: value = nullValue + scale·δ, SE = scale·s·√((JᵀJ)⁻¹). */
  bounds: { name: string; column: number; scale: number; nullValue: number; unit: string }[];
}

/**
 * Score statistics of column groups from the normal equations of the extended problem at the
 * fitted model (see `scoreDetailed`, Method): `held` marks every tested column (and any column
 * that is not a parameter at all, such as a zero sink); the fitted model's parameters are the
 * columns not marked. Shared by the detailed test and the lumped one (`scoreLumped`).
 *
 * @param JtJ - P×P row-major normal matrix of the extended problem
 * @param Jtr - its gradient
 * @param P - columns
 * @param ssr - sum of squares at the fitted model
 * @param rows - residual rows
 * @param held - 1 for columns outside the fitted model
 * @param groups - the groups to test (null: not testable, gives null)
 * @param simulations - simulations (or passes) run, read once for the output
 * @returns per group its score, or null where the normal equations are not positive definite
 */
export function scoreGroups(JtJ: Float64Array, Jtr: Float64Array, P: number, ssr: number, rows: number, held: Uint8Array, groups: (ScoreGroup | null)[], simulations: () => number): (ExtensionScore | null)[] {
  let pBase = 0;
  for (let j = 0; j < P; j++) if (held[j] === 0) pBase++;
  if (!Number.isFinite(ssr) || rows <= P) return groups.map(() => null);
  // The fitted model's own directions (every tested column held).
  const without = gaussNewtonStep(JtJ, Jtr, P, held);
  const s2 = ssr / (rows - pBase);
  return groups.map((group) => {
    // A column no residual depends on (friction on a held rotor) has nothing to test.
    if (group === null || without === null || group.columns.some((j) => !(JtJ[j * P + j]! > 0))) return null;
    const q = group.columns.length;
    const mask = Uint8Array.from(held);
    for (const j of group.columns) mask[j] = 0;
    const full = gaussNewtonStep(JtJ, Jtr, P, mask);
    if (full === null) return null;
    const lm = Math.max(full.drop - without.drop, 0);
    const oneStep: ExtensionScore['oneStep'] = {};
    const inv = group.bounds.length > 0 ? inverseDiagonal(JtJ, P, mask) : null;
    for (const b of group.bounds) {
      const d = inv?.[b.column];
      const se = d !== undefined && d > 0 ? b.scale * Math.sqrt(d * s2) : NaN;
      oneStep[b.name] = { value: b.nullValue + b.scale * full.step[b.column]!, standardError: se, unit: b.unit };
    }
    return { tested: group.tested, statistic: lm / q / s2, df1: q, df2: rows - pBase - q, ssr, rows, parameters: pBase, oneStep, simulations: simulations() };
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
