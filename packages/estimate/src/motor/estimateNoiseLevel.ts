import { KERNEL_MIN_LENGTH, sampleKernels, sortInKernel, sortSpare } from './sampleKernels.js';
import { medianInPlace } from './selectKth.js';
import type { NoiseLevel } from './types.js';

/** 1/Φ⁻¹(3/4): makes the median absolute deviation a consistent SD estimate for Gaussian noise. */
const MAD_TO_SD = 1.482602218505602;
/** √6: the SD of the second difference of white noise is √6·σ (see the Method section). */
const SQRT6 = Math.sqrt(6);
/**
 * Most second differences entering the MAD. With N = 2¹⁵ of them the MAD-based σ has a relative
 * standard error of about 1.17/√N ≈ 0.65 % for Gaussian noise (asymptotic variance of the MAD
 * scale estimate 1.36·σ²/N, from memory; neighbouring differences are correlated only when the
 * stride is 1), well below what matters for weights.
 */
const MAX_DIFFERENCES = 32768;
/** √12: the SD of rounding error with quantum q is q/√12 (uniform on ±q/2). */
const SQRT12 = Math.sqrt(12);

/**
 * Estimates the standard deviation of the white measurement noise on one channel from the data
 * alone, so that channels in different units can be weighted honestly in a joint fit.
 *
 * ## Method
 * Second differences d_k = x_{k+1} − 2·x_k + x_{k−1} remove any signal that is smooth on the
 * scale of two samples (a constant and a slope vanish exactly, curvature leaves x''·h²). For
 * independent noise e_k of variance σ² the three terms are independent, so
 * var(d_k) = (1² + 2² + 1²)·σ² = 6σ² and σ = SD(d)/√6. The SD of d is taken robustly as
 * 1.4826·MAD(d), so the few samples at a step or an edge do not inflate it. Records longer than
 * 2¹⁵ + 2 samples use every s-th second difference, s = ⌈(n − 2)/2¹⁵⌉, spread evenly over the
 * record (O(n) reads, O(2¹⁵) selection work).
 *
 * Quantised data (ADC codes, rounding in the file) need two more rules. The values lie on a grid
 * of step q (the mean single-code gap between neighbouring distinct values, accepted when the
 * gaps between distinct values are whole numbers of it): the rounding alone has SD q/√12, a floor for σ. And the MAD of quantised
 * second differences moves in whole codes, so unless it spans at least 4 codes σ comes instead
 * from the RMS of the central 96 % of the deviations (smooth in the data; divided by 0.9346,
 * what a Gaussian keeps after that trim). A piecewise-constant series with no noise at all
 * inside its runs and no grid (an exact logged command) gives σ = 0 with method `exact`; a series
 * whose neighbours never differ gives the SD of its quietest tenth, or σ = 0 with method `constant`.
 *
 * The estimate is kept with a copy of the samples: a later call on the same array whose samples
 * are bit for bit unchanged returns it again (a copy of the result) instead of estimating anew.
 *
 * ## References
 * F. R. Hampel (1974), "The influence curve and its role in robust estimation", J. Am. Stat.
 * Assoc. 69(346), 383–393, doi:10.1080/01621459.1974.10482962 (the MAD scale factor).
 *
 * @param values - the channel, at least 8 samples; non-finite samples are skipped
 * @returns σ in the channel's unit, which estimator gave it, and the quantum when one was seen
 * @throws TypeError when `values` is not a Float64Array
 * @throws RangeError when fewer than 8 finite samples are present
 * @example
 * estimateNoiseLevel(Float64Array.from({ length: 1000 }, (_, k) => 0.01 * k)).sigma; // => 0 (a ramp has no noise)
 */
export function estimateNoiseLevel(values: Float64Array): NoiseLevel {
  if (!(values instanceof Float64Array)) throw new TypeError('estimateNoiseLevel: values must be a Float64Array');
  const scope = unchanged;
  if (scope !== null && scope.arrays.has(values)) {
    // An array its caller keeps unchanged for now: by identity alone, with no copy to compare.
    let level = scope.levels.get(values);
    if (level === undefined) {
      level = estimateAfresh(values);
      scope.levels.set(values, level);
    }
    return { ...level };
  }
  const seen = estimated.get(values);
  if (seen !== undefined && sameSamples(seen.samples, values)) return { ...seen.level };
  const level = estimateAfresh(values);
  estimated.set(values, { samples: values.slice(), level: { ...level } });
  return level;
}

