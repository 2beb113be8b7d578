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
  for (let k = 1; k < n; k++) {
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
  const prefix = new Float64Array(n + 1);
  for (let k = 0; k < n; k++) prefix[k + 1] = prefix[k]! + voltage[k]!;
  const sd = Math.max(sigma, 1e-15);
  const splitInto = (a: number, b: number, depth: number): void => {
    split.push(a);
    if (b - a < 4 || depth > 60) return;
    let best = 0, at = -1;
    const total = prefix[b]! - prefix[a]!;
    for (let k = a + 2; k <= b - 2; k++) {
      const nl = k - a, nr = b - k;
      const left = prefix[k]! - prefix[a]!;
      const t = Math.abs(left / nl - (total - left) / nr) / (sd * Math.sqrt(1 / nl + 1 / nr));
      if (t > best) { best = t; at = k; }
    }
    if (best > threshold && at > 0) { splitInto(a, at, depth + 1); splitInto(at, b, depth + 1); }
  };
  for (let i = 0; i < starts.length; i++) splitInto(starts[i]!, i + 1 < starts.length ? starts[i + 1]! : n, 0);
  split.sort((x, y) => x - y);
  let segs: VoltageSegment[] = split.map((s, i) => ({ start: s, end: i + 1 < split.length ? split[i + 1]! : n, level: 0 }));
  for (const s of segs) s.level = meanOf(voltage, s.start, s.end);
  // Pieces of one or two samples are the straddled samples of a switch: join them to the
  // neighbour with the nearer level.
  for (let i = 0; i < segs.length && segs.length > 1; i++) {
    const s = segs[i]!;
    if (s.end - s.start > 2) continue;
    const prev = segs[i - 1], next = segs[i + 1];
    const toPrev = next === undefined || (prev !== undefined && Math.abs(prev.level - s.level) <= Math.abs(next.level - s.level));
    if (toPrev) { prev!.end = s.end; prev!.level = meanOf(voltage, prev!.start, prev!.end); }
    else { next!.start = s.start; next!.level = meanOf(voltage, next!.start, next!.end); }
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
        prev.level = meanOf(voltage, prev.start, prev.end);
        continue;
      }
    }
    merged.push({ ...s });
  }
  segs = merged;
  return segs;
}

function meanOf(v: Float64Array, a: number, b: number): number {
  let s = 0;
  for (let k = a; k < b; k++) s += v[k]!;
  return s / (b - a);
}
