import type { StopReason } from '../solver/types.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { resetNormalEquations } from '../solver/resetNormalEquations.js';
import { solveLeastSquares } from '../solver/solveLeastSquares.js';
import { checkFitMotorOptions } from './checkFitMotorOptions.js';
import { channelSums } from './channelSums.js';
import { createMotorProblem } from './createMotorProblem.js';
import type { Constants, ParameterLayout, RecordingSlots, ResidualSeries } from './createMotorProblem.js';
import { guessConstants } from './guessConstants.js';
import { prepareRecording } from './prepareRecording.js';
import { fitDetailed } from '../detailed/fitDetailed.js';
import { scoreDetailed } from '../detailed/scoreDetailed.js';
import type { ExtensionScore } from '../detailed/scoreDetailed.js';
import { DETAILED_CONSTANTS as DETAILED_NAMES } from '../detailed/createDetailedProblem.js';
import type { DetailedConstant } from '../detailed/createDetailedProblem.js';
import type { ModelExtensions } from '../detailed/types.js';
import type { PreparedRecording } from './prepareRecording.js';
import { addSupplyTerms } from './addSupplyTerms.js';
import { effectStarts, needsDetailedModel, runningTorque, thermalTimeConstantStart } from './detailedStarts.js';
import { informs, UNITS, uses, WOULD_INFORM } from './informationMap.js';
import type { LumpedName } from './informationMap.js';
import { polishJointly } from './polishJointly.js';
import { scoreLumped } from './scoreLumped.js';
import type { LumpedScoreGroup } from './scoreLumped.js';
import { windowOf } from './windowOf.js';
import { lumpedStatistics } from './lumpedStatistics.js';
import type {
  ChannelFit, FitMotorOptions, MotorConstantName, NoiseLevel, MotorFit, MotorRecordingInput,
  ParameterEstimate, RecordingReport, StartAttempt, UninformedConstant,
} from './types.js';

/**
 * Total samples above which the starts are run on windows first, and the window: a quarter of
 * each recording, at least 16384 samples (common practice, no source; chosen on the bench: from
 * the optimum on a quarter of the record the joint polish lands in one step, at 1e5 and at 1e6
 * samples, where a 65536-sample window at 1e6 needed a second whole-record Jacobian pass).
 */
const PREFIT_THRESHOLD = 65536;
const PREFIT_MIN_WINDOW = 16384;

const DEFAULTS: Constants = { R: 1, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 1e-5, b: 1e-6, Tc: 0 };

/**
 * Fits the DC-motor constants R, L, Kt/Ke, J, b (and Coulomb friction Tc where coast-down or
 * steady-state data inform it) jointly to one or more bench recordings, by weighted least
 * squares with an analytic, streamed Jacobian.
 *
 * ## Method
 * 1. Each recording is checked, its kind declared or guessed (`classifyRecording`), the noise
 *    σ of every channel estimated from the data (`estimateNoiseLevel`), and the measured voltage
 *    rebuilt into the commanded input (`rebuildCommand`) so that its noise does not bias the
 *    constants (errors in variables).
 * 2. Starting values come from closed-form relations (`guessConstants`), unless given in
 *    `options.initial`; `options.fix` pins constants.
 * 3. θ = ln p for the positive constants (equal scaling, positivity), Tc on a linear scale;
 *    Kt = Ke is imposed (SI) unless a loaded run with a torque channel is present. Nuisance
 *    parameter: the initial speed of each coast-down.
 * 4. Residuals (model − measured)/σ per channel and sample; the Jacobian comes from the model's
 *    forward sensitivities by the chain rule and is accumulated chunk by chunk into JᵀJ and Jᵀr
 *    (`createMotorProblem`), minimised by the streamed Levenberg–Marquardt `solveLeastSquares`.
 * 5. Covariance s²(JᵀJ)⁺ at the optimum (`covarianceFromNormalMatrix`, s² = SSR/(n − p)),
 *    standard errors by the delta method, 95 % intervals Student-t on the fitted (log) scale.
 * A constant that no recording informs is not returned as a number; it is listed in
 * `notInformed` with the experiment that would inform it.
 *
 * ## References
 * D. W. Marquardt (1963), SIAM J. Appl. Math. 11(2), 431–441, doi:10.1137/0111030.
 * L. Ljung (1999), System Identification: Theory for the User, 2nd ed., Prentice Hall, §7 and §9
 * (prediction-error fit and its asymptotic covariance).
 *
 * @param recordings - `{ recording, kind?, name? }` items; recording = `{ time [s], channels }` in SI
 * @param options - pinned constants, starting values, voltage handling, Coulomb friction, solver limits
 * @returns the {@link MotorFit}: constants with standard errors and 95 % intervals, per-recording
 *   reports, JᵀJ, solver counts, `converged` and `stopReason`
 * @throws TypeError when an argument or channel has the wrong type or shape (the message names it)
 * @throws RangeError when a number is out of its domain (non-finite samples, non-increasing time, …)
 * @example
 * const fit = fitMotor([{ recording: lockedRotorRun, kind: 'locked-rotor' }, { recording: stepRun }]);
 * fit.parameters.R; // => { value: 2.001, unit: 'Ω', standardError: 0.002, interval95: [1.997, 2.005], … }
 */
