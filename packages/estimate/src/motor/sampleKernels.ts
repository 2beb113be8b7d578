import { createKernel, type KernelRoom } from '@motorprint/model/kernels';
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
  channelStats(p: number, n: number, out: number): number;
  timeStats(p: number, n: number, out: number): number;
  dot(a: number, b: number, n: number): number;
  crossSums(x: number, p: number, n: number, y: number, out: number): void;
  derivative(x: number, n: number, h: number, out: number): void;
  sameWords(a: number, b: number, n: number): number;
  squaredDistance(a: number, b: number, n: number): number;
  segmentSquares(p: number, segs: number, m: number): number;
  endSums(pi: number, pw: number, m: number, out: number): void;
  sortDoubles(p: number, n: number, tmp: number, counts: number): number;
  intervals(p: number, n: number, out: number): number;
}

/** The kernel module, compiled on first use. */
export const sampleKernels = createKernel<SampleKernels>(wasm);

/** Series shorter than this take the JavaScript loops (the package's one threshold). */
export { KERNEL_MIN_LENGTH } from '../estimateKernels.js';

/** Doubles of kernel memory that {@link sortInKernel} needs after the n it sorts: n for the passes, 1024 for the counters. */
export function sortSpare(n: number): number {
  return n + 1024;
}

/**
 * Sorts the n doubles at double index `at` of the room's memory in place, into the order the typed
 * array's own sort gives (the kernel's radix sort; a series holding NaN goes to the typed array's
 * sort). Uses {@link sortSpare}(n) doubles from index `spare`.
 */
export function sortInKernel(room: KernelRoom<SampleKernels>, at: number, n: number, spare: number): void {
  if (room.exports.sortDoubles(8 * at, n, 8 * spare, 8 * (spare + n)) !== 0) room.f64.subarray(at, at + n).sort();
}

/**
 * A channel's largest magnitude and sum (prepareRecording's one pass) through the kernel; null when
 * the kernel cannot run or a sample is not finite (the caller's loop then says which).
 */
export function channelStatsKernel(v: Float64Array): { maxAbs: number; sum: number } | null {
  const n = v.length;
  const room = sampleKernels.room(8 * (n + 2));
  if (room === null) return null;
  room.f64.set(v, 0);
  if (room.exports.channelStats(0, n, 8 * n) !== -1) return null;
  return { maxAbs: room.f64[n]!, sum: room.f64[n + 1]! };
}

/**
 * The smallest and largest sampling interval (prepareRecording's pass over the instants) through the
 * kernel; null when the kernel cannot run or an instant is not finite or not after the one before
 * (the caller's loop then says which).
 */
export function timeStatsKernel(time: Float64Array): { hmin: number; hmax: number } | null {
  const n = time.length;
  if (n < 1) return null;
  const room = sampleKernels.room(8 * (n + 2));
  if (room === null) return null;
  room.f64.set(time, 0);
  if (room.exports.timeStats(0, n, 8 * n) !== -1) return null;
  return { hmin: room.f64[n]!, hmax: room.f64[n + 1]! };
}
