import { FIGURES, RENAMED_FIGURE_KEYS } from './figureDefinitions.js';
import { ParameterSetError } from './ParameterSetError.js';
import type { DerivedFigure, ParameterEntry, ParameterSet, RecordingSummary, TuningGain } from './types.js';

const FN = 'readParameterSet';
type Obj = Record<string, unknown>;

function fail(path: string, what: string, got: unknown): never {
  let shown: string;
  try { shown = JSON.stringify(got) ?? String(got); } catch { shown = String(got); }
  if (shown.length > 60) shown = `${shown.slice(0, 57)}...`;
  throw new ParameterSetError('invalid-field', path, `${FN}: ${path} must be ${what} (got ${shown})`);
}
function obj(v: unknown, path: string): Obj {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) fail(path, 'an object', v);
  return v as Obj;
}
function str(o: Obj, k: string, path: string): string {
  if (typeof o[k] !== 'string') fail(`${path}${k}`, 'a string', o[k]);
  return o[k] as string;
}
function bool(o: Obj, k: string, path: string): boolean {
  if (typeof o[k] !== 'boolean') fail(`${path}${k}`, 'true or false', o[k]);
  return o[k] as boolean;
}
function num(o: Obj, k: string, path: string): number {
  if (typeof o[k] !== 'number' || !Number.isFinite(o[k])) fail(`${path}${k}`, 'a finite number', o[k]);
  return o[k] as number;
}
function numOrNull(o: Obj, k: string, path: string): number | null {
  if (o[k] === null) return null;
  if (typeof o[k] !== 'number' || !Number.isFinite(o[k])) fail(`${path}${k}`, 'a finite number or null', o[k]);
  return o[k] as number;
}
function interval(o: Obj, k: string, path: string): [number, number] | null {
  const v = o[k];
  if (v === null) return null;
  if (!Array.isArray(v) || v.length !== 2) fail(`${path}${k}`, 'null or an array [low, high]', v);
  const a = v as unknown[];
  for (const i of [0, 1]) if (typeof a[i] !== 'number' || !Number.isFinite(a[i])) fail(`${path}${k}[${i}]`, 'a finite number', a[i]);
  if ((a[0] as number) > (a[1] as number)) fail(`${path}${k}`, 'an interval with low ≤ high', v);
  return [a[0] as number, a[1] as number];
}
function strings(o: Obj, k: string, path: string): string[] {
  const v = o[k];
  if (!Array.isArray(v)) fail(`${path}${k}`, 'an array of strings', v);
  (v as unknown[]).forEach((s, i) => { if (typeof s !== 'string') fail(`${path}${k}[${i}]`, 'a string', s); });
  return [...(v as string[])];
}
function oneOf<T extends string | number>(o: Obj, k: string, path: string, allowed: readonly T[]): T {
  if (!allowed.includes(o[k] as T)) fail(`${path}${k}`, `one of ${allowed.map((a) => JSON.stringify(a)).join(', ')}`, o[k]);
  return o[k] as T;
}

function readEntry(v: unknown, path: string): ParameterEntry {
  const o = obj(v, path);
  const p = `${path}.`;
  return {
    value: numOrNull(o, 'value', p), unit: str(o, 'unit', p), ci95: interval(o, 'ci95', p), identifiable: bool(o, 'identifiable', p),
    standardError: numOrNull(o, 'standardError', p), fixed: bool(o, 'fixed', p), informedBy: strings(o, 'informedBy', p), note: str(o, 'note', p),
  };
}
function readFigure(v: unknown, path: string): DerivedFigure {
  const o = obj(v, path);
  const p = `${path}.`;
  return {
    label: str(o, 'label', p), value: numOrNull(o, 'value', p), unit: str(o, 'unit', p), ci95: interval(o, 'ci95', p),
    identifiable: bool(o, 'identifiable', p), formula: str(o, 'formula', p), note: str(o, 'note', p),
  };
}
function readJson(v: unknown, path: string, depth: number): unknown {
  if (depth > 32) fail(path, 'nested at most 32 levels deep', '…');
  if (Array.isArray(v)) return v.map((x, i) => readJson(x, `${path}[${i}]`, depth + 1));
  if (v !== null && typeof v === 'object') {
    const o: Obj = {};
    for (const [k, x] of Object.entries(v)) o[k] = readJson(x, `${path}.${k}`, depth + 1);
    return o;
  }
  return v;
}