export function fitMotor(recordings: MotorRecordingInput[], options?: FitMotorOptions): MotorFit {
  if (!Array.isArray(recordings)) throw new TypeError('fitMotor: recordings must be an array of { recording, kind?, name? }');
  if (recordings.length === 0) throw new RangeError('fitMotor: recordings must hold at least one recording (got 0)');
  const opts = checkFitMotorOptions(options);
  const recs = recordings.map((item, i) => prepareRecording(item, i, opts.voltage));
  applyGivenNoise(recs, opts);
  let fit = fitPrepared(recs, opts);
  addSupplyTerms(fit, recordings, recs);
  // Re-weight once by the residual noise: the data-only σ of a fast-moving or quantised channel
  // can be far from the noise the fit leaves (the detailed path does this itself).
  if (opts.reweight && fit.converged && !needsDetailedModel(recs, { ...opts.extensions, coulomb: fit.variant.coulomb })) {
    let moved = false;
    fit.recordings.forEach((rep, i) => {
      const rec = recs[i]!;
      for (const ch of rep.channels) {
        const noise = ch.channel === 'current' ? rec.currentNoise : ch.channel === 'speed' ? rec.speedNoise : null;
        if (noise === null || !(ch.rms > 0) || ch.samples < 32) continue;
        if (Math.abs(ch.rms / noise.sigma - 1) > 0.2) {
          moved = true;
          const next: NoiseLevel = { sigma: ch.rms, method: 'residuals', quantum: noise.quantum };
          if (ch.channel === 'current') rec.currentNoise = next; else rec.speedNoise = next;
        }
      }
    });
    if (moved) {
      const again = fitPrepared(recs, opts);
      if (again.converged) { fit = again; addSupplyTerms(fit, recordings, recs); }
    }
  }
  return fit;
}

/** The noise SDs the caller gave (`options.noise`) replace the data's own estimates. */
function applyGivenNoise(recs: PreparedRecording[], opts: ReturnType<typeof checkFitMotorOptions>): void {
  opts.noise.forEach((e, i) => {
    const r = recs[i];
    if (e === null || e === undefined || r === undefined) return;
    const given = (sigma: number): NoiseLevel => ({ sigma, method: 'given', quantum: null });
    if (e.current !== undefined && r.currentNoise !== null) r.currentNoise = given(e.current);
    const sp = r.encoder !== null ? e.angle : e.speed;
    if (sp !== undefined && r.speedNoise !== null) r.speedNoise = { ...given(sp), quantum: r.speedNoise.quantum };
    if (e.voltage !== undefined && r.terminalNoise !== null) r.terminalNoise = given(e.voltage);
  });
}

/**
 * The problem behind each fit of the streamed linear kernel (its layout and full θ), so that a
 * score test at that fit (`scoreMotorExtensions`) takes its rows, weights and nuisance
 * parameters exactly as the fit had them. Weak: it lives as long as the fit object.
 */
const LUMPED_FITS = new WeakMap<MotorFit, { layout: ParameterLayout; theta: Float64Array }>();

/** Effect constants each extension adds that a score test can move from zero. */
const SCORED: Partial<Record<keyof ModelExtensions, DetailedConstant[]>> = { coulomb: ['Tc'], drag: ['c'], heating: ['Rth', 'Cth'] };

/**
 * Rao's score tests of extensions of the detailed model at a fitted model, without fitting them:
 * for each, how much the recordings' sum of squares could drop if its constants moved from zero
 * (`scoreDetailed`), all from one Jacobian of the model extended by every one of them at the
 * fitted model's constants, with the same recordings, noise SDs and options as the fit. At a
 * fit of the streamed linear kernel (no Coulomb friction in it; `options.warmStart` the object
 * `fitMotor` returned) the columns are the kernel's first-order responses to the effects, from one
 * pass (`scoreLumped`); otherwise the hybrid simulator's secants (`scoreDetailed`). A screen
 * before fitting extensions the data may not support. Coulomb friction, drag and winding heating
 * can be tested; drive limits (which vanish at infinity, not at zero) and stiction (above Coulomb
 * friction) cannot.
 *
 * @param recordings - the recordings of the fit
 * @param options - the fit's options with `warmStart` (the fitted model) and `extensions` (the fitted model's)
 * @param added - the extensions to test, each on its own
 * @returns per extension its score, or null where it cannot be computed (a loaded run with torque, an extension no recording uses, drive limits, stiction)
 * @throws TypeError / RangeError as `fitMotor`
 * @example
 * const s = scoreMotorExtensions(runs, { warmStart: fit, noise }, ['coulomb', 'drag']);
 * s.drag?.statistic; // => about 1 when the recordings show no drag
 */
