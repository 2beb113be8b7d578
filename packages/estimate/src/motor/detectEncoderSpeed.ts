import { selectKth } from './selectKth.js';

/**
 * Recognises a speed channel computed from encoder counts, ω_k = Δcount_k·q/(t_k − t_{k−1}) (the
 * mean speed over the interval before each sample), and returns its angle quantum q [rad]; null
 * when the speed is not of that form.
 *
 * ## Method
 * d_k = ω_k·(t_k − t_{k−1}) is then a whole multiple of q. The candidate q is the smallest
 * non-zero |d_k| (one count), or a whole fraction of it (down to 1/8) when the rotor never moved by
 * a single count in one interval; it is accepted when 99 % of the d_k lie within 0.05·q of a
 * multiple (rounding in the file leaves a small remainder), the median interval holds at most 1000
 * counts (beyond that the file's rounding hides the grid and the quantisation is below 0.1 %) and at least 8 different counts occur.
 * The quantisation of such a speed is not white from sample to sample (each count error enters two
 * neighbouring speeds with opposite signs), which is why the estimator fits the angle instead.
 *
 * @param time - sample instants [s]
 * @param speed - logged speed [rad/s]
 * @returns the angle quantum q [rad], or null
 * @example
 * const t = Float64Array.from({ length: 100 }, (_, k) => k * 1e-3);
 * const q = (2 * Math.PI) / 1024;
 * detectEncoderSpeed(t, Float64Array.from(t, (_, k) => (k === 0 ? 0 : ((k % 9) * q) / 1e-3))); // ≈ 0.006136
 */
export function detectEncoderSpeed(time: Float64Array, speed: Float64Array): number | null {
  const n = speed.length;
  if (n < 16) return null;
  const d = new Float64Array(n - 1);
  let smallest = Infinity;
  let nan = false;
  for (let k = 1; k < n; k++) {
    const x = Math.abs(speed[k]! * (time[k]! - time[k - 1]!));
    d[k - 1] = x;
    if (x > 0 && x < smallest) smallest = x;
    else if (x !== x) nan = true;
  }
  if (!Number.isFinite(smallest)) return null;
  // The middle of the sorted |d|: by selection on a copy (the same value: no −0 after Math.abs),
  // by a sort when a NaN is present (sorted last).
  const copy = Float64Array.from(d);
  const middle = copy.length >> 1;
  const median = nan ? copy.sort()[middle]! : selectKth(copy, middle);
  for (let div = 1; div <= 8; div++) {
    const q = smallest / div;
    // Counts above ~1000 per interval: the rounding in the file hides the grid, and the speed's
    // quantisation (< 0.1 %) no longer matters.
    if (median / q > 1000) return null;
    let bad = 0, used = 0;
    const counts = new Set<number>();
    for (let k = 0; k < d.length; k++) {
      const c = d[k]! / q;
      const r = Math.round(c);
      if (Math.abs(c - r) > 0.05) bad++;
      used++;
      if (counts.size < 8) counts.add(r);
    }
    // Eight different counts, or — at the smallest step itself — three over a long record (a
    // coarse encoder at a high logging rate reads 0…4 counts per interval).
    if (bad <= 0.01 * used && (counts.size >= 8 || (div === 1 && counts.size >= 3 && n >= 200))) return q;
  }
  return null;
}
