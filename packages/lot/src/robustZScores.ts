/** Median of a non-empty list (mean of the two middle values for an even count). */
export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 === 1 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
}

/**
 * Robust z-scores (the "modified z-score") of a list: 0.6745·(xᵢ − median)/MAD, MAD the median of
 * |xᵢ − median|. 0.6745 ≈ Φ⁻¹(0.75) makes MAD/0.6745 estimate σ for normal data; a score above 3.5
 * in size marks a possible outlier.
 *
 * ## References
 * B. Iglewicz, D. C. Hoaglin (1993), How to Detect and Handle Outliers, ASQC Basic References in
 * Quality Control vol. 16 (from memory); NIST/SEMATECH e-Handbook of Statistical Methods §1.3.5.17
 * (from memory).
 *
 * @param values - the data (finite numbers)
 * @returns `{ median, mad, scores }`; scores are null when MAD is 0 (more than half the values equal) or the list is empty
 * @example
 * robustZScores([1, 2, 3, 4, 100]).scores; // ≈ [-1.349, -0.6745, 0, 0.6745, 65.43]
 */
export function robustZScores(values: readonly number[]): { median: number | null; mad: number | null; scores: number[] | null } {
  if (values.length === 0) return { median: null, mad: null, scores: null };
  const med = median(values);
  const mad = median(values.map((x) => Math.abs(x - med)));
  if (!(mad > 0)) return { median: med, mad, scores: null };
  return { median: med, mad, scores: values.map((x) => (0.6745 * (x - med)) / mad) };
}
