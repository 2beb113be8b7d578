import type { LinearOptions } from './types.js';

/**
 * Validates and resolves the options of the linear simulation.
 *
 * @param caller - name of the public function, used in the messages
 * @param options - options or undefined
 * @returns the options with defaults filled in
 * @throws TypeError when `options` is not an object or a field is not a number
 * @throws RangeError when a field is not finite
 * @example
 * checkLinearOptions('simulate', { initialSpeed: 10 });
 * // => { initialCurrent: 0, initialSpeed: 10, loadTorque: 0 }
 */
export function checkLinearOptions(caller: string, options: unknown): Required<LinearOptions> {
  if (options === undefined) return { initialCurrent: 0, initialSpeed: 0, loadTorque: 0 };
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`${caller}: options must be an object (got ${String(options)})`);
  }
  const o = options as Record<string, unknown>;
  const get = (key: string): number => {
    const v = o[key];
    if (v === undefined) return 0;
    if (typeof v !== 'number') throw new TypeError(`${caller}: options.${key} must be a number (got ${String(v)})`);
    if (!Number.isFinite(v)) throw new RangeError(`${caller}: options.${key} must be finite (got ${v})`);
    return v;
  };
  return { initialCurrent: get('initialCurrent'), initialSpeed: get('initialSpeed'), loadTorque: get('loadTorque') };
}
