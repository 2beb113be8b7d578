import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { expectClose } from '@motorprint/testkit';
import { fitMotor } from '@motorprint/estimate';
import type { MotorRecordingInput } from '@motorprint/estimate';
import { generateRecording } from '@motorprint/model';
import type { DetailedParams, ExperimentKind } from '@motorprint/model';
import { buildParameterSet } from '../buildParameterSet.js';
import { constantCovariance } from '../constantCovariance.js';
import { formatParameterSetJson } from '../formatParameterSetJson.js';
import { readParameterSet } from '../readParameterSet.js';
import { INVENTED_PROVENANCE } from './inventedFit.js';

const schema = JSON.parse(readFileSync(fileURLToPath(new URL('../../../../docs/parameter-set.schema.json', import.meta.url)), 'utf8')) as object;
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);

function invented(m: DetailedParams, kind: ExperimentKind, seed: number): MotorRecordingInput['recording'] {
  // Noise: 0.05 V, 0.2 % of stall current, 0.2 % of no-load speed (common practice, no source).
  const g = generateRecording(m, kind, { seed, noise: { voltage: 0.05, current: 0.012, speed: 0.48, torque: 1e-4 } });
  const channels: Record<string, Float64Array> = {};
  for (const c of g.columns.slice(1)) channels[c.name] = c.values;
  return { time: g.columns[0]!.values, channels };
}

describe('buildParameterSet with Coulomb friction in the model', () => {
  it('carries Tc with its interval, reads its variance from the fit, and includes Tc in the no-load figures', () => {
    // Invented motor: FACTS.md §5 constants plus Tc = 4e-3 N·m (invented here).
    const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5, Tc: 4e-3 };
    const inputs: MotorRecordingInput[] = [
      { recording: invented(m, 'step', 31), kind: 'step', name: 'step (invented)' },
      { recording: invented(m, 'steady-state', 32), kind: 'steady-state', name: 'sweep (invented)' },
    ];
    const fit = fitMotor(inputs, { coulomb: true });
    expect(fit.variant.coulomb).toBe(true);
    const cov = constantCovariance(fit);
    // The estimator states cov(ln p); SE(Tc) = Tc·√var(ln Tc) is its own SE(Tc) (delta method).
    expectClose(cov.values[6]! * Math.sqrt(cov.covariance[6 * 7 + 6]!), fit.parameters.Tc!.standardError!, { rel: 1e-9, abs: 0 }, 'SE(Tc)');
    const set = buildParameterSet(fit, { provenance: INVENTED_PROVENANCE });
    expect(set.parameters.Tc?.ci95).not.toBeNull();
    const V = set.ratedVoltage.value!;
    const p = (k: 'R' | 'Kt' | 'Ke' | 'b') => set.parameters[k].value!;
    // ω0 = (Kt·V − R·Tc)/(R·b + Kt·Ke) with the fitted constants (FACTS.md §4).
    expectClose(set.derived.noLoadSpeed!.value!, (p('Kt') * V - p('R') * set.parameters.Tc!.value!) / (p('R') * p('b') + p('Kt') * p('Ke')),
      { rel: 1e-14, abs: 0 }, 'ω0 with Tc');
    expect(set.derived.noLoadSpeed!.ci95).not.toBeNull();
    expect(validate(JSON.parse(formatParameterSetJson(set)))).toBe(true);
    expect(readParameterSet(formatParameterSetJson(set))).toEqual(set);
  });
});

describe('buildParameterSet with Kt and Ke fitted apart (torque channel)', () => {
  it('keeps Kt and Ke as separate entries and validates', () => {
    const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
    const inputs: MotorRecordingInput[] = [
      { recording: invented(m, 'loaded', 41), kind: 'loaded', name: 'loaded run (invented)' },
      { recording: invented(m, 'step', 42), kind: 'step', name: 'step (invented)' },
    ];
    const fit = fitMotor(inputs);
    const set = buildParameterSet(fit, { provenance: INVENTED_PROVENANCE });
    expect(fit.variant.torqueConstant).toBe('separate');
    expect(set.variant.torqueConstant).toBe('separate');
    // The six constants, and the ratio Kt/Ke the torque channel informs.
    expect(Object.keys(set.parameters).sort()).toEqual(['J', 'Ke', 'Kt', 'Kt/Ke', 'L', 'R', 'b']);
    expect(set.parameters.Kt.value).not.toBe(set.parameters.Ke.value);
    // ln Kt and ln Ke are separate fitted directions: SE(Kt) and SE(Ke) match the estimator's.
    const cov = constantCovariance(fit);
    expectClose(cov.values[2]! * Math.sqrt(cov.covariance[2 * 7 + 2]!), fit.parameters.Kt!.standardError!, { rel: 1e-9, abs: 0 }, 'SE(Kt)');
    expectClose(cov.values[3]! * Math.sqrt(cov.covariance[3 * 7 + 3]!), fit.parameters.Ke!.standardError!, { rel: 1e-9, abs: 0 }, 'SE(Ke)');
    expect(cov.covariance[2 * 7 + 3]).not.toBe(cov.covariance[2 * 7 + 2]);
    expect(validate(JSON.parse(formatParameterSetJson(set)))).toBe(true);
  });
});

describe('buildParameterSet on a fit with every constant fixed', () => {
  it('marks every constant fixed, gives derived figures without intervals, and still validates', () => {
    // All six constants pinned to the FACTS.md §5 values: the estimator fits only nuisances (levels, offset).
    const m = { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 };
    const fit = fitMotor([{ recording: invented(m, 'step', 51), kind: 'step' }], { fix: m });
    expect(fit.fittedNames.filter((n) => n.startsWith('ln '))).toEqual([]);
    const set = buildParameterSet(fit, { ratedVoltage: 12, provenance: INVENTED_PROVENANCE });
    expect(set.parameters.R).toMatchObject({ value: 2, fixed: true, identifiable: false, ci95: null });
    // FACTS.md §5: T_stall = 0.3 N·m at 12 V, exact because every constant is given.
    expectClose(set.derived.stallTorque!.value!, 0.3, { rel: 1e-15, abs: 0 }, 'T_stall');
    expect(set.derived.stallTorque!.ci95).toBeNull();
    expect(set.derived.stallTorque!.note).toContain('fixed by the caller');
    expect(validate(JSON.parse(formatParameterSetJson(set)))).toBe(true);
  });

  it('rejects something that is not a fit', () => {
    expect(() => buildParameterSet({} as never, { provenance: INVENTED_PROVENANCE })).toThrow('buildParameterSet: fit must be the result of fitMotor');
  });
});
