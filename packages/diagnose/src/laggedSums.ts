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
 * Long series go through a small WebAssembly kernel that keeps sixteen lags in eight f64x2
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

/**
 * The kernel, assembled from this text (WebAssembly text format; wabt's wat2wasm with SIMD):
 *
 * ```wat
 * ;; Lagged sums of products, sixteen lags per sweep (two per f64x2 lane pair).
 * ;; sums16(pa, pb, pe, out): with x = f64 at pa, pa += 8 … while pa < pe, and pb moving with it,
 * ;; s[j] += x * (f64 at pb + 8j) for j = 0…15, each lane summed in order; s[0…15] stored at out.
 * ;; Addresses in bytes. f64x2.mul and f64x2.add round each lane as the scalar * and + do.
 * (module
 *   (import "env" "memory" (memory 1))
 *   (func (export "sums16") (param $pa i32) (param $pb i32) (param $pe i32) (param $out i32)
 *     (local $x v128)
 *     (local $s0 v128)
 *     (local $s1 v128)
 *     (local $s2 v128)
 *     (local $s3 v128)
 *     (local $s4 v128)
 *     (local $s5 v128)
 *     (local $s6 v128)
 *     (local $s7 v128)
 *     (block $done
 *       (br_if $done (i32.ge_u (local.get $pa) (local.get $pe)))
 *       (loop $next
 *         (local.set $x (v128.load64_splat align=8 (local.get $pa)))
 *         (local.set $s0 (f64x2.add (local.get $s0) (f64x2.mul (local.get $x) (v128.load offset=0 align=8 (local.get $pb)))))
 *         (local.set $s1 (f64x2.add (local.get $s1) (f64x2.mul (local.get $x) (v128.load offset=16 align=8 (local.get $pb)))))
 *         (local.set $s2 (f64x2.add (local.get $s2) (f64x2.mul (local.get $x) (v128.load offset=32 align=8 (local.get $pb)))))
 *         (local.set $s3 (f64x2.add (local.get $s3) (f64x2.mul (local.get $x) (v128.load offset=48 align=8 (local.get $pb)))))
 *         (local.set $s4 (f64x2.add (local.get $s4) (f64x2.mul (local.get $x) (v128.load offset=64 align=8 (local.get $pb)))))
 *         (local.set $s5 (f64x2.add (local.get $s5) (f64x2.mul (local.get $x) (v128.load offset=80 align=8 (local.get $pb)))))
 *         (local.set $s6 (f64x2.add (local.get $s6) (f64x2.mul (local.get $x) (v128.load offset=96 align=8 (local.get $pb)))))
 *         (local.set $s7 (f64x2.add (local.get $s7) (f64x2.mul (local.get $x) (v128.load offset=112 align=8 (local.get $pb)))))
 *         (local.set $pa (i32.add (local.get $pa) (i32.const 8)))
 *         (local.set $pb (i32.add (local.get $pb) (i32.const 8)))
 *         (br_if $next (i32.lt_u (local.get $pa) (local.get $pe)))))
 *     (v128.store offset=0 align=8 (local.get $out) (local.get $s0))
 *     (v128.store offset=16 align=8 (local.get $out) (local.get $s1))
 *     (v128.store offset=32 align=8 (local.get $out) (local.get $s2))
 *     (v128.store offset=48 align=8 (local.get $out) (local.get $s3))
 *     (v128.store offset=64 align=8 (local.get $out) (local.get $s4))
 *     (v128.store offset=80 align=8 (local.get $out) (local.get $s5))
 *     (v128.store offset=96 align=8 (local.get $out) (local.get $s6))
 *     (v128.store offset=112 align=8 (local.get $out) (local.get $s7))
 *   )
 * )
 * ```
 */
