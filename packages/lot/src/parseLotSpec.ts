import { RENAMED_FIGURE_KEYS } from '@motorprint/report';
import { checkableKeys } from './checkableKeys.js';
import { LotError } from './LotError.js';
import { parseJsonWithPositions } from './parseJsonWithPositions.js';
import type { LotSpec, SpecLimit } from './types.js';

const TOP_KEYS = ['$schema', 'name', 'description', 'ratedVoltage', 'limits'];

function isObject(x: unknown): x is Record<string, unknown> {
  return x !== null && typeof x === 'object' && !Array.isArray(x);
}

function describe(x: unknown): string {
  if (x === null) return 'null';
  if (Array.isArray(x)) return 'a list';
  if (typeof x === 'string') return `the text ${JSON.stringify(x)}`;
  if (typeof x === 'object') return 'an object';
  return String(x);
}

/**
 * Reads an acceptance spec (our own format, JSON Schema in `docs/lot-spec.schema.json`) and
 * resolves every limit to its lower and upper specification limits. Everything is checked before
 * any motor is fitted: unknown keys, malformed limits, a unit that does not match, a missing
 * rated voltage for a voltage-dependent figure.
 *
 * Format: `{ "name": "…", "ratedVoltage": 24, "limits": { "<key>": { "nominal": x, "tolerancePercent": p } | { "min": a, "max": b } } }`
 * where a key is a motor constant (`R`, `L`, `Kt`, `Ke`, `J`, `b`, `Tc`, SI units) or a derived-figure
 * key (docs/derived-figures.md). `min` or `max` alone gives a one-sided limit. Limits from a nominal
 * and a percentage are rounded to 12 significant digits. A limit may carry
 * `"unit"`, which must then be the key's unit exactly (a guard against a value typed in other units).
 *
 * @param text - the file's text
 * @param file - file name for messages
 * @returns the resolved spec
 * @throws LotError `spec-not-json` (with line and column) or `spec-invalid` (with JSON path, line and column)
 * @example
 * parseLotSpec('{"name":"Tern 24","limits":{"R":{"nominal":1.9,"tolerancePercent":5}}}', 'spec.json').limits[0];
 * // => { key: 'R', unit: 'Ω', lower: 1.805, upper: 1.995, nominal: 1.9, tolerancePercent: 5, … }
 */
