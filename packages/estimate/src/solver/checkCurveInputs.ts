import type { CurveInputs } from './types.js';

/**
 * Validates the predictor columns and response of a dense curve fit and returns the columns as an
 * array. Rejects wrong types, unequal lengths and non-finite values, naming the index.
 *
 * @param x - one predictor column or an array of columns
 * @param y - response
 * @param caller - public function name for messages
 * @returns the predictor columns
 * @throws TypeError for wrong types or unequal lengths
 * @throws RangeError for non-finite values
 * @example
 * checkCurveInputs(Float64Array.of(1, 2), Float64Array.of(3, 4), 'fitCurve').length; // => 1
 */
export function checkCurveInputs(x: CurveInputs, y: Float64Array, caller: string): Float64Array[] {
  if (!(y instanceof Float64Array)) throw new TypeError(`${caller}: input.y must be a Float64Array`);
  const columns: Float64Array[] = x instanceof Float64Array ? [x] : Array.isArray(x) ? [...x] : [];
  if (columns.length === 0) {
    throw new TypeError(`${caller}: input.x must be a Float64Array or a non-empty array of Float64Array columns`);
  }
  columns.forEach((c, i) => {
    if (!(c instanceof Float64Array)) throw new TypeError(`${caller}: input.x[${i}] must be a Float64Array`);
    if (c.length !== y.length) {
      throw new TypeError(`${caller}: input.x[${i}] has length ${c.length}, input.y has length ${y.length}`);
    }
    for (let k = 0; k < c.length; k++) {
      if (!Number.isFinite(c[k]!)) throw new RangeError(`${caller}: input.x[${i}][${k}] must be finite (got ${c[k]})`);
    }
  });
  for (let k = 0; k < y.length; k++) {
    if (!Number.isFinite(y[k]!)) throw new RangeError(`${caller}: input.y[${k}] must be finite (got ${y[k]})`);
  }
  return columns;
}
