import { fCdf } from '@motorprint/estimate/distributions';
import { fitMotor, scoreMotorExtensions, sharePreparation } from '@motorprint/estimate';
import type { ExtensionScore, FitMotorOptions, ModelExtensions, MotorFit, MotorRecordingInput } from '@motorprint/estimate';
import { checkHeldOut } from './checkHeldOut.js';
import { compareNestedModels } from './compareNestedModels.js';
import { diagnoseFit } from './diagnoseFit.js';
import { shareScans } from './scanRecording.js';
import type { FitDiagnosis, HeldOutCheck, Identification, ModelCandidate, UnsupportedConstant } from './types.js';

/** Options of `identifyMotor`. */
export interface IdentifyOptions {
  /** Options of every fit (pinned constants, starts, voltage handling, solver, ambient temperature). @default {} */
  fit?: Omit<FitMotorOptions, 'extensions' | 'coulomb' | 'noise' | 'reweight'>;
  /**
   * `auto`: the extensions the data support are chosen by nested comparisons; an object forces
   * exactly those extensions (nothing is compared). @default 'auto'
   */
  model?: 'auto' | ModelExtensions;
  /** Significance level of the nested F-test. @default 0.01 */
  alpha?: number;
  /** Held-out recordings to predict with the chosen constants. @default [] */
  checks?: MotorRecordingInput[];
  /** Called as the work goes on with the stage in words and the fraction done (0…1). Must not throw. @default none */
  onProgress?: (stage: string, fraction: number) => void;
}

type Extension = keyof ModelExtensions;
/**
 * Residual rows from which candidates are screened by the score test before they are fitted.
 * Below it a candidate's fit is quick anyway, and the test's linearisation is least sure on few
 * rows (a table of 10 steady points with drag: score p 0.016, the fitted comparison p < 0.01).
 * Chosen on the bench and the practice set; common practice, no source.
 */
const SCREEN_ROWS = 20000;
const ORDER: Extension[] = ['coulomb', 'drag', 'voltageLimit', 'currentLimit', 'heating', 'stiction'];
const EFFECT_CONSTANTS: Record<Extension, string[]> = {
  coulomb: ['Tc'], stiction: ['Ts'], drag: ['c'], voltageLimit: ['Vmax'], currentLimit: ['Imax'], heating: ['Rth', 'Cth'],
};
const WORDS: Record<Extension, string> = {
  coulomb: 'Coulomb friction', stiction: 'stiction (breakaway above Coulomb friction)', drag: 'speed-squared drag',
  voltageLimit: 'a drive voltage limit', currentLimit: 'a drive current limit', heating: 'winding heating',
};

