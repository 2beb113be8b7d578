import type { VoltageSegment } from './types.js';

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
  const n = voltage.length;
  const jump = threshold * Math.SQRT2 * Math.max(sigma, 1e-15);
  const starts: number[] = [0];
  // Prefix sums for the binary segmentation below, in the same pass as the jump test.
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
  // Binary segmentation inside each segment: a level change whose jump the noise hid from the
  // sample-to-sample test still shows as a large difference of the means on either side of it.
  const split: number[] = [];
  const sd = Math.max(sigma, 1e-15);
  // Explicit stack of [a, b, depth] (no recursion, no closure per call), pieces in split order.
  const stack: number[] = [];
  for (let i = starts.length - 1; i >= 0; i--) stack.push(starts[i]!, i + 1 < starts.length ? starts[i + 1]! : n, 0);
  const limit = threshold * threshold * sd * sd;
  while (stack.length > 0) {
    const depth = stack.pop()!, b = stack.pop()!, a = stack.pop()!;
    split.push(a);
    if (b - a < 4 || depth > 60) continue;
    const at = bestSplit(prefix, a, b, limit);
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
 * @param limit - threshold²·σ² [V²]
 */
function bestSplit(prefix: Float64Array, a: number, b: number, limit: number): number {
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