export function scoreMotorExtensions(recordings: MotorRecordingInput[], options: FitMotorOptions & { warmStart: MotorFit }, added: (keyof ModelExtensions)[]): Partial<Record<keyof ModelExtensions, ExtensionScore | null>> {
  const out: Partial<Record<keyof ModelExtensions, ExtensionScore | null>> = {};
  for (const e of added) out[e] = null;
  const opts = checkFitMotorOptions({ ...options, reweight: false });
  const recs = recordings.map((item, i) => prepareRecording(item, i, opts.voltage));
  applyGivenNoise(recs, opts);
  if (recs.some((r) => r.kind === 'loaded' && r.loadTorque !== 0)) return out;
  const coulomb = opts.coulomb === 'auto' ? recs.some((r) => r.kind === 'coast-down' || r.kind === 'steady-state') : opts.coulomb;
  const base = { ...opts.extensions, coulomb: coulomb || opts.extensions.coulomb === true };
  if (base.stiction) return out;
  const testable = added.filter((e) => SCORED[e] !== undefined && !base[e] && !SCORED[e]!.some((c) => opts.fix[c] !== undefined));
  if (testable.length === 0) return out;
  // At a fit of the streamed linear kernel (no Coulomb friction in it): one pass of that kernel
  // with the effects' first-order columns (`scoreLumped`).
  const lumped = LUMPED_FITS.get(options.warmStart);
  if (lumped !== undefined && !base.coulomb && !needsDetailedModel(recs, base) && sameLayout(recs, lumped.layout)) {
    const groups = testable.map((e) => (e === 'coulomb' ? 'Tc' : e === 'drag' ? 'c' : 'heating') as LumpedScoreGroup);
    // The heating columns' thermal time constant: the heating start's.
    const scores = scoreLumped(recs, lumped.layout, lumped.theta, groups, thermalTimeConstantStart(recs));
    testable.forEach((e, i) => { out[e] = scores[i] ?? null; });
    return out;
  }
  const ext: ModelExtensions = { ...base };
  for (const e of testable) ext[e] = true;
  const { fixedD, start, startSource, warm } = detailedInputs(recs, opts, ext);
  // A lumped constant the fitted model held (R of steady points alone, say) stays held: the test
  // asks about the new effect at the fitted model, not about directions that model did not fit.
  const fitted = new Set(options.warmStart.fittedNames);
  for (const c of ['R', 'L', 'Kt', 'J', 'b'] as const) {
    if (fixedD[c] === undefined && start[c] !== undefined && !fitted.has(`ln ${c === 'Kt' ? 'K' : c}`)) fixedD[c] = start[c];
  }
  const scores = scoreDetailed(recs, { extensions: ext, fix: fixedD, start, startSource, ambient: opts.ambientTemperature, solver: opts.solver, keepResiduals: false, reweight: false, warm }, testable.map((e) => SCORED[e]!));
  testable.forEach((e, i) => { out[e] = scores[i] ?? null; });
  return out;
}

/** Whether prepared recordings have the nuisance slots of a lumped layout (same levels and sines). */
function sameLayout(recs: PreparedRecording[], layout: ParameterLayout): boolean {
  return recs.length === layout.recordings.length && recs.every((r, i) => {
    const sl = layout.recordings[i]!;
    return r.kind !== 'coast-down' && (r.levels?.classes.length ?? 0) === sl.level.length && (r.sines?.coefficients.length ?? 0) === sl.sine.length;
  });
}

