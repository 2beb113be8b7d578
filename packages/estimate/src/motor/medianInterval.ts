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