/**
 * The estimates already made, per channel array, with a copy of the samples they were made from.
 * The fit, the model choice and every detector ask for the noise of the same few channels (a
 * 1e5-sample recording is asked about 17 times); an array whose samples have changed since is
 * estimated again, so the answer is always that of the samples as they are now.
 */
const estimated = new WeakMap<Float64Array, { samples: Float64Array; level: NoiseLevel }>();

/**
 * Inside {@link shareUnchangedNoise}: the arrays its caller keeps unchanged until it returns (the
 * recordings of a `sharePreparation` call), and their noise levels. Null outside it.
 */
let unchanged: {
  arrays: WeakSet<Float64Array>;
  levels: WeakMap<Float64Array, NoiseLevel>;
  /** What {@link onceForUnchanged} has computed, by the first array, then by what and the numbers. */
  results: WeakMap<Float64Array, Map<string, { others: readonly Float64Array[]; value: unknown }[]>>;
} | null = null;

/**
 * Runs `work` with the noise level of each array named by {@link keepsUnchanged} estimated once and
 * reused by identity, without the copy and the comparison that `estimated` needs (`sharePreparation`
 * opens it: its caller keeps the recordings unchanged while it runs). Nested calls share the outer one.
 *
 * @param work - what runs inside
 * @returns what `work` returns
 * @example
 * shareUnchangedNoise(() => { keepsUnchanged([current]); return [estimateNoiseLevel(current), estimateNoiseLevel(current)]; }); // the second is the first, not estimated again
 */
export function shareUnchangedNoise<T>(work: () => T): T {
  if (unchanged !== null) return work();
  unchanged = { arrays: new WeakSet(), levels: new WeakMap(), results: new WeakMap() };
  try {
    return work();
  } finally {
    unchanged = null;
  }
}

/**
 * Names arrays that stay unchanged until the current {@link shareUnchangedNoise} call returns (nothing
 * outside one): their noise levels are then shared by identity.
 *
 * @param arrays - the arrays (anything else in the list is passed over)
 * @example
 * keepsUnchanged([recording.time, ...Object.values(recording.channels)]);
 */
export function keepsUnchanged(arrays: readonly unknown[]): void {
  if (unchanged === null) return;
  for (const a of arrays) if (a instanceof Float64Array) unchanged.arrays.add(a);
}

/**
 * Inside {@link shareUnchangedNoise}, when every one of `arrays` is kept unchanged
 * ({@link keepsUnchanged}): `compute()` once per `what`, arrays (by identity) and numbers, its value
 * handed out again to later calls through `copy` (so that a caller that changes what it got
 * changes nothing for the next one). Anywhere else: `compute()`. A detector the fit and the
 * diagnosis both run on the same channels (the encoder test on the speed, the voltage's segments)
 * is then run once per recording.
 *
 * @param what - the computation's name (with `numbers`, the key)
 * @param arrays - the arrays it reads (at least one)
 * @param numbers - the other arguments it depends on
 * @param compute - the computation
 * @param copy - a copy of a value for a later caller
 * @returns the value
 * @example
 * onceForUnchanged('mean', [x], [], () => x.reduce((a, b) => a + b, 0) / x.length, (m) => m); // inside sharePreparation, once per x
 */
