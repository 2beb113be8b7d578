import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import type { VoltageSegment } from './types.js';
import { onceForUnchanged } from './estimateNoiseLevel.js';

/**
 * Splits a voltage record into constant-level segments by change-point detection against the
 * noise level: a change point is a sample-to-sample jump larger than `threshold`·√2·σ (the SD of
 * a difference of two noisy samples is √2·σ). Jumps that follow each other within two samples are
 * merged (a level change that straddles a sample instant). Each segment is then split where the
 * means on either side differ by more than `threshold` standard errors (binary segmentation on
 * prefix sums, for a change the noise hid from the jump test). Adjacent segments whose means
 * differ by less than `threshold` standard errors are merged again; pieces of one or two samples
 * join the neighbour with the nearer level.
 *
 * Kernel-style helper: never throws; returns one segment for a record without jumps.
 *
 * @param voltage - measured voltage [V]
 * @param sigma - voltage noise σ [V] (from `estimateNoiseLevel`); 0 means "any change is a jump"
 * @param threshold - detection threshold in noise SDs. @default 6
 * @returns the segments, in order, covering every sample
 * @example
 * detectVoltageSegments(Float64Array.of(0, 0, 0, 5, 5, 5), 0.01).length; // => 2
 */
export function detectVoltageSegments(voltage: Float64Array, sigma: number, threshold = 6): VoltageSegment[] {
  // Classifying the recording and rebuilding its command both ask for the same voltage's segments:
  // found once while the voltage is kept unchanged (each caller gets its own copy).
  return onceForUnchanged('voltage segments', [voltage], [sigma, threshold], () => segmentsOf(voltage, sigma, threshold),
    (segs) => segs.map((s) => ({ ...s })));
}

/** {@link detectVoltageSegments}, computed. */
function segmentsOf(voltage: Float64Array, sigma: number, threshold: number): VoltageSegment[] {
  const n = voltage.length;
  const jump = threshold * Math.SQRT2 * Math.max(sigma, 1e-15);
  const sd = Math.max(sigma, 1e-15);
  const limit = threshold * threshold * sd * sd;
  // The passes over every sample through the WebAssembly kernel (the same bits) when it runs.
  const fast = n >= KERNEL_MIN_LENGTH ? jumpsKernel(voltage, jump) : null;
  const { prefix, starts } = fast ?? jumps(voltage, jump);
  const best = fast !== null ? fast.bestSplit : (a: number, b: number, lim: number): number => bestSplit(prefix, a, b, lim);
  // Binary segmentation inside each segment: a level change whose jump the noise hid from the
  // sample-to-sample test still shows as a large difference of the means on either side of it.
  const split: number[] = [];
  // Explicit stack of [a, b, depth] (no recursion), pieces in split order.
  const stack: number[] = [];
  for (let i = starts.length - 1; i >= 0; i--) stack.push(starts[i]!, i + 1 < starts.length ? starts[i + 1]! : n, 0);
  while (stack.length > 0) {
    const depth = stack.pop()!, b = stack.pop()!, a = stack.pop()!;
    split.push(a);
    if (b - a < 4 || depth > 60) continue;
    const at = best(a, b, limit);
    if (at > 0) stack.push(at, b, depth + 1, a, at, depth + 1);
  }
  split.sort((x, y) => x - y);
  let segs: VoltageSegment[] = split.map((s, i) => ({ start: s, end: i + 1 < split.length ? split[i + 1]! : n, level: 0 }));
  for (const s of segs) s.level = meanOf(prefix, s.start, s.end);
  // Pieces of one or two samples are the straddled samples of a switch: join them to the
  // neighbour with the nearer level.
  for (let i = 0; i < segs.length && segs.length > 1; i++) {
    const s = segs[i]!;
    if (s.end - s.start > 2) continue;
    const prev = segs[i - 1], next = segs[i + 1];
    const toPrev = next === undefined || (prev !== undefined && Math.abs(prev.level - s.level) <= Math.abs(next.level - s.level));
    if (toPrev) { prev!.end = s.end; prev!.level = meanOf(prefix, prev!.start, prev!.end); }
    else { next!.start = s.start; next!.level = meanOf(prefix, next!.start, next!.end); }
    segs.splice(i, 1);
    i--;
  }
  const merged: VoltageSegment[] = [];
  for (const s of segs) {
    const prev = merged[merged.length - 1];
    if (prev !== undefined) {
      const se = Math.max(sigma, 1e-15) * Math.sqrt(1 / (prev.end - prev.start) + 1 / (s.end - s.start));
      if (Math.abs(prev.level - s.level) < threshold * se) {
        prev.end = s.end;
        prev.level = meanOf(prefix, prev.start, prev.end);
        continue;
      }
    }
    merged.push({ ...s });
  }
  segs = merged;
  return segs;
}

