
/**
 * Validates a sampled input series and its time base for the public simulation wrappers.
 *
 * @param caller - name of the public function, used in the messages
 * @param name - the argument name of the series (e.g. `voltage`)
 * @param values - the series
 * @param time - sample interval [s] or sample times [s]
 * @returns nothing
 * @throws TypeError when `values` is not a Float64Array or `time` is neither a number nor a Float64Array of the same length
 * @throws RangeError for non-finite samples, a non-positive interval or non-increasing sample times
 * @example
 * checkSeries('simulate', 'voltage', new Float64Array([0, 12]), 1e-4); // passes
 */
export function checkSeries(caller: string, name: string, values: unknown, time: unknown): asserts values is Float64Array {
  if (!(values instanceof Float64Array)) {
    throw new TypeError(`${caller}: ${name} must be a Float64Array (got ${values === null ? 'null' : typeof values})`);
  }
  for (let k = 0; k < values.length; k++) {
    if (!Number.isFinite(values[k]!)) throw new RangeError(`${caller}: ${name}[${k}] must be finite (got ${values[k]})`);
  }
  if (typeof time === 'number') {
    if (!(time > 0) || !Number.isFinite(time)) {
      throw new RangeError(`${caller}: time (sample interval) must be a finite number > 0 (got ${time})`);
    }
    return;
  }
  if (!(time instanceof Float64Array)) {
    throw new TypeError(`${caller}: time must be a sample interval (number) or a Float64Array of sample times (got ${time === null ? 'null' : typeof time})`);
  }
  if (time.length !== values.length) {
    throw new TypeError(`${caller}: time has ${time.length} samples but ${name} has ${values.length}`);
  }
  for (let k = 0; k < time.length; k++) {
    const t = time[k]!;
    if (!Number.isFinite(t)) throw new RangeError(`${caller}: time[${k}] must be finite (got ${t})`);
    if (k > 0 && !(t > time[k - 1]!)) {
      throw new RangeError(`${caller}: time must increase strictly (time[${k}] = ${t} after time[${k - 1}] = ${time[k - 1]})`);
    }
  }
}
