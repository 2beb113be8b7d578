import type { ParameterSet } from './types.js';

/**
 * The parameter set as JSON text (two-space indent, trailing newline). Numbers are written with
 * JavaScript's shortest round-trip form, so `readParameterSet` gives back the same doubles.
 *
 * @param set - the parameter set
 * @returns JSON text
 * @throws TypeError when `set` is not a `motorprint.parameter-set/1` object
 * @throws RangeError when a number in it is not finite (JSON cannot hold NaN or ∞)
 * @example
 * formatParameterSetJson(set).startsWith('{\n  "schema": "motorprint.parameter-set/1"'); // => true
 */
export function formatParameterSetJson(set: ParameterSet): string {
  if (set === null || typeof set !== 'object' || set.schema !== 'motorprint.parameter-set/1') {
    throw new TypeError('formatParameterSetJson: set must be a parameter set with schema "motorprint.parameter-set/1"');
  }
  const text = JSON.stringify(set, (key: string, value: unknown) => {
    if (typeof value === 'number' && !Number.isFinite(value)) {
      throw new RangeError(`formatParameterSetJson: field "${key}" must be finite (got ${value}); use null for a missing number`);
    }
    return value;
  }, 2);
  return `${text}\n`;
}
