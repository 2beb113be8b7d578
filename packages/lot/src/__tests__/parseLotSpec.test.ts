import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { checkableKeys } from '../checkableKeys.js';
import { LotError } from '../LotError.js';
import { parseLotSpec } from '../parseLotSpec.js';

/** Runs parseLotSpec and returns the LotError it throws (fails the test when it does not throw one). */
function specError(text: string): LotError {
  try {
    parseLotSpec(text, 'spec.json');
  } catch (error) {
    if (error instanceof LotError) return error;
    throw error;
  }
  throw new Error('expected a LotError');
}

describe('parseLotSpec', () => {
  it('resolves nominal ± percent and min/max limits, one-sided ones, units and the rated voltage', () => {
    // Invented spec values in the demo scenario (Tern 24).
    const spec = parseLotSpec(JSON.stringify({
      $schema: 'x', name: ' Tern 24 ', ratedVoltage: 24,
      limits: { R: { nominal: 1.9, tolerancePercent: 5, unit: 'Ω' }, J: { min: 9.5e-6, max: 1.25e-5 }, peakEfficiency: { min: 60 }, b: { max: 1e-5 } },
    }), 'spec.json');
    expect(spec.name).toBe('Tern 24');
    expect(spec.ratedVoltage).toBe(24);
    expect(spec.limits.map((l) => l.key)).toEqual(['R', 'J', 'peakEfficiency', 'b']);
    const [R, J, eff, b] = spec.limits;
    // derived here: 1.9 ∓ 1.9·5/100 = 1.805 … 1.995
    expectClose(R!.lower!, 1.805, { rel: 1e-15 }, 'R lower');
    expectClose(R!.upper!, 1.995, { rel: 1e-15 }, 'R upper');
    expect(R!.unit).toBe('Ω');
    expect(R!.nominal).toBe(1.9);
    expect(J).toMatchObject({ lower: 9.5e-6, upper: 1.25e-5, nominal: null, unit: 'kg·m²' });
    expect(eff).toMatchObject({ lower: 60, upper: null, unit: '%' });
    expect(b).toMatchObject({ lower: null, upper: 1e-5 });
  });

  it('takes a negative nominal with its tolerance as a width on both sides', () => {
    const spec = parseLotSpec('{"name":"n","limits":{"Tc":{"nominal":-0.002,"tolerancePercent":50}}}', 'spec.json');
    // derived here: −0.002 ∓ 0.002·50/100 = −0.003 … −0.001
    expectClose(spec.limits[0]!.lower!, -0.003, { rel: 1e-15 }, 'lower');
    expectClose(spec.limits[0]!.upper!, -0.001, { rel: 1e-15 }, 'upper');
  });

  it('accepts every constant and every derived-figure key, and only those', () => {
    const keys = checkableKeys();
    expect(keys.slice(0, 7).map((k) => k.key)).toEqual(['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc']);
    expect(keys.find((k) => k.key === 'stallTorque')).toMatchObject({ source: 'derived', needsVoltage: true, unit: 'N·m' });
    expect(keys.find((k) => k.key === 'electricalTimeConstant')).toMatchObject({ source: 'derived', needsVoltage: false, unit: 's' });
    const limits = Object.fromEntries(keys.map((k) => [k.key, { min: -1e9, max: 1e9 }]));
    expect(parseLotSpec(JSON.stringify({ name: 'all', ratedVoltage: 12, limits }), 'spec.json').limits.length).toBe(keys.length);
  });

  it('names the line and column of a JSON syntax error', () => {
    const e = specError('{\n  "name": "x",\n  "limits": { "R": { "min": 1, } }\n}');
    expect(e.code).toBe('spec-not-json');
    expect(e.line).toBe(3);
    expect(e.message).toMatch(/^spec\.json \(line 3, column \d+\): expected a key/);
  });

  it('refuses a key given twice instead of keeping the last one', () => {
    const e = specError('{"name":"x","limits":{"R":{"min":1,"max":2},\n"R":{"min":1,"max":3}}}');
    expect(e.message).toContain('"R" appears twice');
    expect(e.path).toBe('limits.R');
    expect(e.line).toBe(2);
  });

  it('names the JSON path, line and column of an unknown key and suggests the spelling', () => {
    const e = specError('{"name":"x",\n "limits": {\n   "r": {"min": 1, "max": 2}}}');
    expect(e.code).toBe('spec-invalid');
    expect(e.path).toBe('limits.r');
    expect(e.line).toBe(3);
    expect(e.column).toBe(9);
    expect(e.message).toContain('unknown key "r" (did you mean "R"?)');
    expect(e.message).toContain('noLoadSpeedRpm');
  });

  it('refuses a key renamed since, giving its new name', () => {
    const e = specError('{"name":"x","limits":{"speedTorqueGradientRpm":{"max":3}}}');
    expect(e.path).toBe('limits.speedTorqueGradientRpm');
    expect(e.message).toContain('"speedTorqueGradientRpm" is now called "speedDropPerLoadTorqueRpm"');
    expect(parseLotSpec('{"name":"x","limits":{"speedDropPerLoadTorqueRpm":{"max":3}}}', 'spec.json').limits[0]!.key).toBe('speedDropPerLoadTorqueRpm');
  });

  it.each([
    ['{"name":"x","limits":{"R":{"min":2,"max":1}}}', 'limits.R', '"min" must be below "max"'],
    ['{"name":"x","limits":{"R":{"min":1,"max":1}}}', 'limits.R', '"min" must be below "max"'],
    ['{"name":"x","limits":{"R":{"nominal":1.9}}}', 'limits.R', '"nominal" needs "tolerancePercent"'],
    ['{"name":"x","limits":{"R":{"tolerancePercent":5}}}', 'limits.R', '"tolerancePercent" needs "nominal"'],
    ['{"name":"x","limits":{"R":{"nominal":1.9,"tolerancePercent":0}}}', 'limits.R.tolerancePercent', 'must be > 0'],
    ['{"name":"x","limits":{"R":{"nominal":0,"tolerancePercent":5}}}', 'limits.R.nominal', 'gives no width'],
    ['{"name":"x","limits":{"R":{"nominal":1.9,"tolerancePercent":5,"min":1}}}', 'limits.R', 'not both'],
    ['{"name":"x","limits":{"R":{}}}', 'limits.R', 'needs nominal + tolerancePercent, or min and/or max'],
    ['{"name":"x","limits":{"R":{"min":"1.8"}}}', 'limits.R.min', 'must be a number in Ω (got the text "1.8")'],
    ['{"name":"x","limits":{"R":{"min":1,"tol":5}}}', 'limits.R.tol', 'unknown field "tol"'],
    ['{"name":"x","limits":{"R":{"min":1,"unit":"mΩ"}}}', 'limits.R.unit', 'R is checked in Ω'],
    ['{"name":"x","limits":{"R":[1,2]}}', 'limits.R', 'a limit is an object'],
    ['{"name":"x","limits":{"stallTorque":{"min":0.5}}}', 'limits.stallTorque', 'give "ratedVoltage"'],
    ['{"name":"x","ratedVoltage":-24,"limits":{"R":{"min":1}}}', 'ratedVoltage', 'a voltage > 0'],
    ['{"name":"x","limits":{}}', 'limits', '"limits" is empty'],
    ['{"name":"x","limits":[]}', 'limits', '"limits" must be an object'],
    ['{"name":"","limits":{"R":{"min":1}}}', 'name', '"name" must be a non-empty text'],
    ['{"limits":{"R":{"min":1}}}', '(top level)', '"name" must be a non-empty text (got nothing)'],
    ['{"name":"x","limit":{"R":{"min":1}}}', 'limit', 'unknown field "limit"'],
    ['[1]', '(top level)', 'a spec is a JSON object'],
  ])('refuses %s at %s', (text, path, message) => {
    const e = specError(text);
    expect(e.code).toBe('spec-invalid');
    expect(e.path).toBe(path);
    expect(e.message).toContain(message);
    expect(e.message.startsWith(`spec.json (${path}`)).toBe(true);
  });
});