/** The fit of prepared recordings (see `fitMotor`). */
function fitPrepared(recs: PreparedRecording[], opts: ReturnType<typeof checkFitMotorOptions>, engine: 'auto' | 'linear' = 'auto'): MotorFit {

  const coulomb = opts.coulomb === 'auto' ? recs.some((r) => r.kind === 'coast-down' || r.kind === 'steady-state') : opts.coulomb;
  const separate = recs.some((r) => r.kind === 'loaded' && r.loadTorque !== 0);
  const ext = { ...opts.extensions, coulomb: coulomb || opts.extensions.coulomb === true };
  if (!separate && engine === 'auto' && needsDetailedModel(recs, ext)) {
    const { fixedD, start, startSource, autoStart, warm, warmReset, nearZero } = detailedInputs(recs, opts, ext);
    const run = (s0: typeof start, src: typeof startSource): MotorFit => fitDetailed(recs, { extensions: ext, fix: fixedD, start: s0, startSource: src, ambient: opts.ambientTemperature, solver: opts.solver, keepResiduals: opts.keepResiduals, reweight: opts.reweight, warm, ...(Object.keys(opts.initial).length > 0 ? { autoStart } : {}) });
    const fresh = run(start, startSource);
    if (warmReset.size === 0) return fresh;
    // The near-zero basin may be the right one after all (the new effect may take the role the
    // vanished constant would have had): both are tried, the lower sum of squares kept.
    const stay = run({ ...start, ...nearZero }, { ...startSource, ...Object.fromEntries(Object.keys(nearZero).map((k) => [k, 'the previous fit (warm start, near zero)'])) });
    const better = (a: MotorFit, b: MotorFit): MotorFit => (a.converged !== b.converged ? (a.converged ? a : b) : a.ssr <= b.ssr ? a : b);
    return stay.rows === fresh.rows ? better(fresh, stay) : fresh;
  }
  const names: LumpedName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];
  const fixed: Partial<Record<LumpedName, number>> = {};
  for (const c of ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] as const) if (opts.fix[c] !== undefined) fixed[c] = opts.fix[c];
  if (!separate) {
    const k = fixed.Kt ?? fixed.Ke;
    if (k !== undefined) { fixed.Kt = k; fixed.Ke = k; }
  }
  if (!coulomb && fixed.Tc === undefined) fixed.Tc = 0;

  // Who informs what; who uses what.
  const informedBy: Record<LumpedName, string[]> = { R: [], L: [], Kt: [], Ke: [], J: [], b: [], Tc: [] };
  const used = new Set<LumpedName>();
  for (const r of recs) {
    for (const c of informs(r)) informedBy[c].push(r.name);
    for (const c of uses(r.kind, coulomb)) used.add(c);
  }
  const jKnown = fixed.J !== undefined || recs.some((r) => r.kind !== 'coast-down' && r.kind !== 'locked-rotor' && r.speed !== null);
  const notInformed: UninformedConstant[] = [];
  for (const c of names) {
    if (fixed[c] !== undefined) continue;
    if (!coulomb && c === 'Tc') continue;
    if (!used.has(c)) {
      notInformed.push({ name: c, reason: 'no given recording involves it', wouldInform: WOULD_INFORM[c] });
    } else if (informedBy[c].length === 0) {
      notInformed.push({ name: c, reason: 'the model needs it but no given recording pins it down', wouldInform: WOULD_INFORM[c] });
    } else if ((c === 'b' || c === 'Tc' || c === 'J') && !jKnown && informedBy[c].every((n) => recs.find((r) => r.name === n)?.kind === 'coast-down')) {
      notInformed.push({ name: c, reason: 'a coast-down informs only b/J and Tc/J; J is neither informed by another recording nor pinned to a known value', wouldInform: WOULD_INFORM.J });
    }
  }
  const guesses = guessConstants(recs, fixed);
  const start: Record<string, { value: number; source: string }> = {};
  const value0: Constants = { ...DEFAULTS };
  for (const c of names) {
    const v = opts.initial[c] ?? guesses[c]?.value ?? DEFAULTS[c];
    const src = opts.initial[c] !== undefined ? 'options.initial' : guesses[c]?.source ?? 'default (no closed-form guess available)';
    value0[c] = fixed[c] ?? v;
    if (fixed[c] === undefined && used.has(c)) start[c] = { value: value0[c], source: src };
  }
  if (!separate) { value0.Ke = value0.Kt; if (start.Ke !== undefined && start.Kt !== undefined) start.Ke = start.Kt; }

  // Layout of θ: constants the model uses and nobody pinned, then nuisance.
  const theta0: number[] = [];
  const thetaNames: string[] = [];
  const idx = (c: LumpedName): number => {
    if (fixed[c] !== undefined || !used.has(c)) return -1;
    if (c === 'Ke' && !separate) return -2; // filled below
    thetaNames.push(c === 'Tc' ? 'Tc' : `ln ${c === 'Kt' && !separate ? 'K' : c}`);
    theta0.push(c === 'Tc' ? 1 : Math.log(value0[c]));
    return theta0.length - 1;
  };
  const layout: ParameterLayout = {
    names: thetaNames, iR: idx('R'), iL: idx('L'), iKt: idx('Kt'), iKe: idx('Ke'), iJ: idx('J'), iB: idx('b'), iTc: idx('Tc'),
    fixed: { ...DEFAULTS, ...value0, ...fixed } as Constants,
    tcScale: Math.max(Math.abs(value0.Tc), 1e-3 * value0.Kt * 1e-2, 1e-12),
    recordings: [],
  };
  if (layout.iKe === -2) layout.iKe = layout.iKt;
  if (layout.iTc >= 0) theta0[layout.iTc] = value0.Tc / layout.tcScale;
  const push = (name: string, value: number): number => { thetaNames.push(name); theta0.push(value); return theta0.length - 1; };
  const inputCoefficients: number[] = [];
  for (const r of recs) {
    const slots: RecordingSlots = { level: [], levelScale: 1, offset: -1, offsetScale: 1, load: -1, loadScale: 1, w0: -1, w0Scale: 1, sine: [], sineScale: 1 };
    if (r.kind === 'coast-down' && r.speed !== null) {
      const w0 = r.speed[r.first]!;
      slots.w0Scale = Math.max(Math.abs(w0), 1e-9);
      slots.w0 = push(`ω0 ${r.name}`, w0 / slots.w0Scale);
    }
    if (r.levels !== null) {
      const cl = r.levels.classes;
      slots.levelScale = Math.max(1e-6, ...cl.map((q) => Math.abs(q.mean)));
      cl.forEach((q, j) => slots.level.push(push(`level ${j} ${r.name}`, q.mean / slots.levelScale)));
      inputCoefficients.push(...slots.level);
    }
    if (r.sines !== null) {
      const co = r.sines.coefficients;
      slots.sineScale = Math.max(1e-6, ...Array.from(co, Math.abs));
      co.forEach((v, j) => slots.sine.push(push(`input coefficient ${j} ${r.name}`, v / slots.sineScale)));
      inputCoefficients.push(...slots.sine);
    }
    if (r.baseline && r.current !== null && r.kind !== 'coast-down') {
      let m = 0;
      for (let k = 0; k < r.current.length; k++) m = Math.max(m, Math.abs(r.current[k]!));
      slots.offsetScale = Math.max(m, 1e-12);
      slots.offset = push(`current offset ${r.name}`, 0);
    }
    if (r.torqueStats !== null && r.torqueStats.sigma > 0) {
      slots.loadScale = Math.max(Math.abs(r.torqueStats.mean), r.torqueStats.sigma, 1e-12);
      slots.load = push(`load torque ${r.name}`, r.torqueStats.mean / slots.loadScale);
    }
    layout.recordings.push(slots);
  }

  const reportsFor = (residuals: ReturnType<ReturnType<typeof createMotorProblem>['residualsAt']> | null): RecordingReport[] =>
    recs.map((r, i) => {
      const channels: ChannelFit[] = [];
      const add = (ch: 'current' | 'speed', meas: Float64Array | null, res: Float64Array | null, noise: PreparedRecording['currentNoise']): void => {
        if (meas === null || noise === null) return;
        const { count: cnt, spread: v, squares: s } = channelSums(meas, res, r.first);
        const rms = res === null ? NaN : Math.sqrt(s / Math.max(cnt, 1));
        const sd = Math.sqrt(v / Math.max(cnt, 1));
        channels.push({
          channel: ch, sigma: noise.sigma, sigmaMethod: noise.method, samples: cnt, rms,
          nrmse: sd > 0 ? rms / sd : NaN, residuals: opts.keepResiduals ? res : null,
        });
      };
      add('current', r.current, residuals?.[i]?.current ?? null, r.currentNoise);
      add('speed', r.speed, residuals?.[i]?.speed ?? null, r.speedNoise);
      const nuisance: Record<string, number> = {};
      if (r.handling.stepTime !== null) nuisance.stepTime = r.handling.stepTime;
      return {
        name: r.name, kind: r.kind, kindSource: r.kindSource, kindReason: r.kindReason, samples: r.time.length,
        input: r.handling, channels, nuisance,
      };
    });

  const variant: MotorFit['variant'] = {
    torqueConstant: separate ? 'separate' : 'equal',
    coulomb,
    description: `lumped linear DC motor, ${separate ? 'Kt and Ke fitted apart (torque channel present)' : 'Kt = Ke imposed (SI)'}` +
      (coulomb ? ', Coulomb friction Tc·sgn(ω)' : ', viscous friction only'),
  };

  if (theta0.length === 0) {
    const parameters: Record<string, ParameterEstimate> = {};
    for (const c of names) if (fixed[c] !== undefined && (coulomb || c !== 'Tc')) parameters[c] = { value: fixed[c]!, unit: UNITS[c], fixed: true };
    return {
      parameters, notInformed, variant, recordings: reportsFor(null), fittedNames: [], theta: [], normalMatrix: new Float64Array(0),
      ssr: NaN, rows: 0, residualVariance: NaN, start, starts: [], iterations: 0, jacobianEvaluations: 0, functionEvaluations: 0,
      converged: false, stopReason: 'nothing-to-fit',
    };
  }

  // The input coefficients (voltage levels, sine-fit coefficients) are held at their voltage-only
  // estimates while the constants are iterated (the pass then skips their sensitivities), and
  // released for a final joint Gauss–Newton polish below.
  const frozen = theta0.map((_, j) => inputCoefficients.includes(j));
  const problem = createMotorProblem(recs, layout, theta0, inputCoefficients.length > 0 ? frozen : null);
  const p = theta0.length;
  // Candidate starts: the caller's (when given) and the automatic guesses from the data alone.
  const candidates: { label: StartAttempt['start']; theta: Float64Array }[] = [];
  const thetaFrom = (values: Constants): Float64Array => {
    const t = Float64Array.from(theta0);
    const put = (i: number, v: number): void => { if (i >= 0 && v > 0 && Number.isFinite(v)) t[i] = Math.log(v); };
    put(layout.iR, values.R); put(layout.iL, values.L); put(layout.iKt, values.Kt); put(layout.iJ, values.J); put(layout.iB, values.b);
    if (layout.iKe !== layout.iKt) put(layout.iKe, values.Ke);
    if (layout.iTc >= 0) t[layout.iTc] = values.Tc / layout.tcScale;
    return t;
  };
  const hasUserStart = Object.keys(opts.initial).length > 0;
  candidates.push({ label: hasUserStart ? 'options.initial' : 'automatic', theta: Float64Array.from(theta0) });
  if (hasUserStart) {
    const auto: Constants = { ...DEFAULTS };
    for (const c of names) auto[c] = fixed[c] ?? guesses[c]?.value ?? DEFAULTS[c];
    if (!separate) auto.Ke = auto.Kt;
    candidates.push({ label: 'automatic', theta: thetaFrom(auto) });
  }
  // Long records: the starts are run on a window of each recording (a quarter of it, from the
  // first switch of the command); the joint Gauss–Newton polish on the whole record then starts a
  // few standard errors from its optimum and normally lands in one step. When it does not, the
  // held-coefficient solver runs on the whole record from the window's optimum.
  const total = recs.reduce((acc, r) => acc + r.time.length, 0);
  const windowed = total > PREFIT_THRESHOLD
    ? recs.map((r) => windowOf(r, Math.max(PREFIT_MIN_WINDOW, Math.ceil(r.time.length / 4)))) : null;
  // With input coefficients the held run only has to bring the constants close for the joint
  // polish, which lands within ≈ 0.1 SE; a relative-reduction tolerance of 1e-7 (unless the
  // caller set one) saves its last iterations.
  const heldOptions = inputCoefficients.length > 0 && opts.solver.relativeReductionTolerance === undefined
    ? { ...opts.solver, relativeReductionTolerance: 1e-7 } : opts.solver;
  const attempts: StartAttempt[] = [];
  let iterations = 0, jacobianEvaluations = 0, functionEvaluations = 0;
  const runStarts = (prob: typeof problem, starts: typeof candidates): { best: ReturnType<typeof solveLeastSquares>; order: number[]; ssr0: number[] } => {
    const acc0 = createNormalEquations(prob.parameterCount);
    const ssr0 = starts.map((cand) => {
      resetNormalEquations(acc0);
      const v = prob.evaluate(prob.toFree(cand.theta), false, acc0);
      return Number.isFinite(v) ? v : Infinity;
    });
    functionEvaluations += starts.length;
    // Lower starting SSR first; the other start is tried only when the first does not converge.
    const order = starts.map((_, i) => i).sort((x, y) => ssr0[x]! - ssr0[y]!);
    let best: ReturnType<typeof solveLeastSquares> | null = null;
    let bestAttempt: StartAttempt | null = null;
    for (const i of order) {
      const cand = starts[i]!;
      const res = solveLeastSquares(prob, prob.toFree(cand.theta), heldOptions);
      // A run that ends where a fitted parameter no longer moves any residual (e.g. b so large that a
      // coast-down stops at once) is stuck on a plateau, not at an optimum.
      const q = prob.parameterCount;
      for (let j = 0; j < q; j++) {
        if (res.converged && !(res.JtJ[j * q + j]! > 0)) { res.converged = false; res.stopReason = 'stalled'; }
      }
      iterations += res.iterations; jacobianEvaluations += res.jacobianEvaluations; functionEvaluations += res.functionEvaluations;
      const attempt: StartAttempt = { start: cand.label, startSsr: ssr0[i]!, ssr: res.ssr, iterations: res.iterations, converged: res.converged, stopReason: res.stopReason, chosen: false };
      attempts.push(attempt);
      // A non-finite SSR never wins over a finite one (NaN compares false both ways).
      const better = best === null || (res.converged && !best.converged) ||
        (res.converged === best.converged && (res.ssr < best.ssr || !Number.isFinite(best.ssr)));
      if (better) { best = res; bestAttempt = attempt; }
      if (res.converged) break;
    }
    const b = best!;
    attempts.forEach((x) => { x.chosen = false; });
    bestAttempt!.chosen = true;
    return { best: b, order, ssr0 };
  };
  type Solution = { theta: Float64Array; JtJ: Float64Array; ssr: number; rows: number; converged: boolean; stopReason: StopReason; residuals?: ResidualSeries[] | null };
  let sol: Solution | null = null;
  const polish = (from: Float64Array): ReturnType<typeof polishJointly> => {
    const polished = polishJointly(recs, layout, frozen, from);
    jacobianEvaluations += polished.jacobianEvaluations;
    functionEvaluations += polished.jacobianEvaluations + polished.functionEvaluations;
    return polished;
  };
  let startsRun: ReturnType<typeof runStarts> | null = null;
  if (windowed !== null) {
    const short = createMotorProblem(windowed, layout, theta0, inputCoefficients.length > 0 ? frozen : null);
    const pre = runStarts(short, candidates);
    if (pre.best.converged) {
      const polished = polish(short.toFull(pre.best.theta));
      if (polished.linear) {
        sol = { theta: polished.theta, JtJ: polished.JtJ, ssr: polished.ssr, rows: polished.rows, converged: true, stopReason: 'relative-reduction', residuals: polished.residuals };
      } else {
        // Whole record, held coefficients, from the window's optimum.
        startsRun = runStarts(problem, [{ label: attempts.find((x) => x.chosen)!.start, theta: polished.theta }]);
      }
    }
  }
  if (sol === null) {
    startsRun ??= runStarts(problem, candidates);
    const reducedSol = startsRun.best;
    sol = { theta: problem.toFull(reducedSol.theta), JtJ: reducedSol.JtJ, ssr: reducedSol.ssr, rows: reducedSol.rows, converged: reducedSol.converged, stopReason: reducedSol.stopReason };
    if (inputCoefficients.length > 0 && !sol.converged) {
      // The held-coefficient run did not converge (e.g. a constant with a standard error as large as
      // itself ran towards 0 on the log scale, where the held and the joint optimum differ most):
      // run the joint problem from the same start instead, as a whole.
      const fullProblem = createMotorProblem(recs, layout, theta0, null);
      const chosen = candidates[startsRun.order[0]!]!;
      const res = solveLeastSquares(fullProblem, chosen.theta, opts.solver);
      for (let j = 0; j < p; j++) {
        if (res.converged && !(res.JtJ[j * p + j]! > 0)) { res.converged = false; res.stopReason = 'stalled'; }
      }
      iterations += res.iterations; jacobianEvaluations += res.jacobianEvaluations; functionEvaluations += res.functionEvaluations;
      attempts.forEach((a) => { a.chosen = false; });
      attempts.push({ start: chosen.label, startSsr: startsRun.ssr0[startsRun.order[0]!]!, ssr: res.ssr, iterations: res.iterations, converged: res.converged, stopReason: res.stopReason, chosen: true });
      sol = { theta: Float64Array.from(res.theta), JtJ: res.JtJ, ssr: res.ssr, rows: res.rows, converged: res.converged, stopReason: res.stopReason };
    } else if (inputCoefficients.length > 0) {
      const polished = polish(sol.theta);
      sol = { ...sol, theta: polished.theta, JtJ: polished.JtJ, ssr: polished.ssr, rows: polished.rows, residuals: polished.residuals };
      if (sol.converged && !polished.linear) { sol.converged = false; sol.stopReason = 'stalled'; }
    }
  }
  const constants = problem.constantsAt(sol.theta);
  const dof = sol.rows - p;
  const { parameters, covariance, constantCovariance, information } = lumpedStatistics({
    sol, constants, layout, names, fixed, pinnedByCaller: opts.fix, coulomb, separate, notInformed, informedBy,
  });
  const residuals = sol.residuals ?? problem.residualsAt(sol.theta);
  const reports = reportsFor(residuals);
  recs.forEach((r, i) => {
    const sl = layout.recordings[i]!;
    const nu = reports[i]!.nuisance;
    if (sl.w0 >= 0) nu.initialSpeed = sol.theta[sl.w0]! * sl.w0Scale;
    sl.level.forEach((j, q) => { nu[`level${q}`] = sol.theta[j]! * sl.levelScale; });
    if (sl.offset >= 0) nu.currentOffset = sol.theta[sl.offset]! * sl.offsetScale;
    if (sl.load >= 0) nu.loadTorque = sol.theta[sl.load]! * sl.loadScale;
  });
  const fit: MotorFit = {
    parameters, notInformed, variant, recordings: reports,
    fittedNames: thetaNames, theta: Array.from(sol.theta), normalMatrix: sol.JtJ, covariance, constantCovariance, ...(information ? { information } : {}), degreesOfFreedom: dof,
    ssr: sol.ssr, rows: sol.rows, residualVariance: dof > 0 ? sol.ssr / dof : NaN, start,
    iterations, jacobianEvaluations, functionEvaluations, starts: attempts,
    converged: sol.converged, stopReason: sol.stopReason,
  };
  LUMPED_FITS.set(fit, { layout, theta: Float64Array.from(sol.theta) });
  return fit;
}

