import { robustZScores } from './robustZScores.js';
import type { KeyStatistics, MotorJudgement, SpecLimit } from './types.js';

/** |robust z| above this marks an outlier (Iglewicz & Hoaglin 1993, from memory). */
export const OUTLIER_THRESHOLD = 3.5;

/**
 * Lot statistics of one checked key over the fitted motors that have a value: n, mean, sample SD,
 * min, max, median, MAD, the capability indices Cp and Cpk against the spec limits, and the
 * outliers by robust z-score.
 *
 * ## Method
 * Cp = (USL − LSL)/(6s) and Cpk = min(USL − x̄, x̄ − LSL)/(3s), with x̄ the mean and s the sample SD
 * (n − 1) of the motors' estimates; for a one-sided limit Cp is not defined and Cpk is the one
 * side given. One lot with no rational subgroups gives only the overall s, so these are what
 * ISO 22514-2 calls performance indices (Pp, Ppk); they are named Cp and Cpk here as the shop floor
 * does. s includes the fit's own uncertainty (small next to the spread of a lot when the intervals
 * are narrow). Outliers: |0.6745·(x − median)/MAD| > 3.5 ({@link robustZScores}).
 *
 * ## References
 * NIST/SEMATECH e-Handbook of Statistical Methods, §6.1.6 "What is process capability?" (from
 * memory); ISO 22514-2, Statistical methods in process management — Capability and performance —
 * Part 2 (from memory). B. Iglewicz, D. C. Hoaglin (1993), How to Detect and Handle Outliers (from memory).
 *
 * @param limit - the spec limit
 * @param motors - judged motors (errors and motors without a value of this key are left out of n)
 * @returns the statistics
 * @example
 * keyStatistics(limitR, motors).cpk; // ≈ 1.9
 */
export function keyStatistics(limit: SpecLimit, motors: readonly MotorJudgement[]): KeyStatistics {
  const points: { serial: string; value: number }[] = [];
  for (const m of motors) {
    const k = m.keys.find((x) => x.key === limit.key);
    if (k !== undefined && k.value !== null && Number.isFinite(k.value)) points.push({ serial: m.serial, value: k.value });
  }
  const xs = points.map((p) => p.value);
  const n = xs.length;
  const out: KeyStatistics = {
    key: limit.key, unit: limit.unit, lower: limit.lower, upper: limit.upper, n,
    mean: null, sd: null, min: null, max: null, median: null, mad: null, cp: null, cpk: null, outliers: [], notes: [],
  };
  if (n === 0) { out.notes.push('no motor has a value of this key'); return out; }
  let mean = 0;
  for (let i = 0; i < n; i++) mean += (xs[i]! - mean) / (i + 1); // running mean: no overflow, no cancellation of a large sum
  out.mean = mean;
  out.min = Math.min(...xs);
  out.max = Math.max(...xs);
  if (n >= 2) {
    let ss = 0;
    for (const x of xs) ss += (x - mean) * (x - mean);
    out.sd = Math.sqrt(ss / (n - 1));
  }
  const rz = robustZScores(xs);
  out.median = rz.median;
  out.mad = rz.mad;
  if (rz.scores === null) out.notes.push('MAD is 0 (more than half the values are equal): no robust z-scores');
  else {
    rz.scores.forEach((z, i) => {
      if (Math.abs(z) > OUTLIER_THRESHOLD) out.outliers.push({ serial: points[i]!.serial, value: xs[i]!, robustZ: z });
    });
  }
  const s = out.sd;
  if (s === null) out.notes.push('Cp and Cpk need at least 2 motors with a value');
  else if (!(s > 0)) out.notes.push('Cp and Cpk are not defined: the values do not spread (SD 0)');
  else {
    const { lower, upper } = limit;
    if (lower !== null && upper !== null) out.cp = (upper - lower) / (6 * s);
    else out.notes.push('one-sided limit: Cp is not defined, Cpk is taken on the side given');
    const sides: number[] = [];
    if (upper !== null) sides.push((upper - mean) / (3 * s));
    if (lower !== null) sides.push((mean - lower) / (3 * s));
    out.cpk = Math.min(...sides);
  }
  return out;
}
