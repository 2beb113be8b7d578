import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import type { StopReason } from '../solver/types.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { resetNormalEquations } from '../solver/resetNormalEquations.js';
import { solveLeastSquares } from '../solver/solveLeastSquares.js';
import { checkFitMotorOptions } from './checkFitMotorOptions.js';
import { createMotorProblem } from './createMotorProblem.js';
import type { Constants, ParameterLayout, RecordingSlots, ResidualSeries } from './createMotorProblem.js';
import { guessConstants } from './guessConstants.js';
import { prepareRecording } from './prepareRecording.js';
import { solveSymmetricSystem } from './solveSymmetricSystem.js';
import { logCovarianceOfConstants } from './logCovarianceOfConstants.js';
import { estimateSourceResistance } from './estimateSourceResistance.js';
import type { ConstantMap } from './logCovarianceOfConstants.js';
import { fitDetailed } from '../detailed/fitDetailed.js';
import { DETAILED_CONSTANTS as DETAILED_NAMES } from '../detailed/createDetailedProblem.js';
import type { DetailedConstant } from '../detailed/createDetailedProblem.js';
import type { ModelExtensions } from '../detailed/types.js';
import type { PreparedRecording } from './prepareRecording.js';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import type {
  ChannelFit, FitInformation, FitMotorOptions, MotorConstantName, NoiseLevel, MotorExperimentKind, MotorFit, MotorRecordingInput,
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
/** SSR mismatch (whitened units) under which a joint Gauss–Newton step counts as landing. */
const LANDING_SLACK = 1e-2;

/**
 * The first `len` samples of a recording from just before its first command switch (the rotor is
 * at rest there), for the windowed starts; coast-downs and short recordings are kept whole.
 */
function windowOf(r: PreparedRecording, len: number): PreparedRecording {
  const n = r.time.length;
  if (n <= len || r.kind === 'coast-down') return r;
  let k0 = 0;
  if (r.handling.stepTime !== null) {
    while (k0 < n && r.time[k0]! < r.handling.stepTime) k0++;
    k0 = Math.min(Math.max(k0 - 8, 0), n - len);
  }
  const cut = (x: Float64Array | null): Float64Array | null => (x === null ? null : x.subarray(k0, k0 + len));
  return {
    ...r, time: r.time.subarray(k0, k0 + len), timeBase: typeof r.timeBase === 'number' ? r.timeBase : r.time.subarray(k0, k0 + len),
    input: r.input.subarray(k0, k0 + len), current: cut(r.current), speed: cut(r.speed),
    levels: r.levels === null ? null : { ...r.levels, classOf: r.levels.classOf.subarray(k0, k0 + len) },
  };
}

/** The lumped model's constants (the streamed linear kernel fits these). */
type LumpedName = Extract<MotorConstantName, 'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b' | 'Tc'>;

const UNITS: Record<LumpedName, string> = { R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m' };
const DEFAULTS: Constants = { R: 1, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 1e-5, b: 1e-6, Tc: 0 };
const WOULD_INFORM: Record<LumpedName, string> = {
  R: 'a locked-rotor step, or a free-run step / PRBS with current',
  L: 'a locked-rotor step sampled faster than L/R, or a PRBS / multisine with current',
  Kt: 'a free-run step, PRBS, multisine or steady-state sweep with speed (apart from Ke: a loaded run with torque)',
  Ke: 'a free-run step, PRBS, multisine or steady-state sweep with speed',
  J: 'a free-run step, PRBS or multisine with speed',
  b: 'a steady-state sweep or a free-run step (or a coast-down once J is known)',
  Tc: 'a coast-down (with J known), a steady-state sweep, or a step / PRBS / multisine with current and speed',
};

/** Which constants a recording informs (before the coast-down rule on J). */
function informs(rec: PreparedRecording): LumpedName[] {
  const hasI = rec.current !== null;
  switch (rec.kind) {
    case 'locked-rotor': return ['R', 'L'];
    case 'coast-down': return ['b', 'Tc'];
    case 'steady-state': return ['R', 'Kt', 'Ke', 'J', 'b', 'Tc'];
    // With current logged, a driven run informs Tc when the model has it: it acts as a load torque
    // that, unlike b·ω, does not scale with speed (the covariance says when the speed range is too
    // narrow to tell them apart).
    case 'loaded': return ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'];
    default: return hasI ? ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] : ['Kt', 'Ke', 'J', 'b'];
  }
}

/** Which constants the model of a recording uses. */
function uses(kind: MotorExperimentKind, coulomb: boolean): LumpedName[] {
  if (kind === 'locked-rotor') return ['R', 'L'];
  if (kind === 'coast-down') return ['J', 'b', 'Tc'];
  return coulomb ? ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] : ['R', 'L', 'Kt', 'Ke', 'J', 'b'];
}

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
  opts.noise.forEach((e, i) => {
    const r = recs[i];
    if (e === null || e === undefined || r === undefined) return;
    const given = (sigma: number): NoiseLevel => ({ sigma, method: 'given', quantum: null });
    if (e.current !== undefined && r.currentNoise !== null) r.currentNoise = given(e.current);
    const sp = r.encoder !== null ? e.angle : e.speed;
    if (sp !== undefined && r.speedNoise !== null) r.speedNoise = { ...given(sp), quantum: r.speedNoise.quantum };
    if (e.voltage !== undefined && r.terminalNoise !== null) r.terminalNoise = given(e.voltage);
  });
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

