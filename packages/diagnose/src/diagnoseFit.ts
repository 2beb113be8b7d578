import { measuredChannel } from '@motorprint/estimate';
import type { MotorFit, MotorRecordingInput } from '@motorprint/estimate';
import { detectResidualCoulomb } from './detectResidualCoulomb.js';
import { detectResidualDelay } from './detectResidualDelay.js';
import { detectResidualTrend } from './detectResidualTrend.js';
import { detectWeakExcitation } from './detectWeakExcitation.js';
import { diagnoseParameters } from './diagnoseParameters.js';
import { sampleIntervalOf, withSharedNoise } from './internal.js';
import { modelOutput } from './passes.js';
import { residualStats } from './residualStats.js';
import { scanRecording } from './scanRecording.js';
import type {
  ChannelName, ChannelResidualDiagnosis, DiagnoseFitOptions, DiagnosisComparison, DiagnosisFinding, FitDiagnosis,
  RecordingDescription,
} from './types.js';

const CHANNELS: readonly ChannelName[] = ['voltage', 'current', 'speed', 'position', 'torque', 'temperature'];

/**
 * Says how far to trust a `fitMotor` result: per constant the value, standard error, 95 %
 * interval and whether the recordings identify it (with the reason and the recording that would
 * when they do not); the correlation and conditioning of the estimate; residual statistics per
 * recording and channel; findings from the recordings and from the fit; the model comparisons
 * behind them.
 *
 * ## Method
 * - Intervals: read from the estimator (`fit.parameters[c].standardError`/`interval95`), which
 *   states them once from s²(JᵀJ)⁺ at the optimum (widened by its sandwich where residuals are
 *   correlated); the conditioning from `fit.information`. The diagnosis does not refit: the model
 *   choice is `identifyMotor`'s.
 * - Identifiability: the constants in `fit.notInformed` (with the estimator's reason), the rules of
 *   `assessIdentifiability` on the recordings' kinds, channels and sample intervals (τe = L/R from
 *   the fit), and the rank of the covariance; an unidentifiable constant gets no interval.
 * - Residuals: `residualStats` of each kept residual series (model − measured) against the
 *   measured channel.
 * - Findings: `scanRecording` on each recording (origin `recording-scan`); from the fit
 *   (origin `fit-residuals`) `detectResidualTrend`, `detectResidualCoulomb` (when the model has
 *   no Tc) and `detectResidualDelay` on every residual series; from the covariance
 *   (`fit-covariance`) `detectWeakExcitation` (condition number > 1e4 or rank deficient).
 *
 * ## References
 * D. M. Bates, D. G. Watts (1988), Nonlinear Regression Analysis and Its Applications, Wiley, §2.3,
 * doi:10.1002/9780470316757. L. Ljung (1999), System Identification: Theory for the User, 2nd ed.,
 * §16.6 (residual analysis). Ljung & Box (1978) doi:10.1093/biomet/65.2.297.
 *
 * @param fit - result of `fitMotor` on `recordings`
 * @param recordings - the same `{ recording, kind?, name? }` items, in the same order
 * @param options - scans, re-fit, the original fit options, alpha, lags
 * @returns the {@link FitDiagnosis}
 * @throws TypeError when the fit or the recordings do not match (count, sample counts, shapes)
 * @throws RangeError when `alpha` is not in (0, 1) or `maxLag` is not a positive integer
 * @example
 * const recs = [{ recording: locked, kind: 'locked-rotor' }, { recording: prbs, kind: 'prbs' }];
 * const d = diagnoseFit(fitMotor(recs), recs);
 * d.parameters.R; // => { value: 2.0004, unit: 'Ω', standardError: 0.0009, interval95: [1.9986, 2.0022], identifiable: true, fixed: false }
 */
export function diagnoseFit(fit: MotorFit, recordings: MotorRecordingInput[], options: DiagnoseFitOptions = {}): FitDiagnosis {
  // The scans and the residual detectors read the same channels' noise levels: each once.
  return withSharedNoise(() => diagnoseShared(fit, recordings, options));
}

