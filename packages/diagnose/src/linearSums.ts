import { createKernel } from '@motorprint/model/kernels';
import { wasm } from './linearSums.wasm.js';

/**
 * `fitLinearModel`'s sums of products over many rows through the WebAssembly kernels of
 * linearSums.wat (not exported from the package): the same products and sums in the same order
 * of k as its JavaScript loops (`sumsOfTwo`, `sumsOfThree`, `sumOfSquaredResiduals`), so the same
 * bits, on the first call as quickly as later ones. Two and three columns only; a memory of its
 * own, so that the detectors' series stay in scanKernels' memory while they fit.
 */
interface LinearExports {
  sumsOfTwo(pa: number, pb: number, py: number, n: number, out: number): void;
  sumsOfThree(pa: number, pb: number, pc: number, py: number, n: number, out: number): void;
  ssrTwo(pa: number, pb: number, py: number, n: number, b0: number, b1: number): number;
  ssrThree(pa: number, pb: number, pc: number, py: number, n: number, b0: number, b1: number, b2: number): number;
}

const kernel = createKernel<LinearExports>(wasm);

/** Doubles at the start of the memory kept for results. */
const OUT = 16;

/** The columns and y in the kernel's memory, with the two passes of the fit over them. */
export interface LinearRows {
  /** Fills sq, xy and cross as `sumsOfTwo`/`sumsOfThree` do; returns their check (Σ y·0). */
  sums(sq: Float64Array, xy: Float64Array, cross: Float64Array): number;
  /** Σ (y − Σ_j beta_j·c_j)², as `sumOfSquaredResiduals`. */
  ssr(beta: Float64Array): number;
}

/**
 * The columns (2 or 3, each of y's length) and y copied into the kernel's memory; null for other
 * column counts or where the kernel cannot run. Valid until the next call.
 */
export function linearRows(columns: readonly Float64Array[], y: Float64Array): LinearRows | null {
  const p = columns.length;
  const n = y.length;
  if (p !== 2 && p !== 3) return null;
  const room = kernel.room(8 * (OUT + (p + 1) * n));
  if (room === null) return null;
  const { exports: k, f64 } = room;
  const at: number[] = [];
  [...columns, y].forEach((c, i) => {
    f64.set(c.subarray(0, n), OUT + i * n);
    at.push(8 * (OUT + i * n));
  });
  if (p === 2) {
    const [pa, pb, py] = at as [number, number, number];
    return {
      sums(sq, xy, cross) {
        k.sumsOfTwo(pa, pb, py, n, 0);
        sq[0] = f64[1]!; sq[1] = f64[2]!; xy[0] = f64[3]!; xy[1] = f64[4]!; cross[1] = f64[5]!;
        return f64[0]!;
      },
      ssr: (beta) => k.ssrTwo(pa, pb, py, n, beta[0]!, beta[1]!),
    };
  }
  const [pa, pb, pc, py] = at as [number, number, number, number];
  return {
    sums(sq, xy, cross) {
      k.sumsOfThree(pa, pb, pc, py, n, 0);
      sq[0] = f64[1]!; sq[1] = f64[2]!; sq[2] = f64[3]!; xy[0] = f64[4]!; xy[1] = f64[5]!; xy[2] = f64[6]!;
      cross[1] = f64[7]!; cross[2] = f64[8]!; cross[5] = f64[9]!;
      return f64[0]!;
    },
    ssr: (beta) => k.ssrThree(pa, pb, pc, py, n, beta[0]!, beta[1]!, beta[2]!),
  };
}
