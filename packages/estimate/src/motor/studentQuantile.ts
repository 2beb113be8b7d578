/**
 * Upper quantile of Student's t distribution with ν degrees of freedom, by the Cornish–Fisher
 * expansion about the normal quantile (Hill's terms to order 1/ν⁴); exact enough (< 1e-4
 * relative) for ν ≥ 3, the range used for confidence intervals of fitted constants.
 *
 * ## References
 * G. W. Hill (1970), "Algorithm 396: Student's t-quantiles", Comm. ACM 13(10), 619–620,
 * doi:10.1145/355598.355600. M. Abramowitz, I. A. Stegun (1964), Handbook of Mathematical
 * Functions, 26.7.5 (the expansion) and 26.2.23 (the normal quantile).
 *
 * @param probability - lower-tail probability in (0.5, 1), e.g. 0.975
 * @param dof - degrees of freedom ν ≥ 1
 * @returns t such that P(T ≤ t) = probability
 * @example
 * studentQuantile(0.975, 1e9); // ≈ 1.95996
 */
export function studentQuantile(probability: number, dof: number): number {
  const z = normalQuantile(probability);
  const z2 = z * z;
  const g1 = (z * (z2 + 1)) / 4;
  const g2 = (z * ((5 * z2 + 16) * z2 + 3)) / 96;
  const g3 = (z * (((3 * z2 + 19) * z2 + 17) * z2 - 15)) / 384;
  const g4 = (z * ((((79 * z2 + 776) * z2 + 1482) * z2 - 1920) * z2 - 945)) / 92160;
  const v = dof;
  return z + g1 / v + g2 / (v * v) + g3 / (v * v * v) + g4 / (v * v * v * v);
}

/** Normal quantile by P. J. Acklam's rational approximation (relative error below 1.2e-9). */
function normalQuantile(p: number): number {
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const q = Math.min(p, 1 - p);
  const t = Math.sqrt(-2 * Math.log(q));
  let x = (((((c[0]! * t + c[1]!) * t + c[2]!) * t + c[3]!) * t + c[4]!) * t + c[5]!) / ((((d[0]! * t + d[1]!) * t + d[2]!) * t + d[3]!) * t + 1);
  if (q > 0.02425) {
    const u = q - 0.5;
    const r = u * u;
    x = ((((((a[0]! * r + a[1]!) * r + a[2]!) * r + a[3]!) * r + a[4]!) * r + a[5]!) * u) / (((((b[0]! * r + b[1]!) * r + b[2]!) * r + b[3]!) * r + b[4]!) * r + 1);
  }
  return p < 0.5 ? x : -x;
}