function diagnoseShared(fit: MotorFit, recordings: MotorRecordingInput[], options: DiagnoseFitOptions): FitDiagnosis {
  const fn = 'diagnoseFit';
  if (fit === null || typeof fit !== 'object' || !Array.isArray(fit.theta) || !Array.isArray(fit.fittedNames) || !(fit.normalMatrix instanceof Float64Array) || !Array.isArray(fit.recordings)) {
    throw new TypeError(`${fn}: fit must be a MotorFit (the result of fitMotor)`);
  }
  if (!Array.isArray(recordings)) throw new TypeError(`${fn}: recordings must be an array of { recording, kind?, name? }`);
  if (recordings.length !== fit.recordings.length) {
    throw new TypeError(`${fn}: recordings has ${recordings.length} entries but the fit was made on ${fit.recordings.length}`);
  }
  recordings.forEach((item, i) => {
    const rec = item?.recording;
    if (rec === null || typeof rec !== 'object' || !(rec.time instanceof Float64Array) || rec.channels === null || typeof rec.channels !== 'object') {
      throw new TypeError(`${fn}: recordings[${i}].recording must be { time: Float64Array, channels }`);
    }
    if (rec.time.length !== fit.recordings[i]!.samples) {
      throw new TypeError(`${fn}: recordings[${i}] has ${rec.time.length} samples but the fit's recording ${JSON.stringify(fit.recordings[i]!.name)} has ${fit.recordings[i]!.samples}`);
    }
  });
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object`);
  const alpha = options.alpha ?? 0.01;
  if (!(alpha > 0 && alpha < 1)) throw new RangeError(`${fn}: options.alpha must be in (0, 1) (got ${alpha})`);
  if (options.maxLag !== undefined && !(Number.isInteger(options.maxLag) && options.maxLag >= 1)) {
    throw new RangeError(`${fn}: options.maxLag must be an integer >= 1 (got ${options.maxLag})`);
  }
  const scan = options.scanRecordings ?? true;

  const descriptions: RecordingDescription[] = recordings.map((item, i) => ({
    name: fit.recordings[i]!.name,
    kind: fit.recordings[i]!.kind,
    channels: CHANNELS.filter((c) => item.recording.channels[c] instanceof Float64Array),
    sampleInterval: sampleIntervalOf(item.recording),
  }));
  const part = diagnoseParameters(fit, descriptions);

  const residuals: ChannelResidualDiagnosis[] = [];
  const findings: DiagnosisFinding[] = [];
  const comparisons: DiagnosisComparison[] = [];
  recordings.forEach((item, i) => {
    const rep = fit.recordings[i]!;
    const rec = item.recording;
    const voltage = rec.channels.voltage;
    const speed = rec.channels.speed;
    const speedSigma = rep.channels.find((c) => c.channel === 'speed')?.sigma ?? NaN;
    const hasAngle = rep.channels.some((c) => c.channel === 'angle');
    for (const ch of rep.channels) {
      // An encoder speed is judged by its angle residuals (its own quantisation noise is not white).
      if (hasAngle && ch.channel === 'speed') continue;
      const measured = measuredChannel(rec, ch.channel);
      const res = ch.residuals;
      if (!(measured instanceof Float64Array) || res === null || res.length !== measured.length) continue;
      const { predicted, finiteRows } = modelOutput(measured, res);
      if (finiteRows < 8) continue;
      const lag = Math.min(options.maxLag ?? Math.min(50, Math.floor(finiteRows / 4)), finiteRows - 1);
      residuals.push({ recording: rep.name, kind: rep.kind, channel: ch.channel, stats: residualStats(measured, predicted, lag) });
      const tag = (f: ReturnType<typeof detectResidualTrend>): void => { if (f) findings.push({ ...f, recording: rep.name, origin: 'fit-residuals' }); };
      if ((ch.channel !== 'current' && ch.channel !== 'speed') || item.recording.layout === 'table') continue;
      tag(detectResidualTrend(rec.time, res, ch.channel, rep.kind));
      if (!fit.variant.coulomb && speed instanceof Float64Array && speed.length === res.length && rep.kind !== 'coast-down') {
        tag(detectResidualCoulomb(speed, res, ch.channel, speedSigma));
      }
      if (voltage instanceof Float64Array && rep.kind !== 'coast-down' && rep.kind !== 'steady-state') {
        tag(detectResidualDelay(voltage, res, predicted, descriptions[i]!.sampleInterval));
      }
    }
    // A table of steady points is not a time series: the data-only detectors do not apply.
    if (scan && item.recording.layout !== 'table') {
      const s = scanRecording(rec, { kind: rep.kind, alpha });
      for (const f of s.findings) {
        if (f.code === 'coulomb-friction' && fit.variant.coulomb) {
          // The fitted model already carries Tc: keep the evidence, but as a note, not a call to act.
          findings.push({
            ...f,
            severity: 'info',
            title: `${f.title} (the fitted model includes it as Tc)`,
            advice: 'The fitted model includes Coulomb friction Tc; this finding is the evidence for it. Compare Tc with the friction seen here.',
            recording: rep.name,
            origin: 'recording-scan',
          });
          continue;
        }
        findings.push({ ...f, recording: rep.name, origin: 'recording-scan' });
      }
      for (const c of s.comparisons) comparisons.push({ ...c, recording: rep.name });
    }
  });
  // The supply's source resistance, where both voltages were logged and it shows clearly.
  const rs = fit.parameters.Rs;
  if (rs !== undefined && rs.identified !== false && rs.interval95 !== undefined && rs.interval95[0] > 0) {
    findings.push({
      code: 'source-resistance',
      severity: 'info',
      title: `The supply has a source resistance Rs = ${rs.value.toPrecision(3)} Ω: the terminal voltage sags by Rs·i`,
      evidence: { Rs: rs.value, RsLow: rs.interval95[0], RsHigh: rs.interval95[1], informedBy: (rs.informedBy ?? []).join(', ') },
      advice: 'R is the winding alone. A model driven from this supply needs R + Rs in its armature circuit; a stiffer supply or shorter leads remove the sag.',
      recording: null,
      origin: 'fit-covariance',
    });
  }
  if (part.summary !== null) {
    const w = detectWeakExcitation(null, part.summary);
    if (w) findings.push({ ...w, recording: null, origin: 'fit-covariance' });
  }

  const sv = part.summary === null ? [] : Array.from(part.summary.singularValues);
  const cond = part.summary?.conditionNumber ?? NaN;
  return {
    parameters: part.parameters,
    degreesOfFreedom: part.degreesOfFreedom,
    correlation: part.correlation,
    singularValues: sv,
    conditionNumber: Number.isFinite(cond) ? cond : null,
    residuals,
    findings,
    comparisons,
  };
}