/**
 * Read a parameter set document back from JSON text and check every field against
 * `motorprint.parameter-set/1` (the rules of docs/parameter-set.schema.json).
 *
 * @param text - JSON text as written by `formatParameterSetJson`
 * @returns the validated parameter set (a fresh object; numbers exactly as written)
 * @throws ParameterSetError (a TypeError) with `code` `invalid-json`, `wrong-schema` or
 *   `invalid-field` and the dotted `path` of the first offending field
 * @example
 * readParameterSet(formatParameterSetJson(set)).parameters.R.value; // => set.parameters.R.value
 */
export function readParameterSet(text: string): ParameterSet {
  if (typeof text !== 'string') throw new ParameterSetError('invalid-json', '', `${FN}: text must be a string (got ${typeof text})`);
  let root: unknown;
  try {
    root = JSON.parse(text);
  } catch (e) {
    throw new ParameterSetError('invalid-json', '', `${FN}: not valid JSON (${(e as Error).message})`);
  }
  const r = obj(root, '(document)');
  if (r.schema !== 'motorprint.parameter-set/1') {
    throw new ParameterSetError('wrong-schema', 'schema',
      `${FN}: schema must be "motorprint.parameter-set/1" (got ${JSON.stringify(r.schema) ?? 'nothing'}); this reader knows version 1 only`);
  }
  const ident = obj(r.identification, 'identification');
  const identification: Record<string, string> = {};
  for (const k of Object.keys(ident)) identification[k] = str(ident, k, 'identification.');
  const va = obj(r.variant, 'variant');
  const variant = {
    torqueConstant: oneOf(va, 'torqueConstant', 'variant.', ['equal', 'separate'] as const),
    coulomb: bool(va, 'coulomb', 'variant.'),
    extensions: va.extensions === undefined ? [] : Array.isArray(va.extensions) && va.extensions.every((x) => typeof x === 'string') ? (va.extensions as string[]).slice() : fail('variant.extensions', 'an array of strings', va.extensions),
    description: str(va, 'description', 'variant.'),
  };
  const po = obj(r.parameters, 'parameters');
  const parameters = {} as ParameterSet['parameters'];
  const OPTIONAL_KEYS = ['Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rs', 'Rth', 'Cth', 'R20', 'R+Rs', 'Kt/Ke', 'b/J', 'Tc/J', 'c/J', 'speed gain', 'mechanical time constant'];
  for (const c of ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const) parameters[c] = readEntry(po[c], `parameters.${c}`);
  for (const k of Object.keys(po)) {
    if (['R', 'L', 'Kt', 'Ke', 'J', 'b'].includes(k)) continue;
    if (!OPTIONAL_KEYS.includes(k)) fail(`parameters.${k}`, `absent (unknown constant; known: R, L, Kt, Ke, J, b, ${OPTIONAL_KEYS.join(', ')})`, k);
    parameters[k] = readEntry(po[k], `parameters.${k}`);
  }

  const ro = obj(r.resistanceAtReference, 'resistanceAtReference');
  const rp = 'resistanceAtReference.';
  const resistanceAtReference: ParameterSet['resistanceAtReference'] = {
    value: numOrNull(ro, 'value', rp), unit: oneOf(ro, 'unit', rp, ['Ω'] as const), ci95: interval(ro, 'ci95', rp),
    referenceTemperature: num(ro, 'referenceTemperature', rp), windingTemperature: numOrNull(ro, 'windingTemperature', rp),
    windingTemperatureSource: oneOf(ro, 'windingTemperatureSource', rp, ['temperature channel', 'option', 'unknown'] as const),
    copperConstant: oneOf(ro, 'copperConstant', rp, [234.5, 235] as const),
    form: oneOf(ro, 'form', rp, ['IEEE Std 113 form', 'IEC 60034-1 form'] as const),
    factor: numOrNull(ro, 'factor', rp), note: str(ro, 'note', rp),
  };
  const rv = obj(r.ratedVoltage, 'ratedVoltage');
  const ratedVoltage = { value: numOrNull(rv, 'value', 'ratedVoltage.'), unit: oneOf(rv, 'unit', 'ratedVoltage.', ['V'] as const), source: str(rv, 'source', 'ratedVoltage.') };
  if (ratedVoltage.value !== null && !(ratedVoltage.value > 0)) fail('ratedVoltage.value', 'a number > 0 or null', ratedVoltage.value);
  const io = obj(r.intervals, 'intervals');
  const intervals = {
    level: num(io, 'level', 'intervals.'), method: str(io, 'method', 'intervals.'),
    degreesOfFreedom: numOrNull(io, 'degreesOfFreedom', 'intervals.'), tQuantile: numOrNull(io, 'tQuantile', 'intervals.'),
  };
  if (!(intervals.level > 0 && intervals.level < 1)) fail('intervals.level', 'a number between 0 and 1', intervals.level);
  const dobj = obj(r.derived, 'derived');
  const derived: Record<string, DerivedFigure> = {};
  for (const k of Object.keys(dobj)) {
    const figure = readFigure(dobj[k], `derived.${k}`);
    // A figure key renamed since the file was written is read under its current key and label.
    const renamed = Object.hasOwn(RENAMED_FIGURE_KEYS, k) ? RENAMED_FIGURE_KEYS[k]! : undefined;
    if (renamed === undefined) { derived[k] = figure; continue; }
    if (Object.hasOwn(dobj, renamed)) continue;
    derived[renamed] = { ...figure, label: FIGURES.find((f) => f.key === renamed)?.label ?? figure.label };
  }
  const fo = obj(r.fit, 'fit');
  if (!Array.isArray(fo.recordings)) fail('fit.recordings', 'an array', fo.recordings);
  const fit: ParameterSet['fit'] = {
    converged: bool(fo, 'converged', 'fit.'), stopReason: str(fo, 'stopReason', 'fit.'), rows: num(fo, 'rows', 'fit.'),
    residualVariance: numOrNull(fo, 'residualVariance', 'fit.'),
    recordings: (fo.recordings as unknown[]).map((x, i) => {
      const p = `fit.recordings[${i}]`;
      const o = obj(x, p);
      if (!Array.isArray(o.channels)) fail(`${p}.channels`, 'an array', o.channels);
      return {
        name: str(o, 'name', `${p}.`), kind: str(o, 'kind', `${p}.`), samples: num(o, 'samples', `${p}.`),
        channels: (o.channels as unknown[]).map((y, j) => {
          const q = `${p}.channels[${j}]`;
          const c = obj(y, q);
          const out: RecordingSummary['channels'][number] = { channel: str(c, 'channel', `${q}.`), sigma: numOrNull(c, 'sigma', `${q}.`), rms: numOrNull(c, 'rms', `${q}.`), nrmse: numOrNull(c, 'nrmse', `${q}.`) };
          // Sets written before the whiteness was kept have no key; null when not judged.
          if (c.whiteness !== undefined && c.whiteness !== null) {
            const w = obj(c.whiteness, `${q}.whiteness`);
            out.whiteness = { lags: num(w, 'lags', `${q}.whiteness.`), statistic: numOrNull(w, 'statistic', `${q}.whiteness.`), pValue: numOrNull(w, 'pValue', `${q}.whiteness.`) };
          } else if (c.whiteness === null) out.whiteness = null;
          return out;
        }),
      };
    }),
  };
  if (!Array.isArray(r.notInformed)) fail('notInformed', 'an array', r.notInformed);
  const notInformed = (r.notInformed as unknown[]).map((x, i) => {
    const p = `notInformed[${i}].`;
    const o = obj(x, `notInformed[${i}]`);
    return { name: str(o, 'name', p), reason: str(o, 'reason', p), wouldInform: str(o, 'wouldInform', p) };
  });
  if (!Array.isArray(r.findings)) fail('findings', 'an array', r.findings);
  const findings = (r.findings as unknown[]).map((x, i) => {
    const p = `findings[${i}].`;
    const o = obj(x, `findings[${i}]`);
    const ev = obj(o.evidence, `${p}evidence`);
    const evidence: Record<string, number | string> = {};
    for (const [k, v] of Object.entries(ev)) {
      if (typeof v === 'string' || (typeof v === 'number' && Number.isFinite(v))) evidence[k] = v;
      else fail(`${p}evidence.${k}`, 'a string or a finite number', v);
    }
    return {
      code: str(o, 'code', p), severity: oneOf(o, 'severity', p, ['info', 'warning', 'problem'] as const),
      title: str(o, 'title', p), evidence, advice: str(o, 'advice', p),
    };
  });
  const pv = obj(r.provenance, 'provenance');
  const tool = obj(pv.tool, 'provenance.tool');
  if (!Array.isArray(pv.inputs)) fail('provenance.inputs', 'an array', pv.inputs);
  const provenance: ParameterSet['provenance'] = {
    tool: { name: str(tool, 'name', 'provenance.tool.'), version: str(tool, 'version', 'provenance.tool.') },
    date: str(pv, 'date', 'provenance.'),
    inputs: (pv.inputs as unknown[]).map((x, i) => {
      const p = `provenance.inputs[${i}].`;
      const o = obj(x, `provenance.inputs[${i}]`);
      const sha = str(o, 'sha256', p);
      if (!/^[0-9a-f]{64}$/.test(sha)) fail(`${p}sha256`, '64 lowercase hex digits', sha);
      return { file: str(o, 'file', p), sha256: sha };
    }),
    options: readJson(obj(pv.options, 'provenance.options'), 'provenance.options', 0) as ParameterSet['provenance']['options'],
  };
  const out: ParameterSet = {
    schema: 'motorprint.parameter-set/1', identification, variant, parameters, resistanceAtReference, ratedVoltage, intervals,
    derived, fit, notInformed, findings, provenance,
  };
  // The model choice and the held-out checks are records kept as written (their shapes are in the schema).
  if (r.model !== undefined) out.model = readJson(obj(r.model, 'model'), 'model', 0) as unknown as NonNullable<ParameterSet['model']>;
  if (r.tuning !== undefined) out.tuning = readTuning(r.tuning);
  if (r.checks !== undefined) {
    if (!Array.isArray(r.checks)) fail('checks', 'an array', r.checks);
    out.checks = readJson(r.checks, 'checks', 0) as unknown as NonNullable<ParameterSet['checks']>;
  }
  return out;
}

