import { estimateKernel, useKernels } from '../estimateKernels.js';
import { addChunkSums } from '../solver/accumulateNormalEquations.js';
import { SUMS_SCRATCH, sumChunkInKernel } from '../solver/sumChunkKernel.js';
import type { SweepBuffers, SweepSpec } from './sweepLinearModel.js';

/** Samples per call of a run kernel (two rows each fit the chunk). */
export const RUN_BLOCK = 512;

/** Fewest samples of a run worth the copies into the kernel's memory. */
export const KERNEL_MIN_SAMPLES = 256;

/** Runs taken by the kernels so far (read by the tests, which check that their comparisons reach the kernels). */
export const kernelRuns = { count: 0 };

/** Largest kernel memory a run asks for (the loader keeps up to this much between calls). */
const MAX_BYTES = 64 * 2 ** 20;

/** Doubles of the parameter block (`estimateKernels.wat`, freeRunSens). */
const BLOCK_DOUBLES = 96;

/**
 * A uniform free run [k0, k1) through the WebAssembly kernels `freeRunSens` / `freeRunValues`
 * (internal; called by `sweepLinearModel` in place of its `freeRun`). The chunk buffers, the state
 * and the series are copied into the kernel's memory, the run goes in blocks of `RUN_BLOCK`
 * samples with the chunk accumulated at the same rows as `freeRun` does (the chunk sums by the
 * kernel's own sum functions on that memory, then `addChunkSums`), and the buffers, the state and
 * the written residual series are copied back, so `b`, `s.outI`/`s.outW` and `b.acc` end as the
 * JavaScript run leaves them, to the bit (the kernels do its operations in its order).
 *
 * @returns false, having changed nothing, where the kernel does not apply (effect columns, a
 *   fitted input basis, a short run) or cannot run; the caller then runs the JavaScript loops
 */
export function freeRunInKernel(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): boolean {
  if (!useKernels.on || b.effects !== null || k1 - k0 < KERNEL_MIN_SAMPLES || b.r.length !== b.st) return false;
  const sens = b.wantJ;
  // The kernels read the input as levels[cls[k]] or input[k]; a fitted sine basis stays in JavaScript.
  if (s.m > 0 && (sens || s.cls === null)) return false;
  const n = s.n, st = b.st, jac = b.jac, cls = s.cls;
  const mi = s.mi, mw = s.mw, outI = s.outI, outW = s.outW;
  if (k1 > n || (mi !== null && mi.length < n) || (mw !== null && mw.length < n) || (outI !== null && outI.length < n) || (outW !== null && outW.length < n)) return false;
  if (cls === null ? s.input.length < n : cls.length < n) return false;
  // Layout (doubles): sums scratch, parameter block, r, jac, then the series.
  const P = SUMS_SCRATCH;
  const R0 = P + BLOCK_DOUBLES;
  const J0 = R0 + st;
  let end = J0 + (sens ? jac.length : 0);
  const MI = mi === null ? 0 : end; end += mi === null ? 0 : n;
  const MW = mw === null ? 0 : end; end += mw === null ? 0 : n;
  const OI = outI === null ? 0 : end; end += outI === null ? 0 : n;
  const OW = outW === null ? 0 : end; end += outW === null ? 0 : n;
  const IN = cls === null ? end : 0; end += cls === null ? n : 0;
  const LV = cls === null ? 0 : end; end += cls === null ? 0 : s.levels.length;
  const CL = cls === null ? 0 : end; end += cls === null ? 0 : (n + 1) >> 1;
  if (8 * end > MAX_BYTES) return false;
  const room = estimateKernel.room(8 * end);
  if (room === null) return false;
  const ex = room.exports, mem = room.f64;
  mem.set(b.slot.subarray(0, 56), P);
  mem.set(b.x.subarray(0, 16), P + 56);
  mem[P + 72] = s.sI; mem[P + 73] = s.sW; mem[P + 74] = s.off; mem[P + 75] = s.tau;
  mem[P + 76] = s.tcW; mem[P + 77] = s.ldW; mem[P + 78] = s.offW; mem[P + 79] = n;
  for (let j = 0; j < 9; j++) mem[P + 80 + j] = s.col[j]!;
  mem.set(b.r, R0);
  if (sens) mem.set(jac, J0);
  if (mi !== null) mem.set(mi.subarray(0, n), MI);
  if (mw !== null) mem.set(mw.subarray(0, n), MW);
  if (cls === null) mem.set(s.input.subarray(0, n), IN);
  else {
    mem.set(s.levels, LV);
    new Int32Array(mem.buffer, 8 * CL, n).set(cls.subarray(0, n));
  }
  kernelRuns.count++;
  const acc = b.acc;
  const run = sens ? ex.freeRunSens : ex.freeRunValues;
  let rows = b.rows;
  for (let k = k0; k < k1; k += RUN_BLOCK) {
    const e = k + RUN_BLOCK < k1 ? k + RUN_BLOCK : k1;
    if (rows + 2 * (e - k) > st) {
      // freeRun's flush, on the kernel's memory.
      if (acc !== null && rows > 0) {
        if (sens) sumChunkInKernel(ex, mem, acc.p, acc.chunk, 8 * R0, 8 * J0, rows, 8 * st, 0);
        else acc.chunk[acc.chunk.length - 1] = ex.sumSquares(8 * R0, rows);
        addChunkSums(acc, sens, rows);
      }
      rows = 0;
    }
    rows = run(8 * P, k, e, rows, 8 * R0, 8 * J0, 8 * MI, 8 * MW, 8 * OI, 8 * OW, 8 * IN, 8 * CL, 8 * LV);
  }
  b.rows = rows;
  b.x.set(mem.subarray(P + 56, P + 72));
  b.r.set(mem.subarray(R0, R0 + st));
  if (sens) jac.set(mem.subarray(J0, J0 + jac.length));
  if (outI !== null) outI.set(mem.subarray(OI + k0, OI + k1), k0);
  if (outW !== null) outW.set(mem.subarray(OW + k0, OW + k1), k0);
  return true;
}