/**
 * Identifies a motor from bench recordings in one call: fits the lumped model, diagnoses it, and
 * — unless the caller forces a model — adds the extensions of the detailed model (Coulomb
 * friction, drag, drive voltage and current limits, winding heating, stiction) one at a time while
 * the data support them, and returns the chosen fit with its diagnosis, every candidate tried with
 * its comparison, the effect constants the data do not support (with an upper bound), and the
 * held-out checks. The command line and lab scripts get the same answer from the same call.
 *
 * ## Method
 * Forward selection over nested models. Candidates are the extensions the recordings can show:
 * friction and drag wherever the rotor turns, the limits where the drive's command was logged
 * (then the limits act on it), heating on records of 2 s or more with current (or after a
 * winding-heating finding), stiction once Coulomb friction is in. Each candidate is fitted from
 * the current model's constants with the current model's noise SDs held (so that both sums of
 * squares use the same weights), and compared by the nested F-test at `alpha` together with BIC
 * (`compareNestedModels`): it is accepted when F rejects, BIC falls, the fit converged and every
 * constant it adds has a relative standard error below 50 %. The best accepted candidate (largest
 * BIC drop) joins the model and the round repeats. Constants of rejected extensions are reported as
 * not distinguishable from zero with the 95 % upper bound of their fit.
 *
 * On recordings of 20 000 residual rows or more, Coulomb friction, drag and heating are first
 * screened by Rao's score test at the current model (`scoreMotorExtensions`: one Jacobian for all
 * three, no fit; at a lumped fit one pass of the streamed linear kernel gives the effects'
 * first-order columns): a candidate the test does not find at `alpha` is turned down without a fit, and
 * its bound is the linearised one (one Gauss–Newton step from the current model, + 1.96 standard
 * errors). The score test is asymptotically equivalent to the F-test, so the choice is the same
 * up to linearisation; it spares the fits that long clean records would spend on effects they do
 * not show.
 *
 * ## References
 * C. R. Rao (1948), Proc. Camb. Phil. Soc. 44(1), 50–57, doi:10.1017/S0305004100023987 (score test).
 * G. Schwarz (1978), "Estimating the dimension of a model", Ann. Statist. 6(2), 461–464,
 * doi:10.1214/aos/1176344136 (BIC). D. M. Bates, D. G. Watts (1988), Nonlinear Regression Analysis
 * and Its Applications, Wiley, §3.5 (extra sum of squares F-test for nested nonlinear models).
 *
 * @param recordings - `{ recording, kind?, name? }` items (SI channels)
 * @param options - fit options, forced model, alpha, held-out recordings
 * @returns the {@link Identification}
 * @throws TypeError / RangeError from `fitMotor` for unusable recordings or options
 * @example
 * const id = identifyMotor([{ recording: coast }, { recording: step }]);
 * id.model.extensions; // => ['coulomb'] when the coast-down shows Coulomb friction
 */
export function identifyMotor(recordings: MotorRecordingInput[], options: IdentifyOptions = {}): Identification {
  // Every fit and test below reads the same recordings: they are prepared once; every diagnosis
  // of a fit it moves to reads the same data-only scans: each is run once.
  return sharePreparation(() => shareScans(() => identifyShared(recordings, options)));
}

