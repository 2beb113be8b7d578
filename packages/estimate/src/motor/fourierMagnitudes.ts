/**
 * Magnitude spectrum of a real series by a radix-2 FFT after removing the mean and applying a
 * window (rectangular or Hann), zero-padded to the next power of two at least `oversample` times the length.
 *
 * ## Method
 * Iterative Cooley–Tukey radix-2 FFT (bit reversal, then log₂N butterfly passes).
 *
 * ## References
 * J. W. Cooley, J. W. Tukey (1965), "An algorithm for the machine calculation of complex Fourier
 * series", Math. Comp. 19, 297–301, doi:10.1090/S0025-5718-1965-0178586-1.
 *
 * @param values - uniformly sampled series
 * @param oversample - zero-padding factor (≥ 1). @default 2
 * @param window - `rectangular` resolves harmonics one bin apart; `hann` lowers leakage. @default 'rectangular'
 * @returns magnitudes of bins 0…N/2 and the FFT length N (bin k is at k/(N·h) Hz)
 * @example
 * fourierMagnitudes(Float64Array.from({ length: 64 }, (_, k) => Math.cos(k))).length; // => 128
 */
export function fourierMagnitudes(values: Float64Array, oversample = 2, window: 'rectangular' | 'hann' = 'rectangular'): { magnitude: Float64Array; length: number } {
  const n = values.length;
  let size = 1;
  while (size < n * Math.max(1, oversample)) size *= 2;
  const re = new Float64Array(size);
  const im = new Float64Array(size);
  let mean = 0;
  for (let k = 0; k < n; k++) mean += values[k]!;
  mean /= n;
  const hann = window === 'hann';
  for (let k = 0; k < n; k++) re[k] = (values[k]! - mean) * (hann ? 0.5 - 0.5 * Math.cos((2 * Math.PI * k) / Math.max(n - 1, 1)) : 1);
  // bit reversal
  for (let i = 1, j = 0; i < size; i++) {
    let bit = size >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      const tr = re[i]!; re[i] = re[j]!; re[j] = tr;
      const ti = im[i]!; im[i] = im[j]!; im[j] = ti;
    }
  }
  for (let len = 2; len <= size; len <<= 1) {
    const ang = (-2 * Math.PI) / len;
    const wr = Math.cos(ang), wi = Math.sin(ang);
    const half = len >> 1;
    for (let i = 0; i < size; i += len) {
      let cr = 1, ci = 0;
      for (let k = 0; k < half; k++) {
        const a = i + k, b = a + half;
        const xr = re[b]! * cr - im[b]! * ci;
        const xi = re[b]! * ci + im[b]! * cr;
        re[b] = re[a]! - xr; im[b] = im[a]! - xi;
        re[a] = re[a]! + xr; im[a] = im[a]! + xi;
        const nr = cr * wr - ci * wi;
        ci = cr * wi + ci * wr;
        cr = nr;
      }
    }
  }
  const magnitude = new Float64Array(size / 2 + 1);
  for (let k = 0; k <= size / 2; k++) magnitude[k] = Math.hypot(re[k]!, im[k]!);
  return { magnitude, length: size };
}
