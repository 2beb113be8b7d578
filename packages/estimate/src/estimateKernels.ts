import { createKernel } from '@motorprint/model/kernels';
import { wasm } from './estimateKernels.wasm.js';

/**
 * The estimate package's WebAssembly kernels (estimateKernels.wat; internal). One module, so that
 * the sweep's row buffers and the chunk sums work on the same memory. Addresses are in bytes.
 */
export interface EstimateKernelExports {
  /** Σ x[k] over `rows` doubles at `x`, in order. */
  sum(x: number, rows: number): number;
  /** Σ (x[k] − m)² over `rows` doubles at `x`, in order. */
  spread(x: number, rows: number, m: number): number;
  /** Σ r[k]² over `rows` doubles at `r`, in order. */
  sumSquares(r: number, rows: number): number;
  /** `sumChunkUnrolled` for p = 1…8: columns of J `st` bytes apart, sums stored at `out`; returns rᵀr. */
  sums1(r: number, J: number, rows: number, st: number, out: number): number;
  sums2(r: number, J: number, rows: number, st: number, out: number): number;
  sums3(r: number, J: number, rows: number, st: number, out: number): number;
  sums4(r: number, J: number, rows: number, st: number, out: number): number;
  sums5(r: number, J: number, rows: number, st: number, out: number): number;
  sums6(r: number, J: number, rows: number, st: number, out: number): number;
  sums7(r: number, J: number, rows: number, st: number, out: number): number;
  sums8(r: number, J: number, rows: number, st: number, out: number): number;
  /** Diagonal tile of `sumChunkTiled`: 15 sums at `out` (see the .wat); returns rᵀr. */
  diagTile(r: number, c0: number, c1: number, c2: number, c3: number, rows: number, out: number): number;
  /** Off-diagonal tile of `sumChunkTiled`: 16 sums at `out`, row by row. */
  offTile(c0: number, c1: number, c2: number, c3: number, d0: number, d1: number, d2: number, d3: number, rows: number, out: number): void;
  /** sweepLinearModel's freeRunSens over samples [k0, k1) (parameter block at P, see the .wat); returns the row count. */
  freeRunSens: FreeRunKernel;
  /** sweepLinearModel's freeRunBasis with level classes (cls given; block P also holds uScale, m and the su and colU addresses). */
  freeRunBasis: FreeRunKernel;
  /** sweepLinearModel's freeRunValues over samples [k0, k1) (the same arguments; jac unused). */
  freeRunValues: FreeRunKernel;
  /** idx[k] = position of time[k+1] − time[k] in the table of distinct intervals (bitwise), k in [k0, k1); the table size or −1 past cap. */
  intervalIndex(time: number, k0: number, k1: number, idx: number, table: number, cap: number): number;
  /** The effect columns of sweepLinearModel's freeRunEffects for samples [k0, k1) (blocks P and E, see the .wat). */
  freeRunEffects(
    P: number, E: number, k0: number, k1: number, row: number, i: number, w: number,
    jac: number, input: number, cls: number, levels: number, time: number, idx: number, qs: number,
  ): void;
}

/** A free-run kernel: block P, samples [k0, k1), rows so far, buffers and series addresses (0 = absent). */
export type FreeRunKernel = (
  P: number, k0: number, k1: number, rows: number, r: number, jac: number,
  mi: number, mw: number, outI: number, outW: number, input: number, cls: number, levels: number,
) => number;

/**
 * Series shorter than this take the JavaScript loops, in every kernel of the package: their cold
 * cost is small and the copy into a kernel's memory would cost as much (common practice, no source:
 * a few hundred elements).
 */
export const KERNEL_MIN_LENGTH = 256;

/** The kernel module (compiled on first use; `room` is null where WebAssembly is missing). */
export const estimateKernel = createKernel<EstimateKernelExports>(wasm);

/**
 * Whether the package's hot loops may run in the kernels (default true). Tests set it to false to
 * run the JavaScript loops, the reference the kernels are compared with; nothing else changes it.
 */
export const useKernels = { on: true };

/**
 * Which part of the kernel's memory holds series kept between calls (by `freeRunInKernel`): from
 * the double index `keptFrom` up, valid while `keptBy` is the keeper's record (internal).
 */
export const kernelMemory: { keptBy: object | null; keptFrom: number } = { keptBy: null, keptFrom: Infinity };

/**
 * To be called by every writer of the kernel's memory other than the keeper, with the end (double
 * index, exclusive) of what it is about to write: kept series it would overwrite are given up.
 */
export function claimKernelMemory(end: number): void {
  if (end > kernelMemory.keptFrom) {
    kernelMemory.keptBy = null;
    kernelMemory.keptFrom = Infinity;
  }
}
