import { zeroPhaseLowPass } from '@motorprint/estimate';
import { compareNestedModels } from './compareNestedModels.js';
import { fitLinearModel } from './fitLinearModel.js';
import { checkRecording, noiseOf, sig } from './internal.js';
import { mechanicalRegression } from './mechanicalRegression.js';
import type { MechanicalRegression, MechanicalRegressionInput } from './mechanicalRegression.js';
import { steadyLineTest } from './steadyLineTest.js';
import type { Finding, ModelComparison, RecordingKind, RecordingLike } from './types.js';

/**
 * Looks for friction the linear model leaves out: Coulomb friction (`coulomb-friction`) and drag
 * growing with the square of speed (`speed-squared-drag`), with the model comparisons behind
 * each verdict.
 *
 * ## Method
 * - Steady-state (or unknown kind) recordings with a voltage channel and ≥ 4 settled plateaus:
 *   `steadyLineTest` — curvature and intercept of the steady current–speed line from non-overlapping
 *   plateau-window means (independent observations with their own SEs, weighted least squares).
 *   Drag fires when the curvature is positive at `alpha`; Coulomb when the intercept is (given the
 *   curvature when drag fired).
 * - Other driven recordings with current (or torque) and speed: `mechanicalRegression` — current
 *   against filtered acceleration, speed and sgn(speed); Coulomb fires when the sgn term is
 *   preferred (F-test at `alpha` and lower AIC) with a positive coefficient (i = (b·ω + Tc)/Kt has
 *   intercept Tc/Kt > 0). No drag verdict here: on clean invented 2 kHz PRBS recordings the
 *   ω·|ω| term came out "significant" on 7–8 of 30 seeds. The residual lag-1 autocorrelation there
 *   is negative (≈ −0.4), and a Newey–West HAC test fired more often, not less; the excess is a
 *   systematic misfit of the sampled current spikes (τe ≈ h), so only settled plateaus inform drag.
 * - Coast-down (`kind: 'coast-down'`): from the moment the filtered speed leaves its running
 *   plateau, the deceleration is regressed on [ω] and [ω, sgn ω]; a linear tail (deceleration that
 *   does not vanish as ω → 0, i.e. −Tc/J) fires Coulomb.
 * Fewer than 100 regression rows: no verdict (a comparison on so little data is not reported).
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., §6.1 (extra sum of squares).
 * B. Armstrong-Hélouvry, P. Dupont, C. Canudas de Wit (1994), "A survey of models, analysis tools
 * and compensation methods for the control of machines with friction", Automatica 30(7):1083–1138,
 * doi:10.1016/0005-1098(94)90209-7.
 *
 * @param recording - `{ time [s], channels }` in SI
 * @param options - `kind` of experiment (coast-down switches the method), `alpha` @default 0.01
 * @returns the findings that fired and the comparisons computed
 * @throws TypeError / RangeError for a malformed recording (names the channel and sample)
 * @example
 * detectFriction(sweepWithCoulomb, { kind: 'steady-state' }).findings[0].code; // => 'coulomb-friction'
 */
export function detectFriction(
  recording: RecordingLike,
  options: { kind?: RecordingKind; alpha?: number } = {},
): { findings: Finding[]; comparisons: ModelComparison[] } {
  return frictionWith(recording, options, mechanicalRegression);
}

/**
 * `detectFriction` with the regression run by `regress` (`scanRecording` passes one that shares
 * its result with `detectStiction`). Not exported from the package.
 */
