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