function identifyShared(recordings: MotorRecordingInput[], options: IdentifyOptions): Identification {
  const fn = 'identifyMotor';
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object`);
  const alpha = options.alpha ?? 0.01;
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: options.alpha must be in (0, 1) (got ${alpha})`);
  const base = options.fit ?? {};
  const forced = options.model !== undefined && options.model !== 'auto' ? options.model : null;
  const candidates: ModelCandidate[] = [];
  const progress = (stage: string, fraction: number): void => { options.onProgress?.(stage, Math.min(1, Math.max(0, fraction))); };
  progress('fitting the lumped model', 0);
  const fitWith = (ext: ModelExtensions, extra: FitMotorOptions = {}): MotorFit =>
    fitMotor(recordings, { ...base, ...extra, extensions: ext, coulomb: ext.coulomb === true });
  const listOf = (ext: ModelExtensions): Extension[] => ORDER.filter((e) => ext[e] === true);

  let model: ModelExtensions = forced ?? {};
  let fit = fitWith(model);
  if (!fit.converged && forced === null) {
    // A log whose rotor sticks at low drive (a dead band) stalls the lumped model: try it with
    // Coulomb friction before giving up.
    const alt = fitWith({ coulomb: true });
    candidates.push(summary(alt, ['coulomb'], 'coulomb', null, alt.converged, 'the lumped model did not converge; Coulomb friction tried in its place'));
    // One that ran off to a boundary (b → 0 where a drive limit is the real cause) is no answer,
    // but it is a place to start the search from; the chosen model must converge in the end.
    if (alt.converged || (alt.stopReason === 'ran-off' && !fit.converged)) { fit = alt; model = { coulomb: true }; }
  }
  const searchable = fit.converged || fit.stopReason === 'ran-off';
  progress('checking the fit', 0.25);
  let diagnosis = diagnoseFit(fit, recordings, { alpha });
  candidates.unshift(summary(fit, listOf(model), null, null, fit.converged, forced ? 'the model asked for' : 'the lumped linear model (the start)'));

  if (forced === null && searchable) {
    // A candidate turned down is not tried again; one that was supported but lost to a better
    // one is tried again against the grown model (it may have stood in for the winner).
    const rejected = new Set<Extension>();
    const stalledOnce = new Set<Extension>();
    for (let round = 0; round < ORDER.length; round++) {
      const pool = applicable(recordings, fit, diagnosis, model).filter((e) => !rejected.has(e) && !model[e]);
      if (pool.length === 0) break;
      let best: { ext: Extension; fit: MotorFit; bicDrop: number } | null = null;
      const weights = weightsOf(fit);
      const scores = fit.converged && fit.rows >= SCREEN_ROWS ? scoresOf(recordings, base, fit, model, weights, pool) : {};
      for (const [q, e] of pool.entries()) {
        progress(`trying ${WORDS[e]}`, 0.3 + (0.6 * (round + q / pool.length)) / Math.max(1, round + 2));
        const next: ModelExtensions = { ...model, [e]: true };
        if (e === 'stiction') next.coulomb = true;
        // The score test first (one Jacobian at the current model): an extension it does not
        // find is not fitted — a fit could not pass the F-test at the same level either, up to
        // the test's linearisation (Rao 1948; asymptotically equal to the F and likelihood-ratio
        // tests). Where it finds one, the candidate is fitted and compared as below.
        const score = scores[e] ?? null;
        if (score !== null && !(score.pValue < alpha)) {
          const effects: ModelCandidate['effects'] = {};
          for (const [c, x] of Object.entries(score.oneStep)) {
            const half = 1.96 * x.standardError;
            if (Number.isFinite(half)) effects[c] = { value: x.value, unit: x.unit, interval95: [Math.max(x.value - half, 0), Math.max(x.value, 0) + half] };
          }
          candidates.push({
            extensions: listOf(next), added: e, converged: false, ssr: NaN, parameters: score.parameters + score.df1, rows: score.rows, comparison: null, accepted: false,
            reason: `not supported: the score test at the current model finds nothing to fit (F ${score.statistic.toPrecision(3)}, p ${score.pValue.toPrecision(2)} ≥ ${alpha}), so it was not fitted`,
            effects, scoreTest: { statistic: score.statistic, pValue: score.pValue },
          });
          rejected.add(e);
          continue;
        }
        let cand: MotorFit;
        try {
          // From the current optimum an effect the data show converges in a few steps; one they do
          // not show drifts towards zero on its log scale: 40 steps tell the two apart.
          cand = fitWith(next, { initial: { ...(base.initial ?? {}) }, warmStart: fit, noise: weights, reweight: false, solver: { ...(base.solver ?? {}), maxIterations: Math.min(base.solver?.maxIterations ?? 40, 40) } });
        } catch (err) {
          candidates.push({ extensions: listOf(next), added: e, converged: false, ssr: NaN, parameters: NaN, rows: NaN, comparison: null, accepted: false, reason: `the fit failed: ${err instanceof Error ? err.message : String(err)}`, effects: {} });
          rejected.add(e);
          continue;
        }
        if (!cand.converged && cand.stopReason === 'max-iterations' && cand.rows === fit.rows && cand.theta.length > fit.theta.length && cand.ssr < fit.ssr) {
          // Still moving after 40 steps, and already better: an effect that trades against another
          // constant (drag against b) walks a long valley. Let it finish when the gain so far is
          // already clear (F-test), else it stays turned down as not converged.
          const soFar = compareNestedModels('so far', { name: 'a', ssr: fit.ssr, parameters: fit.theta.length }, { name: 'b', ssr: cand.ssr, parameters: cand.theta.length }, fit.rows, alpha);
          if (soFar.fPValue < alpha) {
            try {
              const more = fitWith(next, { initial: { ...(base.initial ?? {}) }, warmStart: cand, noise: weights, reweight: false, solver: { ...(base.solver ?? {}), maxIterations: 200 } });
              if (more.rows === cand.rows && (more.converged || more.ssr < cand.ssr)) cand = more;
            } catch { /* keep the first attempt */ }
          }
        }
        const comparable = cand.rows === fit.rows && cand.theta.length > fit.theta.length && Number.isFinite(cand.ssr) && Number.isFinite(fit.ssr);
        const comparison = comparable
          ? compareNestedModels(`${listOf(model).join(' + ') || 'lumped'} vs + ${e}`, { name: listOf(model).join(' + ') || 'lumped', ssr: fit.ssr, parameters: fit.theta.length },
            { name: listOf(next).join(' + '), ssr: cand.ssr, parameters: cand.theta.length }, fit.rows, alpha)
          : null;
        // Without current Coulomb friction shows as the speed it costs, not as Tc on its own.
        const drop = cand.parameters['friction speed drop'];
        const added = (e === 'coulomb' && drop !== undefined ? [drop] : EFFECT_CONSTANTS[e].map((c) => cand.parameters[c])).filter((x) => x !== undefined);
        const identified = added.length > 0 && added.every((x) => x!.identified !== false && x!.standardError !== undefined && x!.standardError < 0.5 * Math.abs(x!.value));
        const bicDrop = comparison === null ? -Infinity : comparison.bic[0] - comparison.bic[1];
        // From a base that ran off to a boundary the candidate's own intervals are not yet
        // trustworthy (the refit from the grown model settles them, and the backward check after
        // the search drops an extension that is then not needed): F and BIC decide alone.
        const accepted = cand.converged && comparison !== null && comparison.fPValue < alpha && bicDrop > 0 && (identified || !fit.converged);
        const reason = !cand.converged && cand.stopReason === 'max-iterations' && comparison !== null && !(comparison.fPValue < alpha)
          ? `not supported: after ${Math.min(base.solver?.maxIterations ?? 40, 40)} steps the fit with it is no better (F-test p ${comparison.fPValue.toPrecision(2)}); its constants drift instead of settling`
          : !cand.converged ? `the fit did not converge (${cand.stopReason})`
          : comparison === null ? 'the two fits do not have the same rows, so they cannot be compared'
          : accepted ? `F-test p ${comparison.fPValue.toPrecision(2)} < ${alpha}, BIC lower by ${bicDrop.toPrecision(3)}`
          : !identified ? `the recordings do not pin down ${EFFECT_CONSTANTS[e].join(', ')} (relative standard error above 50 %)`
          : `not supported: F-test p ${comparison.fPValue.toPrecision(2)}${bicDrop > 0 ? '' : `, BIC higher by ${(-bicDrop).toPrecision(3)}`}`;
        const effects: ModelCandidate['effects'] = {};
        for (const c of EFFECT_CONSTANTS[e]) {
          const x = cand.parameters[c];
          if (x !== undefined) effects[c] = { value: x.value, unit: x.unit, interval95: x.interval95 ?? null };
        }
        candidates.push({ extensions: listOf(next), added: e, converged: cand.converged, ssr: cand.ssr, parameters: cand.theta.length, rows: cand.rows, comparison, accepted, reason, effects, ...(score !== null ? { scoreTest: { statistic: score.statistic, pValue: score.pValue } } : {}) });
        // One that did not converge gets one more try from the grown model (another effect may
        // have hidden its gradient, as Coulomb friction hides drag).
        if (!accepted && (cand.converged || stalledOnce.has(e))) rejected.add(e);
        if (!accepted && !cand.converged) stalledOnce.add(e);
        if (accepted && (best === null || bicDrop > best.bicDrop)) best = { ext: e, fit: cand, bicDrop };
      }
      if (best === null) break;
      for (const c of candidates) if (c.accepted && c.added !== best.ext && c.extensions.length === listOf(model).length + 1) { c.accepted = false; c.reason += `; but ${best.ext} explained more (it joined the model first)`; }
      model = { ...model, [best.ext]: true };
      if (best.ext === 'stiction') model.coulomb = true;
      // Refit the chosen model with its own noise levels re-estimated.
      const refit = fitWith(model, { warmStart: best.fit });
      fit = refit.converged ? refit : best.fit;
      diagnosis = diagnoseFit(fit, recordings, { alpha });
      rejected.delete('stiction');
    }
  }
  if (forced === null && fit.converged && listOf(model).length > 0) {
    // Backward check: an extension taken in early (or in place of a lumped model that did not
    // converge) may be redundant once a later one explains the same residuals. Each is removed
    // in turn, from the current optimum, and stays out when the fuller model is no longer
    // supported (F-test at alpha and BIC).
    for (const e of [...listOf(model)].reverse()) {
      if (!model[e] || (e === 'coulomb' && model.stiction)) continue;
      const fewer: ModelExtensions = { ...model, [e]: false };
      if (e === 'stiction') fewer.coulomb = true;
      progress(`checking ${WORDS[e]} is still needed`, 0.9);
      let reduced: MotorFit;
      try {
        reduced = fitWith(fewer, { initial: { ...(base.initial ?? {}) }, warmStart: fit, noise: weightsOf(fit), reweight: false, solver: { ...(base.solver ?? {}), maxIterations: 60 } });
      } catch { continue; }
      if (!reduced.converged || reduced.rows !== fit.rows || reduced.theta.length >= fit.theta.length) continue;
      const comparison = compareNestedModels(`${listOf(fewer).join(' + ') || 'lumped'} vs + ${e}`, { name: listOf(fewer).join(' + ') || 'lumped', ssr: reduced.ssr, parameters: reduced.theta.length },
        { name: listOf(model).join(' + '), ssr: fit.ssr, parameters: fit.theta.length }, fit.rows, alpha);
      const bicDrop = comparison.bic[0] - comparison.bic[1];
      if (comparison.fPValue < alpha && bicDrop > 0) continue;
      for (const c of candidates) if (c.accepted && c.added === e) { c.accepted = false; c.reason += '; dropped again once the rest of the model explained the same residuals'; }
      const effects: ModelCandidate['effects'] = {};
      for (const c of EFFECT_CONSTANTS[e]) {
        const x = fit.parameters[c];
        if (x !== undefined) effects[c] = { value: x.value, unit: x.unit, interval95: x.interval95 ?? null };
      }
      candidates.push({ extensions: listOf(model), added: e, converged: true, ssr: fit.ssr, parameters: fit.theta.length, rows: fit.rows, comparison, accepted: false,
        reason: `no longer supported beside ${listOf(fewer).join(', ') || 'the lumped model'}: F-test p ${comparison.fPValue.toPrecision(2)}${bicDrop > 0 ? '' : `, BIC higher by ${(-bicDrop).toPrecision(3)}`}`, effects });
      model = fewer;
      const refit = fitWith(model, { warmStart: reduced });
      fit = refit.converged ? refit : reduced;
      diagnosis = diagnoseFit(fit, recordings, { alpha });
    }
  }
  progress('checking held-out recordings', 0.92);
  diagnosis = { ...diagnosis, findings: reconcileFindings(diagnosis, candidates, model, fit) };
  const unsupported = unsupportedConstants(candidates, model);
  const checks: HeldOutCheck[] = (options.checks ?? []).map((c, i) => checkHeldOut(fit, c, i));
  const chosen = listOf(model);
  return {
    fit,
    diagnosis,
    model: {
      extensions: chosen,
      forced: forced !== null,
      candidates,
      summary: forced !== null
        ? `model as asked: ${chosen.length ? chosen.map((e) => WORDS[e]).join(', ') : 'lumped linear, viscous friction only'}`
        : chosen.length === 0
          ? 'lumped linear model (viscous friction only): no extension of the detailed model was supported by the data'
          : `the data support ${chosen.map((e) => WORDS[e]).join(', ')} (nested F-test at ${alpha} and BIC, one extension at a time)`,
    },
    unsupported,
    checks,
  };
}

