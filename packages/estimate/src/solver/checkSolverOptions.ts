import type { ResolvedSolverOptions, SolverOptions } from './types.js';

const DEFAULTS: ResolvedSolverOptions = {
  maxIterations: 200,
  relativeReductionTolerance: 1e-10,
  stepTolerance: 1e-10,
  gradientTolerance: 1e-12,
  initialDamping: 1e-3,
  compensatedSums: true,
  initialStepBound: 1,
  stationarityTolerance: 1e-3,
  geodesicAcceleration: false,
  // Transtrum & Sethna (2012), arXiv:1201.5885: α = 0.75 and h = 0.1 (from memory).
  accelerationRatio: 0.75,
  secondOrderStep: 0.1,
  dampingScale: 'running-max',
};

/**
 * Validates solver options once and returns them with every default filled in.
 *
 * @param options - options as given (may be undefined)
 * @param caller - name of the public function, used in error messages
 * @returns the resolved options
 * @throws TypeError when `options` is not an object or a field has the wrong type
 * @throws RangeError when a number is out of its domain
 * @example
 * checkSolverOptions({ maxIterations: 50 }, 'fitCurve').stepTolerance; // => 1e-10
 */
export function checkSolverOptions(options: SolverOptions | undefined, caller: string): ResolvedSolverOptions {
  if (options === undefined) return { ...DEFAULTS };
  if (options === null || typeof options !== 'object') {
    throw new TypeError(`${caller}: options must be an object (got ${String(options)})`);
  }
  const out = { ...DEFAULTS };
  const num = (key: keyof SolverOptions, check: (v: number) => boolean, rule: string) => {
    const v = options[key];
    if (v === undefined) return;
    if (typeof v !== 'number') {
      throw new TypeError(`${caller}: options.${key} must be a number (got ${typeof v})`);
    }
    if (!check(v)) throw new RangeError(`${caller}: options.${key} must be ${rule} (got ${v})`);
    (out as Record<string, unknown>)[key] = v;
  };
  num('maxIterations', (v) => Number.isInteger(v) && v >= 0, 'an integer >= 0');
  num('relativeReductionTolerance', (v) => v >= 0 && v < 1, '>= 0 and < 1');
  num('stepTolerance', (v) => v >= 0 && v < 1, '>= 0 and < 1');
  num('gradientTolerance', (v) => v >= 0 && v < 1, '>= 0 and < 1');
  num('initialStepBound', (v) => v > 0, '> 0 (Infinity for no bound)');
  num('stationarityTolerance', (v) => v >= 0 && v < 1, '>= 0 and < 1');
  num('accelerationRatio', (v) => v > 0 && Number.isFinite(v), 'finite and > 0');
  num('secondOrderStep', (v) => v > 0 && v <= 1, '> 0 and <= 1');
  num('initialDamping', (v) => v > 0 && Number.isFinite(v), 'finite and > 0');
  if (options.compensatedSums !== undefined) {
    if (typeof options.compensatedSums !== 'boolean') {
      throw new TypeError(
        `${caller}: options.compensatedSums must be a boolean (got ${typeof options.compensatedSums})`,
      );
    }
    out.compensatedSums = options.compensatedSums;
  }
  if (options.dampingScale !== undefined) {
    if (options.dampingScale !== 'running-max' && options.dampingScale !== 'current') {
      throw new TypeError(
        `${caller}: options.dampingScale must be 'running-max' or 'current' (got ${String(options.dampingScale)})`,
      );
    }
    out.dampingScale = options.dampingScale;
  }
  if (options.geodesicAcceleration !== undefined) {
    if (typeof options.geodesicAcceleration !== 'boolean') {
      throw new TypeError(
        `${caller}: options.geodesicAcceleration must be a boolean (got ${typeof options.geodesicAcceleration})`,
      );
    }
    out.geodesicAcceleration = options.geodesicAcceleration;
  }
  return out;
}
