import { claimKernelMemory, estimateKernel, useKernels } from '../estimateKernels.js';
import type { EstimateKernelExports } from '../estimateKernels.js';

/** Doubles of scratch the chunk-sum kernels write their sums to (≥ 45, the p = 8 layout). */
export const SUMS_SCRATCH = 64;

/** Position of JᵀJ entry (i, j), i ≤ j, in the packed upper triangle (row by row) of a p×p matrix. */
function upper(p: number, i: number, j: number): number {
  return i * p - ((i * (i - 1)) >> 1) + (j - i);
}

/**
 * One chunk's sums (upper triangle of JᵀJ, Jᵀr, rᵀr, the layout of `sumChunkUnrolled` and
 * `sumChunkTiled`) from residuals and a column-major Jacobian already in the kernel's memory:
 * the p ≤ 8 single-pass kernels, or the 4×4 tiles of `sumChunkTiled` above that, with the same
 * operations in the same order as those JavaScript loops, so `out` gets the same bits.
 *
 * @param ex - the kernel's exports
 * @param mem - the kernel's memory as doubles (current view)
 * @param p - number of parameters (≥ 1)
 * @param out - chunk sums, length ≥ p(p+1)/2 + p + 1
 * @param r - byte address of the residuals
 * @param J - byte address of column 0 of the Jacobian
 * @param rows - number of rows
 * @param st - distance between Jacobian columns in bytes
 * @param scratch - byte address of `SUMS_SCRATCH` doubles the kernels may overwrite
 * @returns the chunk's rᵀr
 */
export function sumChunkInKernel(
  ex: EstimateKernelExports, mem: Float64Array, p: number, out: Float64Array,
  r: number, J: number, rows: number, st: number, scratch: number,
): number {
  const at = scratch >> 3;
  if (p <= 8) {
    let s: number;
    switch (p) {
      case 1: s = ex.sums1(r, J, rows, st, scratch); break;
      case 2: s = ex.sums2(r, J, rows, st, scratch); break;
      case 3: s = ex.sums3(r, J, rows, st, scratch); break;
      case 4: s = ex.sums4(r, J, rows, st, scratch); break;
      case 5: s = ex.sums5(r, J, rows, st, scratch); break;
      case 6: s = ex.sums6(r, J, rows, st, scratch); break;
      case 7: s = ex.sums7(r, J, rows, st, scratch); break;
      default: s = ex.sums8(r, J, rows, st, scratch); break;
    }
    const m = (p * (p + 1)) / 2 + p + 1;
    for (let e = 0; e < m; e++) out[e] = mem[at + e]!;
    return s;
  }
  const tri = (p * (p + 1)) / 2;
  let ssr = 0;
  for (let i0 = 0; i0 < p; i0 += 4) {
    const ni = p - i0 < 4 ? p - i0 : 4;
    // Columns past the block repeat its last one, as in sumChunkTiled (their sums are dropped).
    const c0 = J + i0 * st;
    const c1 = J + (i0 + (ni > 1 ? 1 : 0)) * st;
    const c2 = J + (i0 + (ni > 2 ? 2 : ni - 1)) * st;
    const c3 = J + (i0 + (ni > 3 ? 3 : ni - 1)) * st;
    const s = ex.diagTile(r, c0, c1, c2, c3, rows, scratch);
    if (i0 === 0) ssr = s;
    // Tile order: a00 a01 a02 a03 a11 a12 a13 a22 a23 a33, then g0…g3.
    let t = 0;
    for (let a = 0; a < 4; a++) {
      for (let b = a; b < 4; b++) {
        if (b < ni) out[upper(p, i0 + a, i0 + b)] = mem[at + t]!;
        t++;
      }
    }
    for (let a = 0; a < ni; a++) out[tri + i0 + a] = mem[at + 10 + a]!;
    for (let j0 = i0 + 4; j0 < p; j0 += 4) {
      const nj = p - j0 < 4 ? p - j0 : 4;
      const d0 = J + j0 * st;
      const d1 = J + (j0 + (nj > 1 ? 1 : 0)) * st;
      const d2 = J + (j0 + (nj > 2 ? 2 : nj - 1)) * st;
      const d3 = J + (j0 + (nj > 3 ? 3 : nj - 1)) * st;
      ex.offTile(c0, c1, c2, c3, d0, d1, d2, d3, rows, scratch);
      for (let a = 0; a < ni; a++) {
        for (let b = 0; b < nj; b++) out[upper(p, i0 + a, j0 + b)] = mem[at + 4 * a + b]!;
      }
    }
  }
  out[tri + p] = ssr;
  return ssr;
}

/** Fewest rows worth copying into the kernel's memory (below, the JavaScript loops run). */
export const KERNEL_MIN_ROWS = 64;

/**
 * `sumChunkUnrolled` / `sumChunkTiled` (p ≥ 1) through the WebAssembly kernels, copying the
 * residuals and the p Jacobian columns into the kernel's memory. Returns false (and leaves `out`
 * untouched) where the kernel cannot run or the arrays are shorter than the rows asked for;
 * otherwise `out` holds the same bits as the JavaScript loops give (rᵀr last).
 */
export function sumChunkWasm(p: number, out: Float64Array, r: Float64Array, J: Float64Array, rows: number, stride: number): boolean {
  if (!useKernels.on || !(rows >= 0 && p >= 1 && r.length >= rows && J.length >= (p - 1) * stride + rows)) return false;
  const room = estimateKernel.room(8 * (SUMS_SCRATCH + rows * (p + 1)));
  if (room === null) return false;
  const mem = room.f64;
  claimKernelMemory(SUMS_SCRATCH + rows * (p + 1));
  const rAt = SUMS_SCRATCH;
  mem.set(r.subarray(0, rows), rAt);
  const jAt = rAt + rows;
  for (let j = 0; j < p; j++) mem.set(J.subarray(j * stride, j * stride + rows), jAt + j * rows);
  sumChunkInKernel(room.exports, mem, p, out, 8 * rAt, 8 * jAt, rows, 8 * rows, 0);
  return true;
}

/** Σ r[k]² for k < rows through the kernel (copying r), or null where it cannot run. */
export function sumSquaresWasm(r: Float64Array, rows: number): number | null {
  if (!useKernels.on || !(rows >= 0 && r.length >= rows)) return null;
  const room = estimateKernel.room(8 * rows);
  if (room === null) return null;
  claimKernelMemory(rows);
  room.f64.set(r.subarray(0, rows), 0);
  return room.exports.sumSquares(0, rows);
}