function summary(fit: MotorFit, extensions: Extension[], added: Extension | null, comparison: null, accepted: boolean, reason: string): ModelCandidate {
  return { extensions, added, converged: fit.converged, ssr: fit.ssr, parameters: fit.theta.length, rows: fit.rows, comparison, accepted, reason, effects: {} };
}

/**
 * Rao's score tests of the pool's extensions at the fitted model (`scoreMotorExtensions` of
 * estimate, one Jacobian for all), with the fit's noise SDs held, and their p-values; an extension
 * the test does not cover (drive limits, stiction) or could not evaluate is absent.
 */
function scoresOf(recordings: MotorRecordingInput[], base: FitMotorOptions, fit: MotorFit, model: ModelExtensions, weights: NonNullable<FitMotorOptions['noise']>, pool: Extension[]): Partial<Record<Extension, ExtensionScore & { pValue: number }>> {
  const out: Partial<Record<Extension, ExtensionScore & { pValue: number }>> = {};
  const testable = pool.filter((e) => e === 'coulomb' || e === 'drag' || e === 'heating');
  if (testable.length === 0) return out;
  let scores: Partial<Record<Extension, ExtensionScore | null>>;
  try {
    scores = scoreMotorExtensions(recordings, { ...base, warmStart: fit, extensions: model, coulomb: model.coulomb === true, noise: weights, reweight: false }, testable);
  } catch { return out; }
  for (const e of testable) {
    const s = scores[e];
    if (s === null || s === undefined || !Number.isFinite(s.statistic) || !(s.df2 > 0)) continue;
    const pValue = 1 - fCdf(s.statistic, s.df1, s.df2);
    if (Number.isFinite(pValue)) out[e] = { ...s, pValue };
  }
  return out;
}

