import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';

/**
 * Order statistics by Hoare's selection (expected O(n)), shared by the estimators that need a
 * median of a long series without sorting it.
 */

/**
 * Rearranges `s` (no NaN in it) so that s[k] holds the k-th smallest value (0-based), none larger
 * left of it and none smaller right of it; returns it. The value is the one `s.sort()[k]` would
 * give, except that −0 and +0 are not told apart.
 *
 * @param s - the values, rearranged in place
 * @param k - 0-based rank, 0 ≤ k < s.length
 * @returns the k-th smallest value
 * @example
 * selectKth(Float64Array.of(5, 1, 4, 2, 3), 2); // => 3
 */
export function selectKth(s: Float64Array, k: number): number {
  const n = s.length;
  if (n >= KERNEL_MIN_LENGTH && (k | 0) === k && k >= 0 && k < n) {
    // The same selection in WebAssembly (sampleKernels.wat): the same swaps, so the same arrangement.
    const room = sampleKernels.room(8 * n);
    if (room !== null) {
      room.f64.set(s, 0);
      const value = room.exports.select(0, n, k);
      s.set(room.f64.subarray(0, n));
      return value;
    }
  }
  return selectKthPlain(s, k);
}

/** {@link selectKth} in plain JavaScript (the reference of the kernel, and its fallback). */
export function selectKthPlain(s: Float64Array, k: number): number {
  let left = 0, right = s.length - 1;
  while (right > left) {
    const mid = (left + right) >> 1;
    // Median of three as the pivot.
    const a = s[left]!, b = s[mid]!, c = s[right]!;
    const pivot = a < b ? (b < c ? b : a < c ? c : a) : (a < c ? a : b < c ? c : b);
    let i = left, j = right;
    while (i <= j) {
      while (s[i]! < pivot) i++;
      while (s[j]! > pivot) j--;
      if (i <= j) { const t = s[i]!; s[i] = s[j]!; s[j] = t; i++; j--; }
    }
    if (k <= j) right = j;
    else if (k >= i) left = i;
    else break;
  }
  return s[k]!;
}

/**
 * The median of `a` (no NaN in it; NaN when empty), by selection: the upper middle by
 * {@link selectKth}, and for an even length the lower middle as the largest value left of it.
 * Rearranges `a` as the selection does.
 *
 * @param a - the values, rearranged in place
 * @returns the median
 * @example
 * medianInPlace(Float64Array.of(4, 1, 3, 2)); // => 2.5
 */
export function medianInPlace(a: Float64Array): number {
  const n = a.length;
  if (n === 0) return NaN;
  const h = n >> 1;
  if (n >= KERNEL_MIN_LENGTH) {
    const room = sampleKernels.room(8 * n);
    if (room !== null) {
      room.f64.set(a, 0);
      const hi = room.exports.select(0, n, h);
      const lo = n % 2 === 1 ? 0 : room.exports.largestOf(0, h);
      a.set(room.f64.subarray(0, n));
      return n % 2 === 1 ? hi : 0.5 * (lo + hi);
    }
  }
  const hi = selectKthPlain(a, h);
  if (n % 2 === 1) return hi;
  // Nothing left of h is larger than a[h]: the lower middle is the largest of them.
  let lo = -Infinity;
  for (let k = 0; k < h; k++) if (a[k]! > lo) lo = a[k]!;
  return 0.5 * (lo + hi);
}
