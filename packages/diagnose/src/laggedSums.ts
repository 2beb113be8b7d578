import { createKernel } from '@motorprint/model/kernels';
import { wasm } from './laggedSums.wasm.js';

/**
 * Lagged sums of products for many lags in one sweep (kernel of the autocorrelation and the
 * input–residual cross-correlations; not exported from the package).
 *
 * ## Method
 * out[ℓ − first] = Σ_{t=from}^{to−1−ℓ} a[t]·b[t + ℓ] for ℓ = first…last. Each sum is accumulated
 * term by term in increasing t, exactly as the one-lag loop `for (t = from; t + ℓ < to; t++)
 * s += a[t]·b[t + ℓ]` does, so every result is bit-identical to that loop; eight lags share one
 * sweep over the arrays (eight independent accumulators instead of eight passes), and the few
 * terms a shorter lag has beyond the common range are added after it, still in order of t.
 * Long series go through a small WebAssembly kernel (laggedSums.wat) that keeps sixteen lags in eight f64x2
 * accumulators (two lags per vector; each lane's multiply and add round exactly as the scalar
 * ones, and there is no fused multiply-add), so the numbers are the same there too; where
 * WebAssembly SIMD is missing the plain loop runs.
 *
 * @param out - output, length ≥ last − first + 1
 * @param a - leading series
 * @param b - lagged series (may be `a`)
 * @param from - first index of `a` summed
 * @param to - end (exclusive) of the range both series are read in
 * @param first - smallest lag (≥ 0)
 * @param last - largest lag (≥ first)
 * @returns `out`
 */
export function laggedSumsInto(out: Float64Array, a: Float64Array, b: Float64Array, from: number, to: number, first: number, last: number): Float64Array {
  if ((to - from) * (last - first + 1) >= SIMD_MIN_TERMS && laggedSumsSimdInto(out, a, b, from, to, first, last)) return out;
  return laggedSumsScalarInto(out, a, b, from, to, first, last);
}

/** `laggedSumsInto` in plain JavaScript, eight lags per sweep (any input; the reference of the SIMD path). */
export function laggedSumsScalarInto(out: Float64Array, a: Float64Array, b: Float64Array, from: number, to: number, first: number, last: number): Float64Array {
  let lag = first;
  for (; lag + 7 <= last; lag += 8) {
    let s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, s5 = 0, s6 = 0, s7 = 0;
    // Every one of the eight lags has the terms t < to − (lag + 7).
    const end = to - lag - 7;
    let t = from;
    for (; t < end; t++) {
      const x = a[t]!;
      const o = t + lag;
      s0 += x * b[o]!; s1 += x * b[o + 1]!; s2 += x * b[o + 2]!; s3 += x * b[o + 3]!;
      s4 += x * b[o + 4]!; s5 += x * b[o + 5]!; s6 += x * b[o + 6]!; s7 += x * b[o + 7]!;
    }
    const start = t;
    const o = lag - first;
    out[o] = tail(s0, a, b, start, to, lag);
    out[o + 1] = tail(s1, a, b, start, to, lag + 1);
    out[o + 2] = tail(s2, a, b, start, to, lag + 2);
    out[o + 3] = tail(s3, a, b, start, to, lag + 3);
    out[o + 4] = tail(s4, a, b, start, to, lag + 4);
    out[o + 5] = tail(s5, a, b, start, to, lag + 5);
    out[o + 6] = tail(s6, a, b, start, to, lag + 6);
    out[o + 7] = s7;
  }
  for (; lag <= last; lag++) out[lag - first] = tail(0, a, b, from, to, lag);
  return out;
}

/** s plus the terms a[t]·b[t + lag] for t = start, start + 1, … while t + lag < to. */
function tail(s: number, a: Float64Array, b: Float64Array, start: number, to: number, lag: number): number {
  for (let t = start; t + lag < to; t++) s += a[t]! * b[t + lag]!;
  return s;
}

/** Below this many multiply-adds the plain loop is as quick as copying the series into the kernel's memory. */
const SIMD_MIN_TERMS = 1 << 17;

/** The SIMD kernel (laggedSums.wat); null rooms where WebAssembly or its SIMD is missing. */
const kernel = createKernel<{ sums16: (pa: number, pb: number, pe: number, out: number) => void }>(wasm);

/**
 * `laggedSumsInto` through the SIMD kernel: both series copied into the kernel's memory, sixteen lags per sweep over their common range, then each lag's remaining
 * terms added in order of t in JavaScript. Returns false (and writes nothing) where the kernel
 * cannot run.
 */
export function laggedSumsSimdInto(out: Float64Array, a: Float64Array, b: Float64Array, from: number, to: number, first: number, last: number): boolean {
  if (!(to <= a.length && to <= b.length)) return false;
  const same = a === b;
  // a at 0, b after it (unless it is a), then the 16 sums.
  const bAt = same ? 0 : to;
  const outAt = bAt + to;
  const bytes = 8 * (outAt + 16);
  const room = kernel.room(bytes);
  if (room === null) return false;
  const { sums16 } = room.exports;
  const mem = room.f64;
  mem.set(a.subarray(0, to), 0);
  if (!same) mem.set(b.subarray(0, to), bAt);
  for (let lag = first; lag <= last; lag += 16) {
    // Every one of the sixteen lags has the terms t < to − (lag + 15) (lags past `last` are computed and dropped).
    const end = to - lag - 15;
    let t = from;
    if (end > from) {
      sums16(8 * from, 8 * (bAt + from + lag), 8 * end, 8 * outAt);
      t = end;
    } else {
      mem.fill(0, outAt, outAt + 16);
    }
    for (let j = 0; j < 16 && lag + j <= last; j++) out[lag + j - first] = tail(mem[outAt + j]!, a, b, t, to, lag + j);
  }
  return true;
}