/** The noise SDs a fit whitened with, per recording, to hold them in a comparison. */
function weightsOf(fit: MotorFit): NonNullable<FitMotorOptions['noise']> {
  return fit.recordings.map((r) => {
    const o: { current?: number; speed?: number; angle?: number; voltage?: number } = {};
    for (const c of r.channels) if (c.sigma > 0 && Number.isFinite(c.sigma)) o[c.channel] = c.sigma;
    return o;
  });
}

/** The extensions the recordings can show, given the current fit and its findings. */
function applicable(recordings: MotorRecordingInput[], fit: MotorFit, d: FitDiagnosis, model: ModelExtensions): Extension[] {
  const kinds = fit.recordings.map((r) => r.kind);
  const turns = kinds.some((k) => k !== 'locked-rotor');
  const commanded = recordings.some((r) => r.recording.channels.voltage === undefined && r.recording.channels.commandVoltage !== undefined);
  const codes = new Set(d.findings.map((f) => f.code));
  const longWithCurrent = recordings.some((r) => {
    const t = r.recording.time;
    return r.recording.channels.current !== undefined && r.recording.layout !== 'table' && t.length > 1 && t[t.length - 1]! - t[0]! >= 2;
  });
  const out: Extension[] = [];
  if (turns) out.push('coulomb', 'drag');
  if (commanded) out.push('voltageLimit', 'currentLimit');
  if (longWithCurrent || codes.has('winding-heating') || recordings.some((r) => r.recording.channels.temperature !== undefined)) out.push('heating');
  if (model.coulomb && turns) out.push('stiction');
  return out;
}

