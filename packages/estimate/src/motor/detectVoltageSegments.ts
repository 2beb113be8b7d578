import type { VoltageSegment } from './types.js';

/**
 * Splits a voltage record into constant-level segments by change-point detection against the
 * noise level: a change point is a sample-to-sample jump larger than `threshold`·√2·σ (the SD of
 * a difference of two noisy samples is √2·σ). Jumps that follow each other within two samples are
 * merged (a level change that straddles a sample instant). Adjacent segments whose means differ by
 * less than `threshold` standard errors are merged again.
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
  let segs: VoltageSegment[] = starts.map((s, i) => ({ start: s, end: i + 1 < starts.length ? starts[i + 1]! : n, level: 0 }));
  for (const s of segs) s.level = meanOf(voltage, s.start, s.end);
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