export function onceForUnchanged<T>(what: string, arrays: readonly Float64Array[], numbers: readonly number[], compute: () => T, copy: (value: T) => T): T {
  const scope = unchanged;
  if (scope === null || arrays.length === 0 || !arrays.every((a) => scope.arrays.has(a))) return compute();
  const [first, ...others] = arrays as [Float64Array, ...Float64Array[]];
  // Numbers by value: String gives each double its own text, except −0 (written "0"), written out here.
  const key = `${what}|${numbers.map((x) => (Object.is(x, -0) ? '-0' : String(x))).join(',')}`;
  let byKey = scope.results.get(first);
  if (byKey === undefined) scope.results.set(first, (byKey = new Map()));
  let entries = byKey.get(key);
  if (entries === undefined) byKey.set(key, (entries = []));
  const seen = entries.find((e) => e.others.length === others.length && e.others.every((a, i) => a === others[i]));
  if (seen !== undefined) return copy(seen.value as T);
  const value = compute();
  entries.push({ others, value: copy(value) });
  return value;
}

/** True when `a` and `b` hold bit for bit the same samples (compared in the sample kernel for long series). */
export function sameSamples(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  const n = a.length;
  if (n >= KERNEL_MIN_LENGTH) {
    const room = sampleKernels.room(16 * n);
    if (room !== null) {
      room.f64.set(a, 0);
      room.f64.set(b, n);
      return room.exports.sameWords(0, 8 * n, n) === 1;
    }
  }
  const x = new Int32Array(a.buffer, a.byteOffset, 2 * a.length);
  const y = new Int32Array(b.buffer, b.byteOffset, 2 * b.length);
  for (let k = 0; k < x.length; k++) if (x[k] !== y[k]) return false;
  return true;
}

function estimateAfresh(values: Float64Array): NoiseLevel {
  const fn = 'estimateNoiseLevel';
  const n = values.length;
  // Long records: every stride-th second difference (at most MAX_DIFFERENCES of them, spread over
  // the whole record) is enough for the MAD; the quantum still looks at every step.
  const stride = n - 2 > MAX_DIFFERENCES ? Math.ceil((n - 2) / MAX_DIFFERENCES) : 1;
  const { finite, quantum, deviations: sd2, mad } = (n >= KERNEL_MIN_LENGTH ? differenceStatsKernel(values, stride) : null) ?? differenceStats(values, stride);
  if (finite < 8) throw new RangeError(`${fn}: values must hold at least 8 finite samples (got ${finite})`);
  // A grid of values (ADC codes, rounding in the file): the rounding error alone has SD q/√12.
  const q = gridStep(values, quantum);
  const floor = q > 0 ? q / SQRT12 : 0;
  // The MAD of quantised data moves in whole codes: trust it only when it spans several of them;
  // otherwise take the RMS of the central 96 % of |d| (smooth in the data), corrected for the trim.
  if (mad > 0 && (q === 0 || mad >= 4 * q)) {
    return { sigma: Math.max((MAD_TO_SD * mad) / SQRT6, floor), method: 'second-difference', quantum: q > 0 ? q : null };
  }
  const trimmed = trimmedRms(sd2) / SQRT6;
  if (trimmed > 0) {
    return { sigma: Math.max(trimmed, floor), method: trimmed >= floor ? 'second-difference' : 'quantisation', quantum: q > 0 ? q : null };
  }
  if (floor > 0) return { sigma: floor, method: 'quantisation', quantum: q };
  // No noise inside the runs and no grid: a piecewise-constant series without noise (an exact
  // command logged by the controller).
  if (Number.isFinite(quantum)) return { sigma: 0, method: 'exact', quantum: null };
  const settled = quietestSegmentSd(values);
  if (settled > 0) return { sigma: settled, method: 'settled-segment', quantum: null };
  return { sigma: 0, method: 'constant', quantum: null };
}

/** The passes of `estimateAfresh` over every sample, before the grid and the trimmed RMS. */
interface DifferenceStats {
  /** Count of finite samples. */
  finite: number;
  /** Smallest non-zero step between neighbours (Infinity when none). */
  quantum: number;
  /** |d − median(d)| for the finite second differences d (every stride-th). */
  deviations: Float64Array;
  /** Median of `deviations` (NaN when there are none). */
  mad: number;
}

/**
 * One pass for the finite count and the smallest non-zero step (a step next to a non-finite sample
 * is NaN and never counts); then every stride-th finite second difference, their median, the
 * absolute deviations from it and their median (the MAD). Plain JavaScript: the reference of
 * {@link differenceStatsKernel} and its fallback (exported for the tests).
 */
