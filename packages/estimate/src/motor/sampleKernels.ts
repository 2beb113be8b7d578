import { createKernel } from '@motorprint/model/kernels';
import { wasm } from './sampleKernels.wasm.js';

/**
 * The preparation's passes over a whole series (order statistics, the noise level's differences)
 * as WebAssembly (sampleKernels.wat), for their first call in a fresh process: the same operations
 * in the same order as the JavaScript in selectKth.ts and estimateNoiseLevel.ts, so the same bits
 * (the tests compare the two). Internal to the package.
 */
export interface SampleKernels {
  select(p: number, n: number, k: number): number;
  steps(p: number, n: number, out: number): number;
  secondDifferences(p: number, n: number, stride: number, out: number): number;
  absoluteDeviations(p: number, m: number, centre: number): void;
  largestOf(p: number, n: number): number;
  pickFinite(p: number, n: number, stride: number, out: number): number;
  distinctInPlace(p: number, m: number): number;
  singleGaps(p: number, u: number, quantum: number, out: number): number;
  offGrid(p: number, u: number, q: number, allowed: number): number;
  timeLine(p: number, n: number, out: number): void;
  strideDifferences(p: number, start: number, end: number, c: number, stride: number, out: number, q: number, cap: number): number;
  jumps(p: number, n: number, jump: number, prefix: number, starts: number): number;
  bestSplit(prefix: number, a: number, b: number, limit: number): number;
  countSteps(w: number, t: number, n: number, d: number, out: number): number;
  largestMagnitude(p: number, n: number): number;
  section(p: number, n: number, c: number, backward: number): void;
  lowPass(x: number, n: number, pad: number, c: number, sections: number): void;
}

/** The kernel module, compiled on first use. */
export const sampleKernels = createKernel<SampleKernels>(wasm);

/**
 * Series shorter than this take the JavaScript loops: their cold cost is small and copying into the
 * kernel's memory would cost as much (common practice, no source: a few hundred elements).
 */
export const KERNEL_MIN_LENGTH = 256;
