import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import { selectKth } from './selectKth.js';
import { onceForUnchanged } from './estimateNoiseLevel.js';

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
  // The fit and the diagnosis both ask about the same speed channel: answered once while it is kept unchanged.
  return onceForUnchanged('encoder speed', [speed, time], [], () => encoderQuantum(time, speed), (q) => q);
}

/** {@link detectEncoderSpeed}, computed. */
function encoderQuantum(time: Float64Array, speed: Float64Array): number | null {
  const n = speed.length;
  if (n < 16) return null;
  const steps = (n >= KERNEL_MIN_LENGTH && time.length >= n ? countStepsKernel(time, speed) : null) ?? countSteps(time, speed);
  const { d, smallest, nan } = steps;
  if (!Number.isFinite(smallest)) return null;
  // The middle of the sorted |d|: by selection on a copy (the same value: no −0 after Math.abs),
  // by a sort when a NaN is present (sorted last).
  const middle = d.length >> 1;
  const median = nan ? Float64Array.from(d).sort()[middle]! : steps.select(middle);
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
    if (bad <= 0.01 * used && (counts.size >= 8 || (div === 1 && counts.size >= 3 && n >= 200))) return noisierThanCounts(time, speed, q) ? null : q;
  }
  return null;
}

/**
 * The angle steps d_k = |ω_k·(t_k − t_{k−1})|, the smallest one above 0, whether one is NaN, and
 * `select(k)`: the k-th smallest step as {@link selectKth} finds it on a copy of d (no NaN in d).
 */
interface CountSteps { d: Float64Array; smallest: number; nan: boolean; select(k: number): number }

/** The first pass of `detectEncoderSpeed` in plain JavaScript (the reference of {@link countStepsKernel} and its fallback; exported for the tests). */
export function countSteps(time: Float64Array, speed: Float64Array): CountSteps {
  const n = speed.length;
  const d = new Float64Array(n - 1);
  let smallest = Infinity;
  let nan = false;
  for (let k = 1; k < n; k++) {
    const x = Math.abs(speed[k]! * (time[k]! - time[k - 1]!));
    d[k - 1] = x;
    if (x > 0 && x < smallest) smallest = x;
    else if (x !== x) nan = true;
  }
  return { d, smallest, nan, select: (k) => selectKth(Float64Array.from(d), k) };
}

/**
 * {@link countSteps} through the WebAssembly kernel (sampleKernels.wat): the same bits; null where it
 * cannot run (or `time` is shorter than `speed`). Its `d` is a view of the kernel's memory, valid
 * until the next call of a sample kernel, and `select` copies it within that memory and selects
 * there (the kernel `selectKth` calls: the same swaps on the same values, so the same value).
 */
export function countStepsKernel(time: Float64Array, speed: Float64Array): CountSteps | null {
  const n = speed.length;
  if (time.length < n || n < 1) return null;
  // The steps overwrite the speeds (d[k − 1] is written after w[k − 1] was last read); the median's
  // copy goes over the instants, which are read no more either.
  const tAt = n, dAt = 0, outAt = 2 * n;
  const room = sampleKernels.room(8 * (outAt + 1));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(speed, 0);
  f64.set(time.subarray(0, n), tAt);
  const nan = k.countSteps(0, 8 * tAt, n, 8 * dAt, 8 * outAt) === 1;
  const m = n - 1;
  return {
    d: f64.subarray(dAt, dAt + m), smallest: f64[outAt]!, nan,
    select: (j) => {
      f64.copyWithin(tAt, dAt, dAt + m);
      return k.select(8 * tAt, m, j);
    },
  };
}

/**
 * Whether the speed's sample-to-sample noise is far above what counting alone leaves: an
 * ADC-quantised tachometer on a uniform clock passes the whole-multiple test too (every reading
 * is a multiple of its LSB), but its analog noise spans several LSB, while a speed from counts
 * carries only the angle's rounding, (ε_k − ε_{k−1})/Δt with ε uniform over one count: its second
 * differences then have an SD of √(20/12)·q/Δt, which the MAD estimate /√6 puts at 0.53·q/Δt
 * (derived here). Above 1.5·q/Δt (three times that) the channel is read as a quantised analog
 * speed, whose noise is white and needs no angle fit.
 */
function noisierThanCounts(time: Float64Array, speed: Float64Array, q: number): boolean {
  const n = speed.length;
  const d2 = new Float64Array(n - 2);
  const dt = new Float64Array(n - 1);
  for (let k = 1; k < n; k++) dt[k - 1] = time[k]! - time[k - 1]!;
  for (let k = 2; k < n; k++) d2[k - 2] = speed[k]! - 2 * speed[k - 1]! + speed[k - 2]!;
  // Finite samples (checked by the caller), so selection gives the sorted middle.
  const med = (x: Float64Array): number => selectKth(Float64Array.from(x), x.length >> 1);
  const m = med(d2);
  const sigma = (1.4826 * med(d2.map((x) => Math.abs(x - m)))) / Math.sqrt(6);
  return sigma > (1.5 * q) / med(dt);
}
