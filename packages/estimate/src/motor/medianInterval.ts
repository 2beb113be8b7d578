import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import { selectKth } from './selectKth.js';

/**
 * Median sample interval of a time vector [s] (NaN with fewer than 2 samples): the robust
 * interval every detector and classifier uses.
 *
 * @param time - sample instants [s]
 * @returns the median of the differences
 * @example
 * medianInterval(Float64Array.of(0, 1e-3, 2e-3, 3.1e-3)); // => 0.001
 */
export function medianInterval(time: Float64Array): number {
  const n = time.length;
  if (n < 2) return NaN;
  if (n >= KERNEL_MIN_LENGTH) {
    // The same differences and the same selection in the sample kernel, where they already are.
    const room = sampleKernels.room(8 * (2 * n - 1));
    if (room !== null) {
      room.f64.set(time, 0);
      if (room.exports.intervals(0, n, 8 * n) === 1) return room.exports.select(8 * n, n - 1, (n - 1) >> 1);
    }
  }
  return medianIntervalPlain(time);
}

/** {@link medianInterval} in plain JavaScript (the reference of its kernel path and its fallback; exported for the tests). */
export function medianIntervalPlain(time: Float64Array): number {
  const n = time.length;
  if (n < 2) return NaN;
  const d = new Float64Array(n - 1);
  // Selection gives the sorted array's middle value unless a difference is NaN (sorted last) or
  // zero (where the sort puts −0 before +0): then sort.
  let plain = true;
  for (let k = 1; k < n; k++) {
    const x = time[k]! - time[k - 1]!;
    d[k - 1] = x;
    if (x !== x || x === 0) plain = false;
  }
  if (plain) return selectKth(d, (n - 1) >> 1);
  d.sort();
  return d[(n - 1) >> 1]!;
}