/**
 * Effect magnitudes the data do not support (Tc, Ts, c): for each such extension tried and not
 * taken, the 95 % upper bound its candidate fit gave (positive constants are fitted on a log scale,
 * so the bound is the upper end of that interval).
 */
function unsupportedConstants(candidates: ModelCandidate[], model: ModelExtensions): UnsupportedConstant[] {
  const out: (UnsupportedConstant & { fromUnconverged: boolean })[] = [];
  for (const c of candidates) {
    const added = c.added as Extension | null;
    // Only magnitudes that vanish without the effect (friction torques, drag) are "zero"; a limit
    // or a thermal path that is not seen is recorded with the candidates instead.
    if (added === null || c.accepted || model[added] || !['coulomb', 'stiction', 'drag'].includes(added)) continue;
    const seen = out.findIndex((u) => u.extension === added);
    // A candidate whose fit did not converge sets no bound; a later one that converged does.
    // A bound comes from a fit that converged, or from the score test of a candidate it turned
    // down unfitted (no sum of squares of its own); a fitted candidate that did not converge sets none.
    const settled = c.converged || (c.scoreTest !== undefined && Number.isNaN(c.ssr));
    if (seen >= 0 && !(settled && out[seen]!.fromUnconverged)) continue;
    const bounds: UnsupportedConstant['bounds'] = {};
    for (const [name, e] of Object.entries(c.effects)) bounds[name] = { upper95: settled && e.interval95 !== null ? e.interval95[1] : null, unit: e.unit };
    const entry = { extension: added, constants: EFFECT_CONSTANTS[added], bounds, reason: c.reason, fromUnconverged: !settled };
    if (seen >= 0) out[seen] = entry; else out.push(entry);
  }
  return out.map(({ fromUnconverged: _, ...u }) => u);
}

