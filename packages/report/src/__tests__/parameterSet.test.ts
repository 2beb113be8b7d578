import { beforeAll, describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { expectClose } from '@motorprint/testkit';
import type { MotorFit } from '@motorprint/estimate';
import { buildParameterSet } from '../buildParameterSet.js';
import { formatParameterSetCsv } from '../formatParameterSetCsv.js';
import { formatParameterSetJson } from '../formatParameterSetJson.js';
import { formatParameterSetMarkdown } from '../formatParameterSetMarkdown.js';
import { formatNumber } from '../formatNumber.js';
import { readParameterSet } from '../readParameterSet.js';
import { ParameterSetError } from '../ParameterSetError.js';
import type { ParameterSet } from '../types.js';
import { FACTS_MOTOR, INVENTED_PROVENANCE, inventedFit, inventedInputs } from './inventedFit.js';

const schemaPath = fileURLToPath(new URL('../../../../docs/parameter-set.schema.json', import.meta.url));
const schema = JSON.parse(readFileSync(schemaPath, 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);

let fit: MotorFit;
let set: ParameterSet;
const inputs = inventedInputs();

beforeAll(() => {
  fit = inventedFit(inputs);
  set = buildParameterSet(fit, {
    recordings: inputs.map((i) => i.recording),
    identification: { motor: 'invented test motor', serial: 'X-0001', bench: 'invented bench' },
    provenance: INVENTED_PROVENANCE,
  });
});

describe('buildParameterSet', () => {
  it('carries each constant in SI with the fit\'s interval, within 5 standard errors of the invented motor', () => {
    for (const c of ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const) {
      const e = set.parameters[c];
      const est = fit.parameters[c]!;
      expect(e.identifiable, c).toBe(true);
      expect(e.value).toBe(est.value);
      expect(e.ci95).toEqual(est.interval95);
      expect(e.standardError).toBe(est.standardError);
      // Interval coverage is the estimator's to test; here a gross-error check: |est − true| < 5·SE
      // (probability of a 5σ miss ≈ 6e-7 per constant, common practice, no source).
      expect(Math.abs(e.value! - FACTS_MOTOR[c]), c).toBeLessThan(5 * e.standardError!);
    }
    expect(set.parameters.R.unit).toBe('Ω');
    expect(set.parameters.Tc).toBeUndefined();
    expect(set.variant.torqueConstant).toBe('equal');
  });

  it('normalises R from the mean of the temperature channels (40 °C) to 25 °C with k = 234.5 by default', () => {
    const r = set.resistanceAtReference;
    // The invented channels ramp 39.5 → 40.5 °C linearly, so their mean is 40 °C (derived here).
    expectClose(r.windingTemperature!, 40, { rel: 1e-12, abs: 0 }, 'mean winding temperature');
    expect(r.windingTemperatureSource).toBe('temperature channel');
    // Copper law factor (234.5 + 25)/(234.5 + 40) (FACTS.md §3 form, derived here).
    expectClose(r.value!, set.parameters.R.value! * (259.5 / 274.5), { rel: 1e-14, abs: 0 }, 'R at 25 °C');
    const iec = buildParameterSet(fit, { windingTemperature: 75, referenceTemperature: 20, copperConstant: 235, provenance: INVENTED_PROVENANCE });
    expect(iec.resistanceAtReference.windingTemperatureSource).toBe('option');
    expectClose(iec.resistanceAtReference.factor!, 255 / 310, { rel: 1e-15, abs: 0 }, 'factor (FACTS.md §3, k = 235)');
  });

  it('states the rated voltage as the largest step voltage seen when none is given', () => {
    // The generator's step is 12 V (its default, invented); the fitted level is within noise of it.
    expectClose(set.ratedVoltage.value!, 12, { rel: 2e-3, abs: 0 }, 'rated voltage');
    expect(set.ratedVoltage.source).toContain('largest step voltage');
    const given = buildParameterSet(fit, { ratedVoltage: 24, provenance: INVENTED_PROVENANCE });
    expect(given.ratedVoltage).toEqual({ value: 24, unit: 'V', source: 'given by the caller' });
    // Stall current V/R at 24 V (derived here).
    expectClose(given.derived.stallCurrent!.value!, 24 / given.parameters.R.value!, { rel: 1e-15, abs: 0 }, 'I_stall');
  });

  it('propagates intervals to the derived figures consistently with the constants\' intervals', () => {
    const V = set.ratedVoltage.value!;
    const [rLo, rHi] = set.parameters.R.ci95!;
    // I_stall = V/R depends on R alone, so its log-scale interval is [V/R_hi, V/R_lo] (derived here).
    expectClose(set.derived.stallCurrent!.ci95![0], V / rHi, { rel: 1e-9, abs: 0 }, 'I_stall low');
    expectClose(set.derived.stallCurrent!.ci95![1], V / rLo, { rel: 1e-9, abs: 0 }, 'I_stall high');
    // Kt in mN·m/A is 1000·Kt, so its interval is 1000× that of Kt (derived here).
    expectClose(set.derived.torqueConstantMilli!.ci95![1], 1000 * set.parameters.Kt.ci95![1], { rel: 1e-9, abs: 0 }, 'Kt mN·m/A high');
    // Every interval brackets its figure.
    for (const [k, f] of Object.entries(set.derived)) {
      expect(f.ci95, k).not.toBeNull();
      expect(f.ci95![0] < f.value! && f.value! < f.ci95![1], k).toBe(true);
    }
    expect(set.intervals.method).toContain('central-difference');
  });

  it('marks not-informed constants with a null value and the reason', () => {
    const lrOnly = inventedFit([inputs[1]!]);
    const s = buildParameterSet(lrOnly, { provenance: INVENTED_PROVENANCE });
    expect(s.parameters.J.value).toBeNull();
    expect(s.parameters.J.identifiable).toBe(false);
    expect(s.parameters.J.note).toContain('not informed');
    expect(s.derived.mechanicalTimeConstant!.value).toBeNull();
    expect(s.derived.electricalTimeConstant!.ci95).not.toBeNull();
    expect(validate(JSON.parse(formatParameterSetJson(s)))).toBe(true);
  });

  it('rejects a malformed provenance, naming the path', () => {
    const bad = { ...INVENTED_PROVENANCE, inputs: [{ file: 'x.csv', sha256: 'XYZ' }] };
    expect(() => buildParameterSet(fit, { provenance: bad })).toThrow('buildParameterSet: options.provenance.inputs[0].sha256 must be 64 lowercase hex digits (got "XYZ")');
    const fnOpt = { ...INVENTED_PROVENANCE, options: { solver: { onStep: () => 0 } } } as never;
    expect(() => buildParameterSet(fit, { provenance: fnOpt })).toThrow('options.provenance.options.solver.onStep must be JSON data');
    expect(() => buildParameterSet(fit, { ratedVoltage: 0, provenance: INVENTED_PROVENANCE })).toThrow(RangeError);
  });
});

describe('formatParameterSetJson / readParameterSet', () => {
  it('round-trips: the JSON reads back to the same numbers and the same document', () => {
    const text = formatParameterSetJson(set);
    const back = readParameterSet(text);
    expect(back).toEqual(set);
    for (const c of ['R', 'L', 'Kt', 'Ke', 'J', 'b'] as const) {
      expect(Object.is(back.parameters[c].value, set.parameters[c].value)).toBe(true);
      expect(back.parameters[c].ci95).toEqual(set.parameters[c].ci95);
    }
    expect(formatParameterSetJson(back)).toBe(text);
  });

  it('writes a document that validates against docs/parameter-set.schema.json (ajv, draft 2020-12)', () => {
    const ok = validate(JSON.parse(formatParameterSetJson(set)));
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  it('agrees with the schema on broken documents, and names the path', () => {
    const cases: [string, (d: Record<string, any>) => void, string][] = [
      ['parameters.R.value', (d) => { d.parameters.R.value = 'two'; }, 'parameters.R.value must be a finite number or null (got "two")'],
      ['parameters.L.ci95[1]', (d) => { d.parameters.L.ci95 = [1, 'x']; }, 'parameters.L.ci95[1] must be a finite number'],
      ['parameters.J', (d) => { delete d.parameters.J; }, 'parameters.J must be an object'],
      ['provenance.inputs[0].sha256', (d) => { d.provenance.inputs[0].sha256 = 'abc'; }, 'provenance.inputs[0].sha256 must be 64 lowercase hex digits'],
      ['findings', (d) => { d.findings = {}; }, 'findings must be an array'],
      ['resistanceAtReference.copperConstant', (d) => { d.resistanceAtReference.copperConstant = 230; }, 'must be one of 234.5, 235'],
      ['parameters.X', (d) => { d.parameters.X = d.parameters.R; }, 'parameters.X must be absent'],
    ];
    for (const [path, breakIt, message] of cases) {
      const doc = JSON.parse(formatParameterSetJson(set)) as Record<string, any>;
      breakIt(doc);
      expect(validate(doc), `schema rejects ${path}`).toBe(false);
      let err: unknown;
      try { readParameterSet(JSON.stringify(doc)); } catch (e) { err = e; }
      expect(err, path).toBeInstanceOf(ParameterSetError);
      expect((err as ParameterSetError).path).toBe(path);
      expect((err as Error).message).toContain(message);
    }
  });

  it('reads a file written before the speed-drop figure was renamed under the new key and label', () => {
    const doc = JSON.parse(formatParameterSetJson(set)) as Record<string, any>;
    const current = doc.derived.speedDropPerLoadTorqueRpm;
    expect(current.label).toBe('speed drop per load torque');
    // An older writer's keys and label for the same figures.
    const old: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(doc.derived as Record<string, any>)) {
      const oldKey = k.replace(/^speedDropPerLoadTorque/, 'speedTorqueGradient');
      old[oldKey] = oldKey === k ? v : { ...v, label: 'speed–torque gradient (speed drop per load torque)' };
    }
    doc.derived = old;
    const back = readParameterSet(JSON.stringify(doc));
    expect(Object.keys(back.derived)).not.toContain('speedTorqueGradientRpm');
    expect(back.derived.speedDropPerLoadTorqueRpm).toEqual(current);
    expect(back.derived.speedDropPerLoadTorque!.value).toBe(doc.derived.speedTorqueGradient.value);
  });

  it('throws typed errors for text that is not JSON or another schema version', () => {
    expect(() => readParameterSet('{"schema": "motorprint.parameter-set/1",')).toThrow(/readParameterSet: not valid JSON/);
    try { readParameterSet('{"schema": "motorprint.parameter-set/2"}'); } catch (e) {
      expect((e as ParameterSetError).code).toBe('wrong-schema');
      expect((e as Error).message).toContain('knows version 1 only');
    }
    expect(() => readParameterSet('{"schema": "motorprint.parameter-set/2"}')).toThrow(ParameterSetError);
  });
});

describe('formatParameterSetCsv / formatParameterSetMarkdown', () => {
  it('writes one CSV row per constant, the normalised R and each derived figure', () => {
    const lines = formatParameterSetCsv(set).trimEnd().split('\n');
    expect(lines[0]).toBe('name,value,unit,low,high,identifiable,note');
    expect(lines.length).toBe(1 + 6 + 1 + Object.keys(set.derived).length);
    const r = lines[1]!.split(',');
    expect(r.slice(0, 3)).toEqual(['R', String(set.parameters.R.value), 'Ω']);
    expect(Number(r[3])).toBe(set.parameters.R.ci95![0]);
    // Notes with commas are quoted (RFC 4180).
    const peak = lines.find((l) => l.startsWith('maxOutputPower,'))!;
    expect(peak).toMatch(/"maximum output power; a²\/\(4·c\), a = Kt·V\/R − Tc, c = Kt·Ke\/R \+ b"$/);
  });

  it('writes a Markdown page with the constants, derived figures and provenance', () => {
    const md = formatParameterSetMarkdown(set);
    expect(md).toContain(`| R | ${formatNumber(set.parameters.R.value)} | Ω |`);
    expect(md).toContain('| stall torque |');
    expect(md).toContain('invented-step.csv');
    expect(md).toContain('| serial | X-0001 |');
  });
});

describe('the residuals\' whiteness in the parameter set', () => {
  it('carries the diagnosis\'s Ljung–Box test per channel, validates, reads back and shows in Markdown; null where none was judged', () => {
    // A hand-made diagnosis (the structural `DiagnosisLike`): the current channel of the first recording judged.
    const rec = fit.recordings[0]!;
    const ch = rec.channels[0]!.channel;
    const withWhite = buildParameterSet(fit, {
      recordings: inputs.map((i) => i.recording), provenance: INVENTED_PROVENANCE,
      diagnosis: { residuals: [{ recording: rec.name, channel: ch, stats: { autocorrelation: [1], whitenessBand: 0.01, ljungBox: { statistic: 61.5, lags: 50, pValue: 0.127 } } }] },
    });
    const c0 = withWhite.fit.recordings[0]!.channels[0]!;
    expect(c0.whiteness).toEqual({ lags: 50, statistic: 61.5, pValue: 0.127 });
    expect(withWhite.fit.recordings[0]!.channels[1]?.whiteness ?? null).toBeNull();
    const text = formatParameterSetJson(withWhite);
    expect(validate(JSON.parse(text)), JSON.stringify(validate.errors)).toBe(true);
    expect(readParameterSet(text).fit.recordings[0]!.channels[0]!.whiteness).toEqual(c0.whiteness);
    expect(formatParameterSetMarkdown(withWhite)).toContain(`| ${ch} |`);
    expect(formatParameterSetMarkdown(withWhite)).toMatch(/\| 0\.13 \(50 lags\) \|/);
    // A set written before the key existed still reads.
    const old = JSON.parse(text) as { fit: { recordings: { channels: Record<string, unknown>[] }[] } };
    for (const r of old.fit.recordings) for (const c of r.channels) delete c.whiteness;
    expect(readParameterSet(JSON.stringify(old)).fit.recordings[0]!.channels[0]!.whiteness).toBeUndefined();
    // A broken entry is named by its path.
    const bad = JSON.parse(text) as { fit: { recordings: { channels: { whiteness: Record<string, unknown> }[] }[] } };
    bad.fit.recordings[0]!.channels[0]!.whiteness.lags = 'many';
    expect(validate(bad)).toBe(false);
    expect(() => readParameterSet(JSON.stringify(bad))).toThrow(/fit\.recordings\[0\]\.channels\[0\]\.whiteness\.lags/);
  });
});