const KERNEL = new Uint8Array([
  0, 97, 115, 109, 1, 0, 0, 0, 1, 8, 1, 96, 4, 127, 127, 127, 127, 0, 2, 15, 1, 3, 101, 110,
  118, 6, 109, 101, 109, 111, 114, 121, 2, 0, 1, 3, 2, 1, 0, 7, 10, 1, 6, 115, 117, 109, 115, 49,
  54, 0, 0, 10, 129, 2, 1, 254, 1, 1, 9, 123, 2, 64, 32, 0, 32, 2, 79, 13, 0, 3, 64, 32,
  0, 253, 10, 3, 0, 33, 4, 32, 5, 32, 4, 32, 1, 253, 0, 3, 0, 253, 242, 1, 253, 240, 1, 33,
  5, 32, 6, 32, 4, 32, 1, 253, 0, 3, 16, 253, 242, 1, 253, 240, 1, 33, 6, 32, 7, 32, 4, 32,
  1, 253, 0, 3, 32, 253, 242, 1, 253, 240, 1, 33, 7, 32, 8, 32, 4, 32, 1, 253, 0, 3, 48, 253,
  242, 1, 253, 240, 1, 33, 8, 32, 9, 32, 4, 32, 1, 253, 0, 3, 64, 253, 242, 1, 253, 240, 1, 33,
  9, 32, 10, 32, 4, 32, 1, 253, 0, 3, 80, 253, 242, 1, 253, 240, 1, 33, 10, 32, 11, 32, 4, 32,
  1, 253, 0, 3, 96, 253, 242, 1, 253, 240, 1, 33, 11, 32, 12, 32, 4, 32, 1, 253, 0, 3, 112, 253,
  242, 1, 253, 240, 1, 33, 12, 32, 0, 65, 8, 106, 33, 0, 32, 1, 65, 8, 106, 33, 1, 32, 0, 32,
  2, 73, 13, 0, 11, 11, 32, 3, 32, 5, 253, 11, 3, 0, 32, 3, 32, 6, 253, 11, 3, 16, 32, 3,
  32, 7, 253, 11, 3, 32, 32, 3, 32, 8, 253, 11, 3, 48, 32, 3, 32, 9, 253, 11, 3, 64, 32, 3,
  32, 10, 253, 11, 3, 80, 32, 3, 32, 11, 253, 11, 3, 96, 32, 3, 32, 12, 253, 11, 3, 112, 11
]);

/** The part of the WebAssembly API used here (the project's TypeScript libraries do not declare it). */
interface Wasm {
  validate(bytes: Uint8Array): boolean;
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number }) => { buffer: ArrayBuffer };
}

/** The compiled kernel (null where WebAssembly or its SIMD is missing); compiled on first use. */
let kernel: { wasm: Wasm; module: object } | null | undefined;

function simdKernel(): { wasm: Wasm; module: object } | null {
  if (kernel === undefined) {
    kernel = null;
    try {
      const wasm = (globalThis as { WebAssembly?: Wasm }).WebAssembly;
      if (wasm !== undefined && wasm.validate(KERNEL)) kernel = { wasm, module: new wasm.Module(KERNEL) };
    } catch {
      kernel = null;
    }
  }
  return kernel;
}

/** Scratch memories up to this size are kept for the next call (a fresh one costs its page faults again). */
const KEEP_BYTES = 64 * 2 ** 20;

/** The kernel's last memory when it was small enough to keep (no state that changes a result: it is overwritten before use). */
let kept: { sums16: (pa: number, pb: number, pe: number, out: number) => void; mem: Float64Array } | null = null;

/** An instance of the kernel with at least `bytes` of memory: the kept one when it is big enough, else a new one. */
function scratch(k: { wasm: Wasm; module: object }, bytes: number): { sums16: (pa: number, pb: number, pe: number, out: number) => void; mem: Float64Array } | null {
  if (kept !== null && kept.mem.byteLength >= bytes) return kept;
  try {
    const memory = new k.wasm.Memory({ initial: Math.ceil(bytes / 65536) });
    const instance = new k.wasm.Instance(k.module, { env: { memory } });
    const room = { sums16: instance.exports.sums16 as (pa: number, pb: number, pe: number, out: number) => void, mem: new Float64Array(memory.buffer) };
    if (bytes <= KEEP_BYTES) kept = room;
    return room;
  } catch {
    return null;
  }
}

/**
 * `laggedSumsInto` through the SIMD kernel: both series copied into the kernel's memory, sixteen lags per sweep over their common range, then each lag's remaining
 * terms added in order of t in JavaScript. Returns false (and writes nothing) where the kernel
 * cannot run.
 */
export function laggedSumsSimdInto(out: Float64Array, a: Float64Array, b: Float64Array, from: number, to: number, first: number, last: number): boolean {
  const k = simdKernel();
  if (k === null || !(to <= a.length && to <= b.length)) return false;
  const same = a === b;
  // a at 0, b after it (unless it is a), then the 16 sums.
  const bAt = same ? 0 : to;
  const outAt = bAt + to;
  const bytes = 8 * (outAt + 16);
  if (bytes >= 2 ** 31) return false;
  const room = scratch(k, bytes);
  if (room === null) return false;
  const { sums16, mem } = room;
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