export function frictionWith(
  recording: RecordingLike,
  options: { kind?: RecordingKind; alpha?: number },
  regress: (input: MechanicalRegressionInput) => MechanicalRegression,
): { findings: Finding[]; comparisons: ModelComparison[] } {
  const fn = 'detectFriction';
  const { n, dt } = checkRecording(fn, recording);
  const alpha = options.alpha ?? 0.01;
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: options.alpha must be in (0, 1) (got ${alpha})`);
  const { current, torque, speed } = recording.channels;
  const findings: Finding[] = [];
  if (!speed || n < 400) return { findings, comparisons: [] };
  if (options.kind === 'coast-down') {
    const fc = 1 / (40 * dt);
    const w = zeroPhaseLowPass(speed, dt, fc);
    const sigmaF = noiseOf(speed) * Math.sqrt(2 * fc * dt);
    const head = Array.from(w.subarray(0, Math.max(10, Math.floor(n / 20)))).sort((a, b) => a - b);
    const plateau = head[head.length >> 1]!;
    const drop = Math.max(0.01 * Math.abs(plateau), 6 * sigmaF);
    let start = -1;
    for (let k = 0; k < n; k++) if (Math.abs(w[k]!) < Math.abs(plateau) - drop) { start = k; break; }
    if (start < 0) return { findings, comparisons: [] };
    const dec = 20, trim = 5;
    const dead = 4 * sigmaF + 1e-3 * Math.abs(plateau);
    const s = zeroPhaseLowPass(Float64Array.from(w, (v) => (v > dead ? 1 : v < -dead ? -1 : 0)), dt, fc);
    const rows: number[] = [];
    for (let k = start + trim * dec; k < n - trim * dec; k += dec) rows.push(k);
    if (rows.length < 100) return { findings, comparisons: [] };
    const acc = Float64Array.from(rows, (k) => (w[k + 1]! - w[k - 1]!) / (2 * dt));
    const cw = Float64Array.from(rows, (k) => w[k]!);
    const cs = Float64Array.from(rows, (k) => s[k]!);
    const viscous = fitLinearModel([cw], acc);
    const full = fitLinearModel([cw, cs], acc);
    const cmp = compareNestedModels('coast-down: viscous decay vs viscous + Coulomb tail',
      { name: 'viscous', ssr: viscous.ssr, parameters: 1 }, { name: 'viscous + Coulomb', ssr: full.ssr, parameters: 2 }, rows.length, alpha);
    const tail = -full.coefficients[1]! * Math.sign(plateau);
    if (cmp.preferred === 'full' && tail > 0) {
      findings.push({
        code: 'coulomb-friction', severity: 'warning', title: 'Coast-down has a linear tail: Coulomb friction',
        evidence: { 'Tc/J [rad/s²]': sig(tail), 'SE [rad/s²]': sig(full.standardErrors[1]!), 'F p-value': sig(cmp.fPValue), 'ΔAIC': sig(cmp.aic[1] - cmp.aic[0]), rows: rows.length },
        advice: 'The deceleration does not vanish as the speed falls: fit Tc (Coulomb friction) as well as b, or the viscous b will be biased high.',
      });
    }
    return { findings, comparisons: [cmp] };
  }
  const drive = current ?? torque;
  if (!drive) return { findings, comparisons: [] };
  const unit = current ? 'A' : 'N·m';
  let reg;
  try {
    reg = regress({ sampleInterval: dt, drive, speed, alpha });
  } catch {
    return { findings, comparisons: [] };
  }
  if (reg.samples < 100 || reg.movingFraction < 0.2) return { findings, comparisons: [] };
  const coulombFinding = (tcKt: number, se: number, p: number, how: string, rows: number): Finding => ({
    code: 'coulomb-friction', severity: 'warning', title: 'Current needed beyond viscous friction: Coulomb friction',
    evidence: { [`Tc/Kt [${unit}]`]: sig(tcKt), [`SE [${unit}]`]: sig(se), 'p-value': sig(p), test: how, rows },
    advice: 'The steady current–speed relation has an intercept: add Coulomb friction Tc to the model, otherwise b absorbs it and varies with the speed range.',
  });
  const { voltage } = recording.channels;
  const steady = voltage && (options.kind === 'steady-state' || options.kind === 'unknown' || options.kind === undefined)
    ? steadyLineTest(dt, voltage, drive, speed, reg.coulomb.coefficients[0]!)
    : null;
  if (steady) {
    // Plateau means: curvature and intercept of the steady current–speed line.
    const dragFires = steady.curvature.pValue < alpha && steady.curvature.estimate > 0;
    const c = dragFires ? steady.interceptGivenCurvature : steady.intercept;
    if (c.pValue < alpha && c.estimate > 0) findings.push(coulombFinding(c.estimate, c.se, c.pValue, `intercept of the steady line, ${steady.plateaus} plateau means${dragFires ? ', given curvature' : ''}`, 2 * steady.plateaus));
    if (dragFires) {
      findings.push({
        code: 'speed-squared-drag', severity: 'warning', title: 'Friction grows faster than linearly with speed',
        evidence: { [`cd/Kt [${unit}·s²/rad²]`]: sig(steady.curvature.estimate), 'SE': sig(steady.curvature.se), 'p-value': sig(steady.curvature.pValue), test: `curvature of the steady line, ${steady.plateaus} plateau means`, rows: 2 * steady.plateaus },
        advice: 'The current–speed line curves upward (fan or fluid drag): a single viscous b fits only one speed range; quote b with the speed range or model a cd·ω|ω| term.',
      });
    }
    return { findings, comparisons: [] };
  }
  // Dynamic recordings: Coulomb from the equation-error regression; no drag verdict (see Method).
  const cCmp = reg.coulombComparison;
  if (cCmp.preferred === 'full' && reg.coulomb.coefficients[2]! > 0) {
    findings.push(coulombFinding(reg.coulomb.coefficients[2]!, reg.coulomb.standardErrors[2]!, cCmp.fPValue, 'nested F-test and AIC, equation-error regression', reg.samples));
  }
  return { findings, comparisons: [cCmp] };
}