export function differenceStats(values: Float64Array, stride: number): DifferenceStats {
  const n = values.length;
  let finite = 0;
  let quantum = Infinity;
  if (n > 0 && Number.isFinite(values[0]!)) finite++;
  for (let k = 1; k < n; k++) {
    const x = values[k]!;
    if (Number.isFinite(x)) finite++;
    const step = Math.abs(x - values[k - 1]!);
    if (step > 0 && step < quantum) quantum = step;
  }
  const d = new Float64Array(Math.ceil(Math.max(n - 2, 0) / stride));
  let m = 0;
  for (let k = 1; k + 1 < n; k += stride) {
    const v = values[k + 1]! - 2 * values[k]! + values[k - 1]!;
    if (Number.isFinite(v)) {
      d[m++] = v;
    }
  }
  const deviations = d.subarray(0, m);
  const med = median(deviations);
  for (let k = 0; k < m; k++) deviations[k] = Math.abs(deviations[k]! - med);
  return { finite, quantum, deviations, mad: median(deviations) };
}

/**
 * {@link differenceStats} through the WebAssembly kernel (sampleKernels.wat): the same operations
 * in the same order, so the same bits; null where the kernel cannot run. Memory: the samples, then
 * the differences, then a working copy for the selections, then one double of output.
 */
export function differenceStatsKernel(values: Float64Array, stride: number): DifferenceStats | null {
  const n = values.length;
  const cap = Math.ceil(Math.max(n - 2, 0) / stride);
  const dAt = n;
  const copyAt = dAt + cap;
  const outAt = copyAt + cap;
  const room = sampleKernels.room(8 * (outAt + 1));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(values, 0);
  const finite = k.steps(0, n, 8 * outAt);
  const quantum = f64[outAt]!;
  const m = k.secondDifferences(0, n, stride, 8 * dAt);
  const kernelMedian = (): number => {
    if (m === 0) return NaN;
    f64.copyWithin(copyAt, dAt, dAt + m);
    const h = m >> 1;
    const hi = k.select(8 * copyAt, m, h);
    return m % 2 === 1 ? hi : 0.5 * (k.largestOf(8 * copyAt, h) + hi);
  };
  const med = kernelMedian();
  k.absoluteDeviations(8 * dAt, m, med);
  const mad = kernelMedian();
  return { finite, quantum, deviations: f64.slice(dAt, dAt + m), mad };
}

/**
 * RMS of the smallest 96 % of the absolute deviations, divided by the RMS a Gaussian keeps after
 * the same trim (0.9346: the SD of a normal truncated at ±2.054σ, the 98th percentile, is
 * √(1 − 2·2.054·φ(2.054)/0.96) = 0.9346σ — derived here). Steps and edges fall in the trimmed 4 %.
 */
function trimmedRms(absDev: Float64Array): number {
  const m = absDev.length;
  if (m < 8) return 0;
  const keep = Math.max(1, Math.floor(0.96 * m));
  let q = 0;
  const room = m >= KERNEL_MIN_LENGTH ? sampleKernels.room(8 * (m + sortSpare(m))) : null;
  if (room !== null) {
    // The same order (the kernel's sort), then the same sum of squares in order, in the kernel's memory.
    room.f64.set(absDev, 0);
    sortInKernel(room, 0, m, m);
    q = room.exports.dot(0, 0, keep);
  } else {
    const s = Float64Array.from(absDev).sort();
    for (let k = 0; k < keep; k++) q += s[k]! * s[k]!;
  }
  return Math.sqrt(q / keep) / 0.9346;
}

/**
 * The step of the grid the values lie on, when they do: the mean of the single-code gaps between
 * neighbouring distinct values (at least 3 of them: a two-level command is not a grid), accepted
 * when 95 % of the gaps between distinct values are whole numbers of steps (within
 * 0.05 + 0.001 per step). 0 when there is no grid.
 */
function gridStep(values: Float64Array, quantum: number): number {
  if (!Number.isFinite(quantum) || !(quantum > 0)) return 0;
  const stride = Math.max(1, Math.floor(values.length / 20000));
  return (values.length >= KERNEL_MIN_LENGTH ? gridStepKernel(values, quantum, stride) : null) ?? gridStepPlain(values, quantum, stride);
}

