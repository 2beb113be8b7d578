import type { DetailedParams, MotorParams } from './types.js';

const POSITIVE = ['R', 'L', 'Kt', 'Ke', 'J'] as const;

/**
 * Validates motor constants (and, when present, the detailed-model effect terms) and returns them.
 *
 * @param caller - name of the public function, used in the messages
 * @param params - the constants to check
 * @returns the same object, typed
 * @throws TypeError when `params` is not an object or a field is not a number
 * @throws RangeError when a field is out of its domain (R, L, Kt, Ke, J > 0; b ≥ 0; Ts ≥ Tc; …)
 * @example
 * checkMotorParams('simulate', { R: 2, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 2e-5, b: 1e-5 });
 * // => the same object
 */
export function checkMotorParams<P extends MotorParams>(caller: string, params: P): P {
  if (params === null || typeof params !== 'object') {
    throw new TypeError(`${caller}: params must be an object (got ${String(params)})`);
  }
  const rec = params as unknown as Record<string, unknown>;
  const num = (key: string, optional: boolean): number | undefined => {
    const v = rec[key];
    if (v === undefined && optional) return undefined;
    if (typeof v !== 'number') {
      throw new TypeError(`${caller}: params.${key} must be a number (got ${typeof v === 'string' ? JSON.stringify(v) : String(v)})`);
    }
    if (!Number.isFinite(v)) throw new RangeError(`${caller}: params.${key} must be finite (got ${v})`);
    return v;
  };
  for (const key of POSITIVE) {
    const v = num(key, false) as number;
    if (!(v > 0)) throw new RangeError(`${caller}: params.${key} must be > 0 (got ${v})`);
  }
  const b = num('b', false) as number;
  if (b < 0) throw new RangeError(`${caller}: params.b must be >= 0 (got ${b})`);
  const nonNegative = ['Tc', 'Ts', 'cd', 'Rs', 'loadInertia', 'loadDamping'];
  for (const key of nonNegative) {
    const v = num(key, true);
    if (v !== undefined && v < 0) throw new RangeError(`${caller}: params.${key} must be >= 0 (got ${v})`);
  }
  for (const key of ['Vmax', 'Imax', 'Rth', 'Cth']) {
    const v = num(key, true);
    if (v !== undefined && !(v > 0)) throw new RangeError(`${caller}: params.${key} must be > 0 (got ${v})`);
  }
  for (const key of ['referenceTemperature', 'ambientTemperature', 'initialTemperature', 'loadTorque']) num(key, true);
  const d = params as unknown as DetailedParams;
  if (d.Ts !== undefined && d.Ts < (d.Tc ?? 0)) {
    throw new RangeError(`${caller}: params.Ts must be >= params.Tc (got Ts ${d.Ts}, Tc ${d.Tc ?? 0})`);
  }
  if (d.copperConstant !== undefined && d.copperConstant !== 234.5 && d.copperConstant !== 235) {
    throw new RangeError(`${caller}: params.copperConstant must be 234.5 or 235 (got ${String(d.copperConstant)})`);
  }
  if ((d.Rth === undefined) !== (d.Cth === undefined)) {
    throw new RangeError(`${caller}: params.Rth and params.Cth must be given together (got Rth ${d.Rth}, Cth ${d.Cth})`);
  }
  for (const [key, v] of [['referenceTemperature', d.referenceTemperature], ['ambientTemperature', d.ambientTemperature], ['initialTemperature', d.initialTemperature]] as const) {
    const k = d.copperConstant ?? 234.5;
    if (v !== undefined && !(v > -k)) {
      throw new RangeError(`${caller}: params.${key} must be above −${k} °C (got ${v})`);
    }
  }
  return params;
}
