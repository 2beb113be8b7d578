/**
 * `@motorprint/model/kernels` — runs the project's small WebAssembly kernels (hot numeric loops
 * written in the WebAssembly text format beside the TypeScript that calls them).
 *
 * Why: a fresh process runs every JavaScript loop unoptimised at first, boxing each intermediate
 * double, and a one-shot pass over 1e5 samples costs ≈ 3.5–4 ms on its first call against
 * ≈ 0.3–0.6 ms once V8 has optimised it (measured; DEVELOPERS.md, "Speed of a fresh process").
 * WebAssembly is compiled before its first call and works on unboxed doubles, so its first call
 * is about as quick as its hundredth. The kernels do exactly the floating-point operations of the
 * JavaScript they stand for, in the same order (no fused multiply–add exists in WebAssembly
 * without the relaxed-SIMD proposal, which is not used), so their results are the same bits; each
 * caller keeps its plain JavaScript loop as the reference its tests compare with, and as the
 * fallback where WebAssembly is missing.
 *
 * A kernel module imports one memory as `env.memory` and exports functions that take byte
 * addresses in it. `NAME.wat` is the source; `scripts/assemble-kernels.mjs` (run by `pnpm build`)
 * writes `NAME.wasm.ts` with its binary, and a test checks that the two agree.
 * @packageDocumentation
 */

/** The part of the WebAssembly API used here (the project's TypeScript libraries do not declare it). */
interface Wasm {
  Module: new (bytes: Uint8Array) => object;
  Instance: new (module: object, imports: object) => { exports: Record<string, unknown> };
  Memory: new (descriptor: { initial: number }) => { buffer: ArrayBuffer; grow(pages: number): number };
}

/** A kernel instance with its memory, viewed as doubles and as bytes (views of the current buffer). */
export interface KernelRoom<E> {
  /** The module's exported functions. */
  readonly exports: E;
  /** The memory as doubles (index = byte address / 8). */
  readonly f64: Float64Array;
  /** The memory as bytes. */
  readonly u8: Uint8Array;
}

/** A lazily compiled kernel module. */
export interface Kernel<E> {
  /**
   * An instance whose memory holds at least `bytes` bytes, or null where WebAssembly (or a
   * feature the module uses) is missing or the memory cannot be had; the caller then runs its
   * JavaScript loop. Memory up to `KEEP_BYTES` is kept for the next call (a fresh one costs its
   * page faults again); its contents are whatever the last call left.
   */
  room(bytes: number): KernelRoom<E> | null;
}

const PAGE = 65536;
/** Kernel memories up to this size are kept between calls. */
const KEEP_BYTES = 64 * 2 ** 20;
/** The largest memory asked for (addresses are i32 in the kernels). */
const MAX_BYTES = 2 ** 31 - PAGE;

/** How to drop each kernel's kept memory (one entry per createKernel call; see releaseKernelMemory). */
const releasers: (() => void)[] = [];

/**
 * Lets go of the memory every kernel keeps between calls (up to 64 MiB each; after a fit and
 * diagnosis of 1e6 samples, releasing them lowered the resident memory by ≈ 90 MB), for a
 * long-running lab script that is done with large recordings. The compiled modules stay; the next
 * call of a kernel gets a fresh memory, and the results are the same (a kernel keeps nothing in its
 * memory that a later call relies on without checking it is still there). Not needed in the
 * command line, whose process ends after one job.
 *
 * @example
 * for (const file of files) { report(fitMotor([{ recording: (await readRecording(file)).recording }])); releaseKernelMemory(); }
 */
export function releaseKernelMemory(): void {
  for (const release of releasers) release();
}

/**
 * A kernel from its binary, given as base64 (as `NAME.wasm.ts` holds it). Nothing is compiled until
 * the first `room` call.
 *
 * @param base64 - the module's binary, base64-encoded
 * @returns the kernel
 * @example
 * import { wasm } from './sums.wasm.js';
 * const sums = createKernel<{ sums(from: number, to: number): number }>(wasm);
 * const room = sums.room(8 * n); // null → use the JavaScript loop
 */
export function createKernel<E>(base64: string): Kernel<E> {
  let module: object | null | undefined;
  let wasm: Wasm | undefined;
  let kept: { room: KernelRoom<E>; memory: { buffer: ArrayBuffer; grow(pages: number): number } } | null = null;
  releasers.push(() => {
    kept = null;
  });

  function compiled(): object | null {
    if (module === undefined) {
      module = null;
      try {
        wasm = (globalThis as { WebAssembly?: Wasm }).WebAssembly;
        const bytes = decodeBase64(base64);
        // (The constructor validates the binary, and throws where it or a feature it uses is missing.)
        if (wasm !== undefined) module = new wasm.Module(bytes);
      } catch {
        module = null;
      }
    }
    return module;
  }

  return {
    room(bytes: number): KernelRoom<E> | null {
      const m = compiled();
      if (m === null || !(bytes >= 0 && bytes <= MAX_BYTES)) return null;
      if (kept !== null) {
        if (kept.room.u8.byteLength >= bytes) return kept.room;
        if (bytes <= KEEP_BYTES) {
          try {
            kept.memory.grow(Math.ceil((bytes - kept.memory.buffer.byteLength) / PAGE));
            const buffer = kept.memory.buffer;
            kept.room = { exports: kept.room.exports, f64: new Float64Array(buffer), u8: new Uint8Array(buffer) };
            return kept.room;
          } catch {
            return null;
          }
        }
      }
      try {
        const memory = new wasm!.Memory({ initial: Math.max(1, Math.ceil(bytes / PAGE)) });
        const instance = new wasm!.Instance(m, { env: { memory } });
        const room: KernelRoom<E> = { exports: instance.exports as E, f64: new Float64Array(memory.buffer), u8: new Uint8Array(memory.buffer) };
        if (bytes <= KEEP_BYTES) kept = { room, memory };
        return room;
      } catch {
        return null;
      }
    },
  };
}

/** Bytes from base64 (atob exists in Node ≥ 16 and in browsers). */
function decodeBase64(text: string): Uint8Array {
  const binary = atob(text);
  const out = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) out[i] = binary.charCodeAt(i);
  return out;
}
