import { KERNEL_MIN_ROWS, sumChunkWasm, sumSquaresWasm } from './sumChunkKernel.js';
import { sumChunkTiled } from './sumChunkTiled.js';
import { sumChunkUnrolled, UNROLLED_MAX_P } from './sumChunkUnrolled.js';
import type { NormalEquations } from './types.js';

/**
 * Adds one chunk of residuals (and optionally their Jacobian) to the normal equations.
 *
 * Within the chunk the sums are plain dot products; the chunk totals are then added to the running
 * sums with Neumaier's compensated summation (when `acc.compensated`), so the rounding error grows
 * with the chunk length and not with the record length. After the call `acc.JtJ`, `acc.Jtr` and
 * `acc.ssr` hold the current totals.
 *
 * The chunk sums take one pass over the rows for p ≤ 8 (every entry of JᵀJ, Jᵀr and rᵀr in its own
 * scalar local) and ⌈p/4⌉(⌈p/4⌉+1)/2 passes of 4×4 register tiles above that, instead of one pass
 * per entry. Each entry is still summed over the rows in order, so the results are the same bits
 * as one dot product per entry. Chunks of at least `KERNEL_MIN_ROWS` rows are summed by the
 * WebAssembly forms of those loops (solver/sumChunkKernel.ts: the same operations in the same
 * order, so the same bits, and as quick on their first call as once warm); the JavaScript loops
 * are the reference and the fallback.
 *
 * Kernel: allocates nothing, never throws; non-finite inputs propagate into the sums.
 *
 * ## Method
 * Blocked summation with Neumaier's improved Kahan–Babuška compensation of the block totals.
 *
 * ## References
 * A. Neumaier (1974), "Rundungsfehleranalyse einiger Verfahren zur Summation endlicher Summen",
 * ZAMM 54(1), 39–51, doi:10.1002/zamm.19740540106.
 *
 * @param acc - accumulator (modified in place)
 * @param residuals - residuals r[k], k < rows
 * @param jacobian - column-major sensitivities: ∂r[k]/∂θⱼ at `jacobian[j * stride + k]`; null to add rᵀr only
 * @param rows - number of rows in this chunk
 * @param stride - distance between Jacobian columns (default `rows`)
 * @returns the chunk's own sum of squared residuals
 * @example
 * const acc = createNormalEquations(1);
 * accumulateNormalEquations(acc, Float64Array.of(1, 2), Float64Array.of(3, 4), 2);
 * acc.JtJ[0]; // => 25
 * acc.Jtr[0]; // => 11
 * acc.ssr; // => 5
 */
export function accumulateNormalEquations(
  acc: NormalEquations,
  residuals: Float64Array,
  jacobian: Float64Array | null,
  rows: number,
  stride: number = rows,
): number {
  const p = acc.p;
  const chunk = acc.chunk;
  const last = (p * (p + 1)) / 2 + p;
  let chunkSsr: number;
  const kernel = rows >= KERNEL_MIN_ROWS;
  if (jacobian === null) {
    let s = kernel ? sumSquaresWasm(residuals, rows) : null;
    if (s === null) {
      s = 0;
      for (let k = 0; k < rows; k++) s += residuals[k]! * residuals[k]!;
    }
    chunkSsr = s;
    chunk[last] = s;
  } else if (kernel && sumChunkWasm(p, chunk, residuals, jacobian, rows, stride)) {
    chunkSsr = chunk[last]!;
  } else if (p <= UNROLLED_MAX_P) {
    chunkSsr = sumChunkUnrolled(p, chunk, residuals, jacobian, rows, stride);
  } else {
    chunkSsr = sumChunkTiled(p, chunk, residuals, jacobian, rows, stride);
  }
  addChunkSums(acc, jacobian !== null, rows);
  return chunkSsr;
}

/**
 * Adds the chunk sums in `acc.chunk` (the full layout with a Jacobian, else only rᵀr, its last
 * entry) to the running sums with Neumaier's compensation, and updates `acc.JtJ`, `acc.Jtr`,
 * `acc.ssr` and `acc.rows` (the second half of `accumulateNormalEquations`, for callers whose
 * chunk sums come from a kernel; internal).
 *
 * @param acc - accumulator (modified in place)
 * @param withJacobian - whether `acc.chunk` holds JᵀJ and Jᵀr too
 * @param rows - number of rows in the chunk
 */
export function addChunkSums(acc: NormalEquations, withJacobian: boolean, rows: number): void {
  const p = acc.p;
  const chunk = acc.chunk;
  const high = acc.high;
  const low = acc.low;
  const tri = (p * (p + 1)) / 2;
  const last = tri + p;
  const compensated = acc.compensated;
  // Neumaier addition of the chunk totals (only rᵀr when no Jacobian was given).
  for (let m = withJacobian ? 0 : last; m <= last; m++) {
    const x = chunk[m]!;
    const h = high[m]!;
    const sum = h + x;
    if (compensated) {
      if (Math.abs(h) >= Math.abs(x)) low[m] = low[m]! + (h - sum + x);
      else low[m] = low[m]! + (x - sum + h);
    }
    high[m] = sum;
  }
  acc.ssr = high[last]! + low[last]!;
  acc.rows += rows;
  if (withJacobian) {
    const JtJ = acc.JtJ;
    const Jtr = acc.Jtr;
    let t = 0;
    for (let i = 0; i < p; i++) {
      for (let j = i; j < p; j++) {
        const v = high[t]! + low[t]!;
        JtJ[i * p + j] = v;
        JtJ[j * p + i] = v;
        t++;
      }
    }
    for (let i = 0; i < p; i++) {
      Jtr[i] = high[t]! + low[t]!;
      t++;
    }
  }
}