/** {@link gridStep}'s work in plain JavaScript (the reference of {@link gridStepKernel} and its fallback; exported for the tests). */
export function gridStepPlain(values: Float64Array, quantum: number, stride: number): number {
  const distinct = sortedDistinct(values, stride);
  // The step, refined as the mean of the single-code gaps between neighbouring distinct values
  // (rounding in the file makes the smallest step a little off).
  let sum = 0, single = 0;
  for (let j = 1; j < distinct.length; j++) {
    const d = distinct[j]! - distinct[j - 1]!;
    if (d > 0.5 * quantum && d < 1.5 * quantum) { sum += d; single++; }
  }
  if (single < 3) return 0;
  const q = sum / single;
  // Every gap a whole number of steps (loosely for the long gaps, whose rounding adds up).
  // (Stops at the first gap over the allowance: the answer is then no grid.)
  const allowed = 0.05 * (distinct.length - 1);
  let bad = 0;
  for (let j = 1; j < distinct.length; j++) {
    const c = (distinct[j]! - distinct[j - 1]!) / q;
    if (Math.abs(c - Math.round(c)) > 0.05 + 1e-3 * c && ++bad > allowed) return 0;
  }
  return q;
}

/**
 * {@link gridStepPlain} through the WebAssembly kernel (sampleKernels.wat), sorted by the kernel's
 * radix sort (the typed array's order, {@link sortInKernel}); null where the kernel cannot run.
 */
export function gridStepKernel(values: Float64Array, quantum: number, stride: number): number | null {
  const n = values.length;
  const pickAt = n;
  const outAt = pickAt + Math.ceil(n / stride);
  const room = sampleKernels.room(8 * (outAt + 1 + sortSpare(outAt - pickAt)));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(values, 0);
  const m = k.pickFinite(0, n, stride, 8 * pickAt);
  sortInKernel(room, pickAt, m, outAt + 1);
  const u = k.distinctInPlace(8 * pickAt, m);
  const single = k.singleGaps(8 * pickAt, u, quantum, 8 * outAt);
  if (single < 3) return 0;
  const q = f64[outAt]! / single;
  return k.offGrid(8 * pickAt, u, q, 0.05 * (u - 1)) === 1 ? 0 : q;
}

/**
 * The distinct finite values among values[0], values[stride], values[2·stride], …, ascending
 * (−0 and +0 count as one value; which of them is kept does not change any difference taken).
 */
function sortedDistinct(values: Float64Array, stride: number): Float64Array {
  const picked = new Float64Array(Math.ceil(values.length / stride));
  let m = 0;
  for (let k = 0; k < values.length; k += stride) {
    const v = values[k]!;
    if (Number.isFinite(v)) picked[m++] = v;
  }
  const sorted = picked.subarray(0, m).sort();
  let u = 0;
  for (let j = 0; j < m; j++) if (u === 0 || sorted[j] !== sorted[u - 1]) sorted[u++] = sorted[j]!;
  return sorted.subarray(0, u);
}

/** Median by Hoare's selection (expected O(n)) on a copy; the input is left as it is. */
function median(a: Float64Array): number {
  return medianInPlace(Float64Array.from(a));
}

function quietestSegmentSd(values: Float64Array): number {
  const n = values.length;
  const w = Math.max(8, Math.floor(n / 10));
  let best = Infinity;
  for (let start = 0; start + w <= n; start += Math.max(1, w >> 1)) {
    let s = 0;
    let c = 0;
    for (let k = start; k < start + w; k++) if (Number.isFinite(values[k]!)) { s += values[k]!; c++; }
    if (c < 4) continue;
    const mean = s / c;
    let q = 0;
    for (let k = start; k < start + w; k++) if (Number.isFinite(values[k]!)) q += (values[k]! - mean) * (values[k]! - mean);
    const sd = Math.sqrt(q / (c - 1));
    if (sd < best) best = sd;
  }
  return Number.isFinite(best) ? best : 0;
}