/** The prefix sums of the voltage and the starts of its jump segments (the first pass). */
interface Jumps { prefix: Float64Array; starts: number[] }

/**
 * Prefix sums for the binary segmentation, in the same pass as the jump test: k starts a segment
 * when |v[k] − v[k−1]| > jump; jumps within two samples of the last start (other than 0) move it.
 * Plain JavaScript: the reference of {@link jumpsKernel} and its fallback (exported for the tests).
 */
export function jumps(voltage: Float64Array, jump: number): Jumps {
  const n = voltage.length;
  const starts: number[] = [0];
  const prefix = new Float64Array(n + 1);
  if (n > 0) prefix[1] = voltage[0]!;
  for (let k = 1; k < n; k++) {
    prefix[k + 1] = prefix[k]! + voltage[k]!;
    const d = Math.abs(voltage[k]! - voltage[k - 1]!);
    if (d > jump) {
      const lastStart = starts[starts.length - 1]!;
      if (k - lastStart <= 2 && lastStart !== 0) starts[starts.length - 1] = k;
      else starts.push(k);
    }
  }
  return { prefix, starts };
}

/**
 * {@link jumps} through the WebAssembly kernel (sampleKernels.wat), with a `bestSplit` that runs
 * there on the prefix sums left in its memory (valid until the next kernel call elsewhere); null
 * where the kernel cannot run.
 */
export function jumpsKernel(voltage: Float64Array, jump: number): (Jumps & { bestSplit(a: number, b: number, limit: number): number }) | null {
  const n = voltage.length;
  const prefixAt = n;
  const startsByte = 8 * (2 * n + 1);
  const room = sampleKernels.room(startsByte + 4 * n + 4);
  if (room === null) return null;
  const { f64, u8, exports: k } = room;
  f64.set(voltage, 0);
  const count = k.jumps(0, n, jump, 8 * prefixAt, startsByte);
  const starts = Array.from(new Int32Array(u8.buffer, startsByte, count));
  return {
    prefix: f64.slice(prefixAt, prefixAt + n + 1),
    starts,
    bestSplit: (a, b, limit) => k.bestSplit(8 * prefixAt, a, b, limit),
  };
}

/** Mean of v[a..b) from the prefix sums of v (one subtraction instead of a pass over the samples). */
function meanOf(prefix: Float64Array, a: number, b: number): number {
  return (prefix[b]! - prefix[a]!) / (b - a);
}

/**
 * Best split of [a, b) for the binary segmentation: the k in [a + 2, b − 2] maximising the
 * two-sample statistic t² = (mean_l − mean_r)²/(σ²·(1/n_l + 1/n_r)), or −1 when its t² is not
 * above threshold². With N = n_l + n_r, S_l the left sum and S the total,
 * mean_l − mean_r = (S_l·N − S·n_l)/(n_l·n_r) and 1/n_l + 1/n_r = N/(n_l·n_r), so
 * t² = (S_l·N − S·n_l)²/(n_l·n_r·N·σ²): one division per k, no square root.
 *
 * (Plain JavaScript: the reference of the kernel's `bestSplit`; exported for the tests.)
 *
 * @param limit - threshold²·σ² [V²]
 */
export function bestSplit(prefix: Float64Array, a: number, b: number, limit: number): number {
  const N = b - a;
  const pa = prefix[a]!;
  const total = prefix[b]! - pa;
  let best = 0, at = -1;
  for (let k = a + 2; k <= b - 2; k++) {
    const nl = k - a;
    const d = (prefix[k]! - pa) * N - total * nl;
    const t2 = (d * d) / (nl * (N - nl));
    if (t2 > best) { best = t2; at = k; }
  }
  return best > limit * N && at > 0 ? at : -1;
}