export function parseLotSpec(text: string, file: string): LotSpec {
  if (typeof text !== 'string') throw new TypeError(`parseLotSpec: text must be a string (got ${typeof text})`);
  const { value: doc, positions } = parseJsonWithPositions(text, file, 'spec-not-json');
  const bad = (path: string, message: string): never => {
    throw new LotError('spec-invalid', file, message, { path: path === '' ? '(top level)' : path, ...(positions.get(path) ?? {}) });
  };
  if (!isObject(doc)) return bad('', `a spec is a JSON object with "name" and "limits" (got ${describe(doc)})`);
  for (const key of Object.keys(doc)) {
    if (!TOP_KEYS.includes(key)) bad(key, `unknown field "${key}"; a spec has ${TOP_KEYS.filter((k) => k !== '$schema').join(', ')} (and optionally $schema)`);
  }
  const name = doc.name;
  if (typeof name !== 'string' || name.trim() === '') return bad(name === undefined ? '' : 'name', `"name" must be a non-empty text (got ${name === undefined ? 'nothing' : describe(name)})`);
  const description = doc.description ?? '';
  if (typeof description !== 'string') return bad('description', `"description" must be a text (got ${describe(description)})`);
  let ratedVoltage: number | null = null;
  if (doc.ratedVoltage !== undefined && doc.ratedVoltage !== null) {
    if (typeof doc.ratedVoltage !== 'number' || !(doc.ratedVoltage > 0)) {
      return bad('ratedVoltage', `"ratedVoltage" must be a voltage > 0 in V (got ${describe(doc.ratedVoltage)})`);
    }
    ratedVoltage = doc.ratedVoltage;
  }
  const limits = doc.limits;
  if (!isObject(limits)) return bad(limits === undefined ? '' : 'limits', `"limits" must be an object of checked keys (got ${limits === undefined ? 'nothing' : describe(limits)})`);
  const known = checkableKeys();
  const entries = Object.entries(limits);
  if (entries.length === 0) return bad('limits', '"limits" is empty: name at least one constant or figure to check');
  const out: SpecLimit[] = [];
  for (const [key, raw] of entries) {
    const path = `limits.${/^[A-Za-z_$][A-Za-z0-9_$]*$/.test(key) ? key : JSON.stringify(key)}`;
    const def = known.find((k) => k.key === key);
    if (def === undefined) {
      const renamed = Object.hasOwn(RENAMED_FIGURE_KEYS, key) ? RENAMED_FIGURE_KEYS[key] : undefined;
      if (renamed !== undefined) return bad(path, `"${key}" is now called "${renamed}"; rename the key in the spec`);
      const near = known.filter((k) => k.key.toLowerCase() === key.toLowerCase()).map((k) => k.key);
      return bad(path, `unknown key "${key}"${near.length > 0 ? ` (did you mean "${near[0]}"?)` : ''}. Constants: ${known.filter((k) => k.source === 'constant').map((k) => k.key).join(', ')}; ` +
        `derived figures: ${known.filter((k) => k.source === 'derived').map((k) => k.key).join(', ')}`);
    }
    if (!isObject(raw)) return bad(path, `a limit is an object: { "nominal": x, "tolerancePercent": p } or { "min": a, "max": b } (got ${describe(raw)})`);
    for (const f of Object.keys(raw)) {
      if (!['nominal', 'tolerancePercent', 'min', 'max', 'unit'].includes(f)) {
        bad(`${path}.${f}`, `unknown field "${f}" in a limit; use nominal + tolerancePercent, or min and/or max (and optionally unit)`);
      }
    }
    if (raw.unit !== undefined && raw.unit !== def.unit) {
      bad(`${path}.unit`, `${key} is checked in ${def.unit} (got unit ${describe(raw.unit)}); write the limit in ${def.unit}`);
    }
    const num = (f: string): number | undefined => {
      const v = raw[f];
      if (v === undefined) return undefined;
      if (typeof v !== 'number' || !Number.isFinite(v)) return bad(`${path}.${f}`, `"${f}" must be a number in ${def.unit} (got ${describe(v)})`);
      return v;
    };
    const nominal = num('nominal');
    const tolerance = num('tolerancePercent');
    const min = num('min');
    const max = num('max');
    const byTolerance = nominal !== undefined || tolerance !== undefined;
    const byRange = min !== undefined || max !== undefined;
    if (byTolerance && byRange) return bad(path, 'give either nominal + tolerancePercent or min/max, not both');
    let lower: number | null, upper: number | null;
    if (byTolerance) {
      if (nominal === undefined) return bad(path, '"tolerancePercent" needs "nominal"');
      if (tolerance === undefined) return bad(path, '"nominal" needs "tolerancePercent"');
      if (!(tolerance > 0)) return bad(`${path}.tolerancePercent`, `"tolerancePercent" must be > 0 (got ${tolerance})`);
      if (nominal === 0) return bad(`${path}.nominal`, 'a percentage of a nominal 0 gives no width; use min and max');
      const half = (Math.abs(nominal) * tolerance) / 100;
      // Rounded to 12 significant digits so that 1.9 ± 5 % gives 1.995, not 1.9949999999999999.
      lower = Number((nominal - half).toPrecision(12));
      upper = Number((nominal + half).toPrecision(12));
    } else if (byRange) {
      lower = min ?? null;
      upper = max ?? null;
      if (lower !== null && upper !== null && !(lower < upper)) return bad(path, `"min" must be below "max" (got min ${lower}, max ${upper})`);
    } else {
      return bad(path, 'a limit needs nominal + tolerancePercent, or min and/or max');
    }
    if (def.needsVoltage && ratedVoltage === null) {
      return bad(path, `${key} (${def.label}) depends on the supply voltage: give "ratedVoltage" [V] in the spec`);
    }
    out.push({
      key, unit: def.unit, label: def.label, lower, upper,
      nominal: byTolerance ? (nominal as number) : null, tolerancePercent: byTolerance ? (tolerance as number) : null, path,
    });
  }
  return { name: name.trim(), description, ratedVoltage, limits: out };
}