/** The findings each extension speaks to (the detectors' codes). */
const FINDING_OF: Record<Extension, string[]> = {
  coulomb: ['coulomb-friction'], stiction: ['stiction'], drag: ['speed-squared-drag'],
  voltageLimit: ['drive-saturation'], currentLimit: ['drive-saturation'], heating: ['winding-heating'],
};

/**
 * Findings and the model choice tell one story. Where an extension was fitted and compared, the
 * comparison — a fit of the whole model to every sample — outranks the detectors' quicker
 * evidence: a finding for an effect the comparison turned down is dropped (its candidate says
 * why), and an effect the comparison took in is stated as a finding with its constants and the
 * comparison's numbers. Findings about effects that were not tried stay as they are.
 */
function reconcileFindings(d: FitDiagnosis, candidates: ModelCandidate[], model: ModelExtensions, fit: MotorFit): FitDiagnosis['findings'] {
  const decided = new Set<string>();
  for (const c of candidates) {
    const e = c.added as Extension | null;
    if (e === null) continue;
    // A drive-saturation finding is settled only when both limits were tried.
    if (e === 'voltageLimit' || e === 'currentLimit') {
      if (candidates.some((x) => x.added === 'voltageLimit') && candidates.some((x) => x.added === 'currentLimit')) decided.add('drive-saturation');
    } else for (const code of FINDING_OF[e]) decided.add(code);
  }
  const out = d.findings.filter((f) => !decided.has(f.code));
  for (const e of ORDER) {
    if (!model[e]) continue;
    const c = candidates.find((x) => x.added === e && x.accepted);
    const evidence: Record<string, number | string> = {};
    for (const name of EFFECT_CONSTANTS[e]) {
      const p = fit.parameters[name];
      if (p !== undefined) evidence[`${name} [${p.unit}]`] = Number(p.value.toPrecision(4));
    }
    if (c?.comparison) {
      evidence['F-test p'] = Number(c.comparison.fPValue.toPrecision(2));
      evidence['BIC drop'] = Number((c.comparison.bic[0] - c.comparison.bic[1]).toPrecision(3));
    }
    out.push({
      code: FINDING_OF[e][0]!, severity: 'info', recording: null, origin: 'fit-covariance',
      title: `The data support ${WORDS[e]}: it is in the fitted model`,
      evidence,
      advice: `The constants above include ${WORDS[e]}; the lumped linear model alone would bias the others. See the model choice for the comparison.`,
    });
  }
  return out;
}
