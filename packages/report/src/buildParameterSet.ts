import type { MotorFit, RecordingData } from '@motorprint/estimate';
import { checkProvenance } from './checkProvenance.js';
import { constantCovariance } from './constantCovariance.js';
import { derivedFigures } from './derivedFigures.js';
import { formatNumber } from './formatNumber.js';
import { loopTuning } from './loopTuning.js';
import { normaliseResistance } from './normaliseResistance.js';
import type { BuildParameterSetOptions, ModelChoiceRecord, ParameterEntry, ParameterSet, ReportFinding } from './types.js';

const UNITS: Record<string, string> = {
  R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m', Ts: 'N·m', c: 'N·m·s²/rad²',
  Vmax: 'V', Imax: 'A', Rs: 'Ω', Rth: 'K/W', Cth: 'J/K', R20: 'Ω',
};
const ORDER: string[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rs', 'Rth', 'Cth', 'R20'];
const LUMPED: readonly string[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b'];

function finiteOrNull(x: number | undefined): number | null {
  return x !== undefined && Number.isFinite(x) ? x : null;
}

function meanTemperature(recordings: readonly RecordingData[]): number | null {
  let s = 0, n = 0;
  for (const r of recordings) {
    const t = r.channels.temperature;
    if (t === undefined) continue;
    for (let k = 0; k < t.length; k++) if (Number.isFinite(t[k]!)) { s += t[k]!; n++; }
  }
  return n > 0 ? s / n : null;
}

function largestStep(fit: Pick<MotorFit, 'recordings'>): { value: number; from: string } | null {
  let best: { value: number; from: string } | null = null;
  for (const r of fit.recordings) {
    for (const [k, v] of Object.entries(r.nuisance)) {
      if (!/^level\d+$/.test(k) || !Number.isFinite(v)) continue;
      if (best === null || Math.abs(v) > best.value) best = { value: Math.abs(v), from: r.name };
    }
  }
  return best !== null && best.value > 0 ? best : null;
}

/**
 * Build the versioned parameter set document (`motorprint.parameter-set/1`) from a fit: each
 * constant in SI with its 95 % interval and identifiability, R at the reference temperature, the
 * derived datasheet figures with propagated intervals, the fit summary, the findings and the
 * provenance. Pure: no clock, no files — the caller passes the date and the file hashes.
 *
 * ## Method
 * Constant intervals are the fit's (Student-t on the log scale). A constant is marked not
 * identifiable when it is fixed, not informed, has no interval, or the diagnosis says so.
 * Winding temperature: `options.windingTemperature`, else the mean of all finite samples of the
 * temperature channels of `options.recordings`. Rated voltage: `options.ratedVoltage`, else the
 * largest |voltage level| the fit found in a step-like command. Derived figures: `derivedFigures`
 * with `constantCovariance(fit)` (delta method, central-difference gradient w.r.t. the fitted
 * parameters).
 *
 * @param fit - result of `fitMotor`
 * @param options - see {@link BuildParameterSetOptions}; `provenance` is required
 * @returns the parameter set (JSON-able, no NaN: missing numbers are null)
 * @throws TypeError when `fit` is not a fit or `options.provenance` is malformed
 * @throws RangeError for out-of-domain options (temperatures, rated voltage ≤ 0, copper constant)
 * @example
 * const set = buildParameterSet(fit, { provenance: { tool: { name: 'motorprint', version: '0.1.0' }, date: '2025-03-01T10:00:00Z', inputs: [], options: {} } });
 * set.parameters.R.value; // ≈ 2.0 Ω
 */
export function buildParameterSet(fit: MotorFit, options: BuildParameterSetOptions): ParameterSet {
  const fn = 'buildParameterSet';
  if (fit === null || typeof fit !== 'object' || typeof fit.parameters !== 'object' || !Array.isArray(fit.recordings)) {
    throw new TypeError(`${fn}: fit must be the result of fitMotor (object with parameters and recordings)`);
  }
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object with at least provenance`);
  const provenance = checkProvenance(fn, 'options.provenance', options.provenance);
  const recordings = options.recordings ?? [];
  if (!Array.isArray(recordings)) throw new TypeError(`${fn}: options.recordings must be an array`);
  const referenceTemperature = options.referenceTemperature ?? 25;
  const copperConstant = options.copperConstant ?? 234.5;
  if (options.ratedVoltage !== undefined && !(Number.isFinite(options.ratedVoltage) && options.ratedVoltage > 0)) {
    throw new RangeError(`${fn}: options.ratedVoltage must be a finite number > 0 (got ${options.ratedVoltage})`);
  }
  if (options.windingTemperature !== undefined && !Number.isFinite(options.windingTemperature)) {
    throw new RangeError(`${fn}: options.windingTemperature must be a finite number (got ${options.windingTemperature})`);
  }
  const identification: Record<string, string> = {};
  for (const [k, v] of Object.entries(options.identification ?? {})) {
    if (typeof v !== 'string') throw new TypeError(`${fn}: options.identification.${k} must be a string (got ${typeof v})`);
    identification[k] = v;
  }

  const verdicts = new Map<string, { identifiable: boolean; reason: string }>();
  for (const [name, v] of Object.entries(options.diagnosis?.parameters ?? {})) verdicts.set(name, { identifiable: v.identifiable, reason: v.reason ?? '' });
  const notInformed = new Map(fit.notInformed.map((u) => [u.name as string, u]));

  const entries: Record<string, ParameterEntry> = {};
  const keys = [...ORDER, ...Object.keys(fit.parameters).filter((k) => !ORDER.includes(k))];
  for (const c of keys) {
    const est = fit.parameters[c];
    if (!LUMPED.includes(c) && est === undefined) continue;
    if (est === undefined) {
      const u = notInformed.get(c);
      entries[c] = {
        value: null, unit: UNITS[c] ?? '', ci95: null, identifiable: false, standardError: null, fixed: false, informedBy: [],
        note: u !== undefined ? `not informed: ${u.reason}; ${u.wouldInform} would inform it` : 'not estimated by the fit',
      };
      continue;
    }
    const verdict = verdicts.get(c);
    const fixed = est.fixed === true;
    const hasInterval = est.interval95 !== undefined && Number.isFinite(est.interval95[0]) && Number.isFinite(est.interval95[1]);
    const identifiable = !fixed && hasInterval && verdict?.identifiable !== false;
    let note = '';
    if (fixed) note = 'fixed by the caller (not fitted)';
    else if (verdict?.identifiable === false) note = `not identifiable: ${verdict.reason || 'see the diagnosis'}`;
    else if (!hasInterval) note = 'not identifiable: the covariance gives no usable interval (the data do not separate it from the other constants)';
    entries[c] = {
      value: Number.isFinite(est.value) ? est.value : null,
      unit: est.unit || (UNITS[c] ?? ''),
      ci95: identifiable ? [est.interval95![0], est.interval95![1]] : null,
      identifiable,
      standardError: identifiable ? finiteOrNull(est.standardError) : null,
      fixed,
      informedBy: [...(est.informedBy ?? [])],
      note,
    };
  }
  // Effects the data do not support: no value, the bound their candidate fit set.
  for (const u of options.unsupported ?? []) {
    for (const c of u.constants) {
      if (entries[c] !== undefined) continue;
      const b = u.bounds[c];
      const bound = b?.upper95 !== null && b?.upper95 !== undefined && Number.isFinite(b.upper95) ? `< ${formatNumber(b.upper95, 3)} ${b.unit} at 95 %` : 'no upper bound from these recordings';
      entries[c] = {
        value: null, unit: b?.unit ?? UNITS[c] ?? '', ci95: null, identifiable: false, standardError: null, fixed: false, informedBy: [],
        note: `not distinguishable from 0 (${bound}): ${u.reason}; left out of the model`,
      };
    }
  }
  const parameters = entries as ParameterSet['parameters'];

  // Winding temperature and R at the reference temperature.
  const channelT = meanTemperature(recordings);
  const windingT = options.windingTemperature ?? channelT;
  // With the heating model, R is the resistance at 20 °C (the copper law's reference there).
  const R = parameters.R;
  let resistanceAtReference;
  if (R.value !== null) {
    resistanceAtReference = normaliseResistance(R.value, R.ci95, windingT, referenceTemperature, copperConstant,
      options.windingTemperature !== undefined ? 'option' : 'temperature channel');
  } else {
    const base = normaliseResistance(1, null, null, referenceTemperature, copperConstant);
    resistanceAtReference = { ...base, windingTemperature: windingT, note: 'not computed: R itself is not informed by these recordings' };
  }

  // Rated voltage.
  let ratedVoltage: ParameterSet['ratedVoltage'];
  if (options.ratedVoltage !== undefined) ratedVoltage = { value: options.ratedVoltage, unit: 'V', source: 'given by the caller' };
  else {
    const s = largestStep(fit);
    ratedVoltage = s !== null
      ? { value: s.value, unit: 'V', source: `largest step voltage seen (recording "${s.from}"), not a rating given by the caller` }
      : { value: null, unit: 'V', source: 'none: no voltage step seen and none given' };
  }

  // Derived figures with intervals from the covariance.
  const cov = constantCovariance(fit);
  cov.names.forEach((c, i) => {
    if (verdicts.get(c)?.identifiable === false) cov.identifiable[i] = false;
  });
  const derived = derivedFigures(cov, ratedVoltage.value);

  const findings: ReportFinding[] = [...(options.diagnosis?.findings ?? []), ...(options.findings ?? [])].map((f) => {
    const evidence = cleanEvidence(f.evidence);
    // Diagnosis findings name the recording they concern; keep it with the evidence.
    const rec = (f as { recording?: unknown }).recording;
    if (typeof rec === 'string' && evidence.recording === undefined) evidence.recording = rec;
    return { code: f.code, severity: f.severity, title: f.title, evidence, advice: f.advice };
  });

  return {
    schema: 'motorprint.parameter-set/1',
    identification,
    variant: { torqueConstant: fit.variant.torqueConstant, coulomb: fit.variant.coulomb, extensions: [...(fit.variant.extensions ?? [])], description: fit.variant.description },
    ...(options.model !== undefined ? { model: recordModel(options.model) } : {}),
    ...(options.checks !== undefined && options.checks.length > 0 ? { checks: options.checks.map((c) => ({ ...c, channels: c.channels.map((x) => ({ ...x })) })) } : {}),
    parameters,
    resistanceAtReference,
    ratedVoltage,
    intervals: {
      level: 0.95,
      method: 'constants: Student-t on the fitted (log) scale from σ²(JᵀJ)⁻¹; derived figures: delta method on ln f, ' +
        'central-difference gradient w.r.t. the fitted parameters, nuisance parameters marginalised',
      degreesOfFreedom: finiteOrNull(cov.degreesOfFreedom),
      tQuantile: finiteOrNull(cov.tQuantile),
    },
    derived,
    ...(options.tuning !== undefined ? { tuning: loopTuning(cov, options.tuning) } : {}),
    fit: {
      converged: fit.converged,
      stopReason: String(fit.stopReason),
      rows: fit.rows,
      residualVariance: finiteOrNull(fit.residualVariance),
      recordings: fit.recordings.map((r) => ({
        name: r.name, kind: r.kind, samples: r.samples,
        channels: r.channels.map((c) => {
          const lb = options.diagnosis?.residuals?.find((d) => d.recording === r.name && d.channel === c.channel)?.stats.ljungBox;
          return {
            channel: c.channel, sigma: finiteOrNull(c.sigma), rms: finiteOrNull(c.rms), nrmse: finiteOrNull(c.nrmse),
            whiteness: lb === undefined ? null : { lags: lb.lags, statistic: finiteOrNull(lb.statistic), pValue: finiteOrNull(lb.pValue) },
          };
        }),
      })),
    },
    notInformed: fit.notInformed.map((u) => ({ name: u.name, reason: u.reason, wouldInform: u.wouldInform })),
    findings,
    provenance,
  };
}

function cleanEvidence(e: Record<string, number | string>): Record<string, number | string> {
  const out: Record<string, number | string> = {};
  for (const [k, v] of Object.entries(e)) out[k] = typeof v === 'number' && !Number.isFinite(v) ? String(v) : v;
  return out;
}

/** A JSON-clean copy of the model choice (non-finite numbers as null). */
function recordModel(m: ModelChoiceRecord): ModelChoiceRecord {
  const num = (x: number): number => (Number.isFinite(x) ? x : (null as unknown as number));
  return {
    extensions: [...m.extensions], forced: m.forced, summary: m.summary,
    candidates: m.candidates.map((c) => ({
      extensions: [...c.extensions], added: c.added, converged: c.converged, accepted: c.accepted, reason: c.reason,
      comparison: c.comparison === null ? null : { fPValue: num(c.comparison.fPValue), aic: [num(c.comparison.aic[0]), num(c.comparison.aic[1])], bic: [num(c.comparison.bic[0]), num(c.comparison.bic[1])] },
      ...(c.scoreTest !== undefined ? { scoreTest: { statistic: num(c.scoreTest.statistic), pValue: num(c.scoreTest.pValue) } } : {}),
    })),
  };
}
