import { checkSolverOptions } from '../solver/checkSolverOptions.js';
import type { SolverOptions } from '../solver/types.js';
import type { FitMotorOptions, MotorConstantName, MotorFit } from './types.js';
import type { ModelExtensions } from '../detailed/types.js';

/** The resolved options of `fitMotor`. */
export interface ResolvedFitMotorOptions {
  fix: Partial<Record<MotorConstantName, number>>;
  initial: Partial<Record<MotorConstantName, number>>;
  voltage: 'auto' | 'measured';
  coulomb: 'auto' | boolean;
  keepResiduals: boolean;
  solver: SolverOptions;
  extensions: ModelExtensions;
  ambientTemperature: number;
  noise: ({ current?: number; speed?: number; angle?: number; voltage?: number } | null)[];
  reweight: boolean;
  warmStart: MotorFit | null;
}

const NAMES: readonly MotorConstantName[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rth', 'Cth'];
const EXTENSIONS: readonly (keyof ModelExtensions)[] = ['coulomb', 'stiction', 'drag', 'voltageLimit', 'currentLimit', 'heating'];

/**
 * Validates the options of `fitMotor` once and fills the defaults.
 *
 * @param options - as given by the caller
 * @returns the resolved options
 * @throws TypeError for a wrong type or an unknown key, naming the option path
 * @throws RangeError for an out-of-domain number (R, L, Kt, Ke, J > 0; b, Tc ≥ 0; initial b > 0)
 * @example
 * checkFitMotorOptions({ fix: { R: 1.2 } }).voltage; // => 'auto'
 */
export function checkFitMotorOptions(options: FitMotorOptions | undefined): ResolvedFitMotorOptions {
  const fn = 'fitMotor';
  const o = options ?? {};
  if (o === null || typeof o !== 'object') throw new TypeError(`${fn}: options must be an object (got ${String(o)})`);
  for (const key of Object.keys(o)) {
    if (!['fix', 'initial', 'voltage', 'coulomb', 'keepResiduals', 'solver', 'extensions', 'ambientTemperature', 'noise', 'reweight', 'warmStart'].includes(key)) {
      throw new TypeError(`${fn}: options.${key} is not an option (fix, initial, voltage, coulomb, keepResiduals, solver, extensions, ambientTemperature, noise, reweight, warmStart)`);
    }
  }
  const table = (path: 'fix' | 'initial'): Partial<Record<MotorConstantName, number>> => {
    const t = o[path];
    if (t === undefined) return {};
    if (t === null || typeof t !== 'object') throw new TypeError(`${fn}: options.${path} must be an object of constants (got ${String(t)})`);
    const out: Partial<Record<MotorConstantName, number>> = {};
    for (const [k, v] of Object.entries(t)) {
      if (!NAMES.includes(k as MotorConstantName)) throw new TypeError(`${fn}: options.${path}.${k} is not a constant (${NAMES.join(', ')})`);
      if (typeof v !== 'number') throw new TypeError(`${fn}: options.${path}.${k} must be a number (got ${typeof v})`);
      const strict = !['Tc', 'Ts', 'c'].includes(k) && (k !== 'b' || path === 'initial');
      if (!Number.isFinite(v) || (strict ? !(v > 0) : v < 0)) {
        throw new RangeError(`${fn}: options.${path}.${k} must be ${strict ? '> 0' : '>= 0'} (got ${v})`);
      }
      out[k as MotorConstantName] = v;
    }
    return out;
  };
  const fix = table('fix');
  const initial = table('initial');
  const voltage = o.voltage ?? 'auto';
  if (voltage !== 'auto' && voltage !== 'measured') throw new RangeError(`${fn}: options.voltage must be 'auto' or 'measured' (got ${JSON.stringify(voltage)})`);
  const coulomb = o.coulomb ?? false;
  if (coulomb !== 'auto' && typeof coulomb !== 'boolean') throw new TypeError(`${fn}: options.coulomb must be 'auto', true or false (got ${JSON.stringify(coulomb)})`);
  const keepResiduals = o.keepResiduals ?? true;
  if (typeof keepResiduals !== 'boolean') throw new TypeError(`${fn}: options.keepResiduals must be a boolean (got ${String(keepResiduals)})`);
  const solver: SolverOptions = { maxIterations: 100, ...(o.solver ?? {}) };
  try {
    checkSolverOptions(solver, `${fn}: options.solver`);
  } catch (e) {
    if (e instanceof Error) {
      const msg = e.message.replace(`${fn}: options.solver: options.`, `${fn}: options.solver.`);
      throw e instanceof RangeError ? new RangeError(msg) : new TypeError(msg);
    }
    throw e;
  }
  const extensions: ModelExtensions = {};
  if (o.extensions !== undefined) {
    if (o.extensions === null || typeof o.extensions !== 'object') throw new TypeError(`${fn}: options.extensions must be an object of booleans`);
    for (const [k, v] of Object.entries(o.extensions)) {
      if (!EXTENSIONS.includes(k as keyof ModelExtensions)) throw new TypeError(`${fn}: options.extensions.${k} is not an extension (${EXTENSIONS.join(', ')})`);
      if (typeof v !== 'boolean') throw new TypeError(`${fn}: options.extensions.${k} must be a boolean (got ${String(v)})`);
      extensions[k as keyof ModelExtensions] = v;
    }
  }
  const ambientTemperature = o.ambientTemperature ?? 25;
  if (typeof ambientTemperature !== 'number' || !(ambientTemperature > -273.15 && ambientTemperature < 1000)) {
    throw new RangeError(`${fn}: options.ambientTemperature must be a temperature in °C (got ${String(ambientTemperature)})`);
  }
  const noise = o.noise ?? [];
  if (!Array.isArray(noise)) throw new TypeError(`${fn}: options.noise must be an array (one entry per recording)`);
  noise.forEach((e, i) => {
    if (e === null || e === undefined) return;
    if (typeof e !== 'object') throw new TypeError(`${fn}: options.noise[${i}] must be an object of SDs or null`);
    for (const [k, v] of Object.entries(e)) {
      if (!['current', 'speed', 'angle', 'voltage'].includes(k)) throw new TypeError(`${fn}: options.noise[${i}].${k} is not a channel (current, speed, angle, voltage)`);
      if (typeof v !== 'number' || !(v > 0) || !Number.isFinite(v)) throw new RangeError(`${fn}: options.noise[${i}].${k} must be a positive SD (got ${String(v)})`);
    }
  });
  const reweight = o.reweight ?? true;
  if (typeof reweight !== 'boolean') throw new TypeError(`${fn}: options.reweight must be a boolean`);
  const warmStart = o.warmStart ?? null;
  if (warmStart !== null && (typeof warmStart !== 'object' || !Array.isArray(warmStart.fittedNames) || !Array.isArray(warmStart.theta))) {
    throw new TypeError(`${fn}: options.warmStart must be a MotorFit (the result of fitMotor)`);
  }
  return { fix, initial, voltage, coulomb, keepResiduals, solver, extensions, ambientTemperature, noise, reweight, warmStart };
}