/**
 * Starting values, pinned constants and the warm start of a detailed fit (see `fitPrepared`):
 * closed-form guesses, the lumped model fitted first by the streamed kernel, the effects' starts,
 * and the previous fit's θ by name.
 */
function detailedInputs(recs: PreparedRecording[], opts: ReturnType<typeof checkFitMotorOptions>, ext: ModelExtensions) {
  const fixedD: Partial<Record<DetailedConstant, number>> = { ...opts.fix };
  const guesses = guessConstants(recs, fixedD as Partial<Constants>);
  const start: Partial<Record<DetailedConstant, number>> = {};
  const startSource: Partial<Record<DetailedConstant, string>> = {};
  for (const [k, g] of Object.entries(guesses)) { start[k as DetailedConstant] = g.value; startSource[k as DetailedConstant] = g.source; }
  const autoStart: Partial<Record<DetailedConstant, number>> = { ...start };
  for (const [k, v] of Object.entries(opts.initial)) { start[k as DetailedConstant] = v; startSource[k as DetailedConstant] = 'options.initial'; }
  // The streamed linear kernel first, where it can take the recordings (a coast-down as its
  // speed decay, an encoder speed as a speed, a jittered clock as non-uniform samples): its
  // optimum starts the detailed fit a few steps from its own.
  if (opts.warmStart === null && !recs.some((r) => r.table || r.source === 'none')) {
    try {
      const pre = fitPrepared(recs, { ...opts, extensions: {}, coulomb: false }, 'linear');
      if (pre.converged) {
        for (const [k, e] of Object.entries(pre.parameters)) {
          if (e.fixed || !(DETAILED_NAMES as readonly string[]).includes(k) || !Number.isFinite(e.value)) continue;
          if (k === 'Tc' && !(e.value > 0)) continue;
          start[k as DetailedConstant] = e.value;
          startSource[k as DetailedConstant] = 'the lumped model fitted first by the streamed linear kernel';
        }
      }
    } catch { /* the guesses stand */ }
  }
  effectStarts(recs, ext, start, startSource);
  effectStarts(recs, ext, autoStart, {});
  const noCurrentAtAll = recs.every((r) => r.current === null);
  if (ext.coulomb && !(start.Tc! > 0 && (noCurrentAtAll || start.Tc! < runningTorque(recs, start.Kt ?? 0.05)))) {
    // 5 % of the torque the rotor runs against (Kt times the smallest running current; common
    // practice, no source: a start, not a guess). A start above the running torque holds the
    // rotor still, where no gradient leads back.
    start.Tc = 0.05 * runningTorque(recs, start.Kt ?? 0.05);
  }
  if (ext.coulomb && !(noCurrentAtAll && autoStart.Tc! > 0)) autoStart.Tc = 0.05 * runningTorque(recs, autoStart.Kt ?? 0.05);
  // A warm start: the previous fit's constants (unless `initial` names them) and nuisances by name.
  let warm: Map<string, number> | null = null;
  const warmReset = new Set<string>();
  const nearZero: Partial<Record<DetailedConstant, number>> = {};
  if (opts.warmStart !== null) {
    const w = opts.warmStart;
    warm = new Map(w.fittedNames.map((name, j) => [name, w.theta[j]!]));
    for (const [k, e] of Object.entries(w.parameters)) {
      if (e.fixed || !(DETAILED_NAMES as readonly string[]).includes(k) || opts.initial[k as MotorConstantName] !== undefined) continue;
      // A constant the previous fit drove towards zero on its log scale has no gradient left
      // there (another term stood in for it): it starts again from its own guess.
      const own = autoStart[k as DetailedConstant];
      if (own !== undefined && e.value < 1e-4 * own) { warmReset.add(k); nearZero[k as DetailedConstant] = e.value; continue; }
      if (Number.isFinite(e.value) && e.value > 0) { start[k as DetailedConstant] = e.value; startSource[k as DetailedConstant] = 'the previous fit (warm start)'; }
    }
    for (const name of [...warm.keys()]) if (/^ln /.test(name)) warm.delete(name);
    for (const k of warmReset) startSource[k as DetailedConstant] = `${startSource[k as DetailedConstant] ?? 'guess'} (the previous fit had it near zero)`;
    // The heating model's R is the resistance at 20 °C; a fit without it gave R at the run's
    // temperature, taken as the ambient (copper law, k = 234.5 °C, FACTS.md §3).
    if (ext.heating && !(w.variant.extensions ?? []).includes('heating') && start.R !== undefined && opts.initial.R === undefined) {
      start.R = (start.R * (234.5 + 20)) / (234.5 + opts.ambientTemperature);
    }
  }
  return { fixedD, start, startSource, autoStart, warm, warmReset, nearZero };
}
