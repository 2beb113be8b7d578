/**
 * Index of the first entry where two series differ bit for bit (`Object.is`: tells −0 from +0 and
 * matches NaN with NaN), 0 when their lengths differ or only one is null, −1 when they are the same.
 * The comparison the WebAssembly kernels' tests make against the JavaScript they stand for.
 *
 * @param a - first series (or null)
 * @param b - second series (or null)
 * @returns −1 when equal, else the first index that differs
 * @example
 * firstDifference(Float64Array.of(0, 1), Float64Array.of(-0, 1)); // => 0
 */
export function firstDifference(a: ArrayLike<number> | null, b: ArrayLike<number> | null): number {
  if (a === null || b === null) return a === b ? -1 : 0;
  if (a.length !== b.length) return 0;
  for (let i = 0; i < a.length; i++) if (!Object.is(a[i], b[i])) return i;
  return -1;
}
