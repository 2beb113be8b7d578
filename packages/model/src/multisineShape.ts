/**
 * The multisine the generator and the planner drive with: `harmonics` cosines at k·f0
 * (f0 = 1/period) with Schroeder phases −π·k(k−1)/K, which keep the crest factor low, scaled to a
 * peak of 1 over the given instants.
 *
 * ## References
 * M. R. Schroeder (1970), "Synthesis of low-peak-factor signals and binary sequences with low
 * autocorrelation", IEEE Trans. Inf. Theory 16(1), 85–89, doi:10.1109/TIT.1970.1054411.
 *
 * @param time - sample instants [s]
 * @param period - period of the lowest harmonic [s]
 * @param harmonics - number of harmonics K. @default 31
 * @returns the shape at each instant, peak |value| 1 (all zeros when every instant gives 0)
 * @example
 * const s = multisineShape(Float64Array.from({ length: 1000 }, (_, k) => k * 1e-3), 1);
 * Math.max(...s.map(Math.abs)); // => 1
 */
export function multisineShape(time: Float64Array, period: number, harmonics = 31): Float64Array {
  const f0 = 1 / period;
  const out = new Float64Array(time.length);
  let peak = 0;
  for (let i = 0; i < time.length; i++) {
    let s = 0;
    for (let k = 1; k <= harmonics; k++) s += Math.cos(2 * Math.PI * k * f0 * time[i]! - (Math.PI * k * (k - 1)) / harmonics);
    out[i] = s;
    peak = Math.max(peak, Math.abs(s));
  }
  if (peak > 0) for (let i = 0; i < out.length; i++) out[i] = out[i]! / peak;
  return out;
}