/** The tuning section: every gain and setting checked, the texts kept. */
function readTuning(v: unknown): NonNullable<ParameterSet['tuning']> {
  const o = obj(v, 'tuning');
  const st = obj(o.settings, 'tuning.settings');
  const setting = (k: string, sources: readonly string[]): { value: number; source: 'default' | 'given' } => {
    const e = obj(st[k], `tuning.settings.${k}`);
    return { value: num(e, 'value', `tuning.settings.${k}.`), source: oneOf(e, 'source', `tuning.settings.${k}.`, sources) as 'default' | 'given' };
  };
  const rate = obj(st.controllerRateHz, 'tuning.settings.controllerRateHz');
  const gain = (path: string, g: unknown): TuningGain => {
    const e = obj(g, path);
    return { value: numOrNull(e, 'value', `${path}.`), unit: str(e, 'unit', `${path}.`), ci95: interval(e, 'ci95', `${path}.`), formula: str(e, 'formula', `${path}.`) };
  };
  const loop = (k: 'currentLoop' | 'speedLoop'): { Kp: TuningGain; Ki: TuningGain } => {
    const l = obj(o[k], `tuning.${k}`);
    return { Kp: gain(`tuning.${k}.Kp`, l.Kp), Ki: gain(`tuning.${k}.Ki`, l.Ki) };
  };
  return {
    settings: {
      currentBandwidthHz: setting('currentBandwidthHz', ['default', 'given']),
      speedBandwidthHz: setting('speedBandwidthHz', ['default', 'given']),
      phaseMarginDeg: setting('phaseMarginDeg', ['default', 'given']),
      controllerRateHz: { value: numOrNull(rate, 'value', 'tuning.settings.controllerRateHz.'), source: oneOf(rate, 'source', 'tuning.settings.controllerRateHz.', ['given', 'none'] as const) },
      maxBandwidthFraction: num(st, 'maxBandwidthFraction', 'tuning.settings.'),
    },
    currentLoop: loop('currentLoop'), speedLoop: loop('speedLoop'),
    assumptions: strings(o, 'assumptions', 'tuning.'), method: str(o, 'method', 'tuning.'), warnings: strings(o, 'warnings', 'tuning.'),
  };
}
