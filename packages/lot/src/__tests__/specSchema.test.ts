import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { checkableKeys } from '../checkableKeys.js';
import { parseLotSpec } from '../parseLotSpec.js';

const read = (rel: string) => readFileSync(fileURLToPath(new URL(rel, import.meta.url)), 'utf8');
const schema = JSON.parse(read('../../../../docs/lot-spec.schema.json')) as { properties: { limits: { properties: Record<string, { allOf: [unknown, { properties: { unit: { const: string } } }] }> } } };
const validate = new Ajv2020({ allErrors: true, strict: true, allowUnionTypes: true }).compile(schema);

describe('docs/lot-spec.schema.json', () => {
  it('lists exactly the keys parseLotSpec accepts, each with its unit', () => {
    const inSchema = Object.entries(schema.properties.limits.properties).map(([k, v]) => [k, v.allOf[1].properties.unit.const]);
    expect(inSchema).toEqual(checkableKeys().map((k) => [k.key, k.unit]));
  });

  it('accepts the demo spec, which parseLotSpec accepts too', () => {
    const text = read('../../../../fixtures/lot/tern24-spec.json');
    expect(validate(JSON.parse(text)), JSON.stringify(validate.errors)).toBe(true);
    expect(parseLotSpec(text, 'tern24-spec.json').limits).toHaveLength(5);
  });

  it.each([
    '{"limits":{"R":{"min":1}}}',
    '{"name":"x","limits":{"Kv":{"min":1}}}',
    '{"name":"x","limits":{"R":{"nominal":1.9}}}',
    '{"name":"x","limits":{"R":{"nominal":1.9,"tolerancePercent":0}}}',
    '{"name":"x","limits":{"R":{"nominal":1.9,"tolerancePercent":5,"min":1}}}',
    '{"name":"x","limits":{"R":{}}}',
    '{"name":"x","limits":{"R":{"min":1,"unit":"mΩ"}}}',
    '{"name":"x","limits":{}}',
    '{"name":"x","limit":{"R":{"min":1}}}',
    '{"name":"x","ratedVoltage":0,"limits":{"R":{"min":1}}}',
  ])('rejects %s, as parseLotSpec does', (text) => {
    expect(validate(JSON.parse(text))).toBe(false);
    expect(() => parseLotSpec(text, 'spec.json')).toThrow(/^spec\.json \(/);
  });
});
