import { createKernel } from '@motorprint/model/kernels';
import { wasm } from './timeBaseKernels.wasm.js';
import type { IngestIssue, TimeBase } from './types.js';

/** Intervals longer than this multiple of the median are reported as gaps. */
const GAP_FACTOR = 3;
/** Relative dt standard deviation above which sampling is reported as irregular. */
const JITTER_NOTE = 0.01;

/**
 * Describes a strictly increasing time base: span, median sample interval, jitter and gaps.
 *
 * @param time - sample times [s], strictly increasing, at least 2 samples
 * @returns the time base and issues `time-gap` (intervals > 3 × median) and `irregular-sampling`
 *   (std of dt > 1 % of the median)
 * @example
 * checkTimeBase(Float64Array.of(0, 0.001, 0.002, 0.003)).timeBase.sampleRate // ≈ 1000
 */
export function checkTimeBase(time: Float64Array): { timeBase: TimeBase; issues: IngestIssue[] } {
  const n = time.length;
  const { maxDt, maxAt, minDt, ss, median, gaps } = (n - 1 >= KERNEL_MIN_LENGTH ? intervalStatsKernel(time) : null) ?? intervalStats(time);
  const m = n - 1;
  const std = m > 1 ? Math.sqrt(ss / (m - 1)) : 0;
  const maxDev = Math.max(maxDt - median, median - minDt);
  const timeBase: TimeBase = {
    start: time[0]!,
    end: time[n - 1]!,
    duration: time[n - 1]! - time[0]!,
    sampleInterval: median,
    sampleRate: 1 / median,
    jitterStd: std / median,
    jitterMax: maxDev / median,
    gaps,
    maxInterval: maxDt,
  };
  const issues: IngestIssue[] = [];
  if (gaps > 0) {
    issues.push({
      code: 'time-gap',
      severity: 'warning',
      message: `${gaps} sample intervals are longer than ${GAP_FACTOR} × the median ${fmt(median)} s; the largest is ${fmt(maxDt)} s after t = ${fmt(time[maxAt]!)} s.`,
    });
  }
  if (timeBase.jitterStd > JITTER_NOTE) {
    issues.push({
      code: 'irregular-sampling',
      severity: 'info',
      message: `Sample intervals vary: std ${(100 * timeBase.jitterStd).toFixed(2)} % of the median ${fmt(median)} s, worst ${(100 * timeBase.jitterMax).toFixed(1)} %.`,
    });
  }
  return { timeBase, issues };
}

/** What checkTimeBase reads from the intervals. */
interface IntervalStats { sum: number; maxDt: number; maxAt: number; minDt: number; ss: number; median: number; gaps: number }

/**
 * The intervals' sum, largest (and where), smallest, sum of squares about their mean, median and
 * count above GAP_FACTOR × the median. Plain JavaScript: the reference of
 * {@link intervalStatsKernel} and its fallback (exported for the tests).
 */
export function intervalStats(time: Float64Array): IntervalStats {
  const m = time.length - 1;
  const dt = new Float64Array(m);
  // Each loop is a function of its own: V8 compiles a long loop while it runs, and code after the
  // loop in the same function would send that compiled code back to the interpreter.
  const pass = intervalPass(time, dt);
  const sum = pass[0]!;
  const ss = sumOfSquares(dt, sum / m);
  // The median reorders dt; the rest needs no order.
  const median = medianOf(dt);
  return { sum, maxDt: pass[1]!, maxAt: pass[2]!, minDt: pass[3]!, ss, median, gaps: countAbove(dt, GAP_FACTOR * median) };
}

/**
 * {@link intervalStats} through the WebAssembly kernel (timeBaseKernels.wat): the same operations in
 * the same order, so the same bits; null where it cannot run.
 */
export function intervalStatsKernel(time: Float64Array): IntervalStats | null {
  const n = time.length;
  const m = n - 1;
  if (m < 1) return null;
  const dtAt = n, outAt = n + m;
  const room = kernel.room(8 * (outAt + 4));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(time, 0);
  k.intervals(0, m, 8 * dtAt, 8 * outAt);
  const sum = f64[outAt]!, maxDt = f64[outAt + 1]!, maxAt = f64[outAt + 2]!, minDt = f64[outAt + 3]!;
  const ss = k.sumOfSquares(8 * dtAt, m, sum / m);
  const median = k.median(8 * dtAt, m);
  return { sum, maxDt, maxAt, minDt, ss, median, gaps: k.countAbove(8 * dtAt, m, GAP_FACTOR * median) };
}

/** The time base's kernel (timeBaseKernels.wat), compiled on first use. */
const kernel = createKernel<{
  intervals(t: number, m: number, dt: number, out: number): void;
  sumOfSquares(x: number, m: number, mean: number): number;
  countAbove(x: number, m: number, limit: number): number;
  median(x: number, m: number): number;
}>(wasm);

/** Fewer intervals than this take the JavaScript loops (common practice, no source). */
const KERNEL_MIN_LENGTH = 256;

/** Fills `dt` with the intervals of `time`; returns [their sum in order, the largest, its index, the smallest]. */
function intervalPass(time: Float64Array, dt: Float64Array): Float64Array {
  const m = dt.length;
  let sum = 0;
  let maxDt = 0;
  let maxAt = 0;
  let minDt = Number.POSITIVE_INFINITY;
  for (let k = 0; k < m; k++) {
    const d = time[k + 1]! - time[k]!;
    dt[k] = d;
    sum += d;
    if (d > maxDt) {
      maxDt = d;
      maxAt = k;
    }
    if (d < minDt) minDt = d;
  }
  return Float64Array.of(sum, maxDt, maxAt, minDt);
}

/** Σ (x[k] − mean)², summed in order. */
function sumOfSquares(x: Float64Array, mean: number): number {
  let ss = 0;
  for (let k = 0; k < x.length; k++) {
    const e = x[k]! - mean;
    ss += e * e;
  }
  return ss;
}

/** How many x[k] exceed `limit`. */
function countAbove(x: Float64Array, limit: number): number {
  let count = 0;
  for (let k = 0; k < x.length; k++) if (x[k]! > limit) count++;
  return count;
}

function fmt(x: number): string {
  return Number(x.toPrecision(4)).toString();
}

/** Median by quickselect (Hoare partition, middle pivot); reorders `x`. O(n) on average. */
function medianOf(x: Float64Array): number {
  const m = x.length;
  const upper = selectInPlace(x, m >> 1);
  if (m % 2) return upper;
  let lower = Number.NEGATIVE_INFINITY;
  for (let k = 0; k < m >> 1; k++) if (x[k]! > lower) lower = x[k]!;
  return (lower + upper) / 2;
}

/** Moves the k-th smallest value to x[k], smaller ones before it, larger after; returns it. */
function selectInPlace(x: Float64Array, k: number): number {
  let lo = 0;
  let hi = x.length - 1;
  while (hi > lo) {
    const pivot = x[(lo + hi) >> 1]!;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (x[i]! < pivot) i++;
      while (x[j]! > pivot) j--;
      if (i <= j) {
        const t = x[i]!;
        x[i] = x[j]!;
        x[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else break;
  }
  return x[k]!;
}
