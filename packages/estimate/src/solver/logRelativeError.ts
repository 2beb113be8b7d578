/**
 * Log relative error LRE = −log₁₀(|a − c| / |c|): the number of leading significant digits on
 * which a computed value `a` agrees with a certified value `c`. When c = 0 the absolute error is
 * used. The result is clipped to [0, `maxDigits`] (an exact match gives `maxDigits`); a
 * non-finite `a` gives 0.
 *
 * ## References
 * B. D. McCullough (1998), "Assessing the reliability of statistical software: Part I",
 * The American Statistician 52(4), 358–366, doi:10.1080/00031305.1998.10480597.
 *
 * @param actual - computed value
 * @param certified - certified (reference) value
 * @param maxDigits - upper clip, normally the certified digits (default 11 for NIST StRD)
 * @returns agreeing digits, between 0 and `maxDigits`
 * @example
 * logRelativeError(1.0000001, 1); // ≈ 7
 */
export function logRelativeError(actual: number, certified: number, maxDigits = 11): number {
  if (!Number.isFinite(actual)) return 0;
  const err = certified === 0 ? Math.abs(actual) : Math.abs(actual - certified) / Math.abs(certified);
  if (err === 0) return maxDigits;
  const lre = -Math.log10(err);
  return lre < 0 ? 0 : lre > maxDigits ? maxDigits : lre;
}