/** The fit of prepared recordings (see `fitMotor`). */
function fitPrepared(recs: PreparedRecording[], opts: ReturnType<typeof checkFitMotorOptions>, engine: 'auto' | 'linear' = 'auto'): MotorFit {

  const coulomb = opts.coulomb === 'auto' ? recs.some((r) => r.kind === 'coast-down' || r.kind === 'steady-state') : opts.coulomb;
  const separate = recs.some((r) => r.kind === 'loaded' && r.loadTorque !== 0);
  const ext = { ...opts.extensions, coulomb: coulomb || opts.extensions.coulomb === true };
  if (!separate && engine === 'auto' && needsDetailedModel(recs, ext)) {
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
    if (engine === 'auto' && opts.warmStart === null && !recs.some((r) => r.table || r.source === 'none')) {
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
      notInformed.push({ name: c, reason: 'a coast-down informs only b/J and Tc/J; J is not known from another recording or options.fix', wouldInform: WOULD_INFORM.J });
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
        let s = 0, m = 0, cnt = 0;
        for (let k = r.first; k < meas.length; k++) { m += meas[k]!; cnt++; }
        m /= Math.max(cnt, 1);
        let v = 0;
        for (let k = r.first; k < meas.length; k++) v += (meas[k]! - m) * (meas[k]! - m);
        if (res !== null) for (let k = r.first; k < res.length; k++) s += res[k]! * res[k]!;
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
  let se: Float64Array | null = null;
  let covariance: Float64Array | null = null;
  let identifiable: boolean[] = new Array<boolean>(p).fill(true);
  let information: FitInformation | undefined;
  if (dof > 0 && Number.isFinite(sol.ssr)) {
    try {
      const cov = covarianceFromNormalMatrix(sol.JtJ, p, sol.ssr, sol.rows);
      se = cov.standardErrors;
      covariance = cov.covariance;
      identifiable = cov.identifiable;
      const constantIndex: Record<string, number> = {};
      for (const [c, i] of [['R', layout.iR], ['L', layout.iL], ['Kt', layout.iKt], ['Ke', layout.iKe], ['J', layout.iJ], ['b', layout.iB], ['Tc', layout.iTc]] as const) if (i >= 0) constantIndex[c] = i;
      information = { constantIndex, singularValues: cov.singularValues, conditionNumber: cov.conditionNumber, identifiable: cov.identifiable, rank: cov.rank };
    } catch {
      se = null;
    }
  }
  const tq = tQuantile(0.975, Math.max(dof, 1));
  const uninformed = new Set(notInformed.map((u) => u.name));
  const parameters: Record<string, ParameterEstimate> = {};
  for (const c of names) {
    if (!coulomb && c === 'Tc' && fixed.Tc === 0 && opts.fix.Tc === undefined) continue;
    if (fixed[c] !== undefined) { parameters[c] = { value: fixed[c]!, unit: UNITS[c], fixed: true }; continue; }
    if (uninformed.has(c)) continue;
    const i = c === 'R' ? layout.iR : c === 'L' ? layout.iL : c === 'Kt' ? layout.iKt : c === 'Ke' ? layout.iKe : c === 'J' ? layout.iJ : c === 'b' ? layout.iB : layout.iTc;
    if (i < 0) continue;
    const value = constants[c];
    const est: ParameterEstimate = { value, unit: UNITS[c], informedBy: informedBy[c] };
    if (se !== null && identifiable[i] && Number.isFinite(se[i]!)) {
      const s = se[i]!;
      if (c === 'Tc') {
        est.standardError = s * layout.tcScale;
        est.interval95 = [value - tq * s * layout.tcScale, value + tq * s * layout.tcScale];
      } else {
        est.standardError = value * s;
        est.interval95 = [value * Math.exp(-tq * s), value * Math.exp(tq * s)];
      }
    }
    parameters[c] = est;
  }
  // Kt/Ke when both are fitted apart: var(ln Kt − ln Ke) = C_tt + C_ee − 2·C_te (delta method).
  if (separate && layout.iKt >= 0 && layout.iKe >= 0 && layout.iKt !== layout.iKe) {
    const a = layout.iKt, b = layout.iKe;
    const value = constants.Kt / constants.Ke;
    const est: ParameterEstimate = { value, unit: '1 (N·m/A per V·s/rad)', informedBy: informedBy.Kt };
    if (covariance !== null && identifiable[a] && identifiable[b]) {
      const v = covariance[a * p + a]! + covariance[b * p + b]! - 2 * covariance[a * p + b]!;
      if (v >= 0 && Number.isFinite(v)) {
        est.standardError = value * Math.sqrt(v);
        est.interval95 = [value * Math.exp(-tq * Math.sqrt(v)), value * Math.exp(tq * Math.sqrt(v))];
      }
    }
    parameters['Kt/Ke'] = est;
  }
  // The constants' joint statistics (ln p), for every reader.
  const maps: ConstantMap[] = (['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc'] as const)
    .filter((c) => parameters[c] !== undefined)
    .map((c) => {
      const est = parameters[c]!;
      if (est.fixed === true) return { name: c, value: est.value, status: 'pinned' as const, gradient: [] };
      const i = c === 'R' ? layout.iR : c === 'L' ? layout.iL : c === 'Kt' ? layout.iKt : c === 'Ke' ? layout.iKe : c === 'J' ? layout.iJ : c === 'b' ? layout.iB : layout.iTc;
      if (i < 0) return { name: c, value: est.value, status: 'absent' as const, gradient: [] };
      // θ = ln p, except Tc = θ·scale: d ln Tc/dθ = scale/Tc.
      return { name: c, value: est.value, status: 'fitted' as const, gradient: [[i, c === 'Tc' ? layout.tcScale / est.value : 1]] as [number, number][] };
    });
  const constantCovariance = logCovarianceOfConstants(maps, covariance, identifiable, p, dof);
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
  return {
    parameters, notInformed, variant, recordings: reports,
    fittedNames: thetaNames, theta: Array.from(sol.theta), normalMatrix: sol.JtJ, covariance, constantCovariance, ...(information ? { information } : {}), degreesOfFreedom: dof,
    ssr: sol.ssr, rows: sol.rows, residualVariance: dof > 0 ? sol.ssr / dof : NaN, start,
    iterations, jacobianEvaluations, functionEvaluations, starts: attempts,
    converged: sol.converged, stopReason: sol.stopReason,
  };
}

/**
 * Gauss–Newton steps on the full joint problem (constants and input coefficients together) from
 * the optimum found with the input coefficients held. The residuals are linear in the input
 * coefficients and the start lies within a few standard errors of the joint optimum, so one step
 * normally lands on it. A step counts as landing when its actual SSR reduction matches the linear
 * prediction to 0.01 + 1e-4·prediction (whitened units, so the point is within about 0.1 standard
 * error of the joint optimum in any direction): the model is then linear over the step, the
 * gradient left at the new point is negligible, and JᵀJ from the start of the step (returned
 * with it) differs from JᵀJ at the new point by terms of the step's size. The trial SSR is
 * evaluated with the coefficients held at their trial values (the cheap pass). Returns the point
 * with that JᵀJ.
 */
function polishJointly(
  recs: PreparedRecording[], layout: ParameterLayout, frozen: boolean[], theta0: Float64Array,
): {
  theta: Float64Array; JtJ: Float64Array; ssr: number; rows: number; linear: boolean;
  /** Residual series at `theta` when the last step landed there, else null. */
  residuals: ResidualSeries[] | null; jacobianEvaluations: number; functionEvaluations: number;
} {
  let theta = Float64Array.from(theta0);
  const full = createMotorProblem(recs, layout, theta, null);
  const p = full.parameterCount;
  let acc = createNormalEquations(p);
  let ssr = full.evaluate(theta, true, acc);
  let jEvals = 1, fEvals = 0;
  let linear = false;
  let residuals: ResidualSeries[] | null = null;
  for (let it = 0; it < 5 && Number.isFinite(ssr); it++) {
    // Solve with the columns scaled to unit norm (the nuisances and the log-constants differ by
    // orders of magnitude in JᵀJ).
    const d = Float64Array.from({ length: p }, (_, j) => { const v = Math.sqrt(acc.JtJ[j * p + j]!); return v > 0 ? v : 1; });
    const scaled = Float64Array.from(acc.JtJ, (v, ij) => v / (d[Math.floor(ij / p)]! * d[ij % p]!));
    const z = solveSymmetricSystem(scaled, Float64Array.from(acc.Jtr, (g, j) => -g / d[j]!), p);
    if (z === null) break;
    const step = Float64Array.from(z, (v, j) => v / d[j]!);
    let predicted = 0;
    for (let j = 0; j < p; j++) predicted -= step[j]! * acc.Jtr[j]!;
    const trial = Float64Array.from(theta, (t, j) => t + step[j]!);
    // The trial pass also keeps the residual series: when the step lands they are the ones of
    // the reported point, and the caller skips a pass of its own.
    const held = createMotorProblem(recs, layout, trial, frozen);
    const tried = held.ssrWithResiduals(trial, createNormalEquations(held.parameterCount));
    const ssr2 = tried.ssr;
    fEvals++;
    if (!(ssr2 <= ssr)) { linear = predicted <= LANDING_SLACK; break; }
    const actual = ssr - ssr2;
    theta = trial;
    if (Math.abs(actual - predicted) <= LANDING_SLACK + 1e-4 * predicted) { ssr = ssr2; linear = true; residuals = tried.residuals; break; }
    acc = createNormalEquations(p);
    ssr = full.evaluate(theta, true, acc);
    jEvals++;
  }
  return { theta, JtJ: Float64Array.from(acc.JtJ), ssr, rows: acc.rows, linear, residuals, jacobianEvaluations: jEvals, functionEvaluations: fEvals };
}

/**
 * Whether the fit needs the detailed model's simulator rather than the streamed linear kernel:
 * any extension (Coulomb friction included), or a recording the linear kernel does not model (a
 * coast-down, an encoder angle, a jittered clock, a table of steady points, no voltage at all).
 */
function needsDetailedModel(recs: PreparedRecording[], ext: ModelExtensions): boolean {
  // Friction of either sign (reversals, sticking at rest) needs the event-locating simulator.
  if (ext.coulomb || ext.stiction || ext.drag || ext.voltageLimit || ext.currentLimit || ext.heating) return true;
  return recs.some((r) => r.kind === 'coast-down' || r.encoder !== null || r.grid !== null || r.table || r.source === 'none');
}

/** Kt·|i| over the last tenth of the driven recordings that log current (or of a coast-down's plateau); the smallest. */
function runningTorque(recs: PreparedRecording[], Kt: number): number {
  let best = Infinity;
  for (const r of recs) {
    if (r.current === null || r.kind === 'locked-rotor') continue;
    const n = r.current.length;
    const [a, b] = r.kind === 'coast-down' ? [0, Math.max(1, r.first - 1)] : [Math.floor(0.9 * n), n];
    let s = 0;
    for (let k = a; k < b; k++) s += r.current[k]!;
    const i = Math.abs(s / Math.max(b - a, 1));
    if (i > 0) best = Math.min(best, Kt * i);
  }
  return Number.isFinite(best) ? best : 1e-3 * Kt;
}

/**
 * Starting values of the effect constants the caller did not give (common practice, no source:
 * starts, not guesses — each puts the effect at a modest share of what the data show, where the
 * fit has a gradient to follow): drag c at 10 % of the viscous torque at the top speed; the
 * voltage limit at 95 % of the largest commanded level; the current limit at 95 % of the largest
 * current; stiction 30 % above Coulomb friction; a thermal time constant of a third of the longest
 * record, with Rth for a 10 K rise at its mean copper loss.
 */
function effectStarts(recs: PreparedRecording[], ext: ModelExtensions, start: Partial<Record<DetailedConstant, number>>, src: Partial<Record<DetailedConstant, string>>): void {
  const set = (k: DetailedConstant, v: number, why: string): void => {
    if (start[k] === undefined && Number.isFinite(v) && v > 0) { start[k] = v; src[k] = why; }
  };
  let wmax = 0, imax = 0, vmax = 0, power = 0, count = 0, longest = 0;
  for (const r of recs) {
    if (r.speed !== null) for (let k = 0; k < r.speed.length; k++) wmax = Math.max(wmax, Math.abs(r.speed[k]!));
    if (r.current !== null) for (let k = 0; k < r.current.length; k++) { const i = r.current[k]!; imax = Math.max(imax, Math.abs(i)); power += i * i; count++; }
    if (r.source === 'command') for (let k = 0; k < r.input.length; k++) vmax = Math.max(vmax, Math.abs(r.input[k]!));
    longest = Math.max(longest, r.time[r.time.length - 1]! - r.time[0]!);
  }
  if (ext.drag) set('c', (0.1 * (start.b ?? 1e-6)) / Math.max(wmax, 1e-6), 'start: drag at 10 % of the viscous torque at the top speed');
  if (ext.voltageLimit) set('Vmax', 0.95 * vmax, 'start: 95 % of the largest commanded level');
  if (ext.currentLimit) set('Imax', 0.95 * imax, 'start: 95 % of the largest current');
  if (ext.stiction && start.Tc !== undefined) set('Ts', 1.3 * start.Tc, 'start: 30 % above Coulomb friction');
  if (ext.heating) {
    const p = (start.R ?? 1) * (count > 0 ? power / count : 1);
    const Rth = 10 / Math.max(p, 1e-9);
    set('Rth', Rth, 'start: a 10 K rise at the mean copper loss');
    set('Cth', Math.max(longest, 1e-3) / 3 / Rth, 'start: a thermal time constant of a third of the longest record');
  }
}

/**
 * The supply side: Rs from recordings that log both the supply and the terminal voltage; and when
 * the supply alone drove a recording, R is R + Rs, said so and stated under that name too.
 */
function addSupplyTerms(fit: MotorFit, recordings: MotorRecordingInput[], recs: PreparedRecording[]): void {
  const rs = estimateSourceResistance(recordings.map((r) => r.recording), recs.map((r) => r.name));
  if (rs !== null) fit.parameters.Rs = rs;
  const supplyOnly = recs.filter((r) => r.source === 'supply');
  const R = fit.parameters.R;
  if (supplyOnly.length === 0 || R === undefined || R.fixed === true) return;
  fit.parameters['R+Rs'] = { ...R };
  // Every driven recording ran from the supply with the terminal voltage logged beside it: the
  // winding's R is R + Rs less Rs (two independent regressions: their variances add).
  const driven = recs.filter((r) => r.source !== 'none' && !r.table);
  if (rs === null || rs.identified === false || !driven.every((r) => r.supplyDrives)) return;
  const value = R.value - rs.value;
  if (!(value > 0)) return;
  const est: ParameterEstimate = { value, unit: R.unit, informedBy: [...new Set([...(R.informedBy ?? []), ...(rs.informedBy ?? [])])] };
  if (R.standardError !== undefined && rs.standardError !== undefined) {
    const se = Math.hypot(R.standardError, rs.standardError);
    const t = fit.constantCovariance?.tQuantile ?? 1.96;
    est.standardError = se;
    est.interval95 = [value - t * se, value + t * se];
    if (!(se < 0.5 * value)) est.identified = false;
  }
  fit.parameters.R = est;
  // The constants' covariance follows: ln R = ln(R + Rs) − ln(1 − Rs/(R + Rs)), to first order
  // d ln R = g·d ln(R + Rs) − dRs/R with g = (R + Rs)/R.
  const cc = fit.constantCovariance;
  const j = cc?.names.indexOf('R') ?? -1;
  if (cc !== undefined && j >= 0) {
    const m = cc.names.length, g = R.value / value, C = cc.logCovariance;
    for (let q = 0; q < m; q++) { if (q !== j) { C[j * m + q] = C[j * m + q]! * g; C[q * m + j] = C[j * m + q]!; } }
    C[j * m + j] = C[j * m + j]! * g * g + ((rs.standardError ?? 0) / value) ** 2;
    cc.values[j] = value;
  }
}
