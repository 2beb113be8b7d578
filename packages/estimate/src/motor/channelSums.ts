import { claimKernelMemory, estimateKernel, KERNEL_MIN_LENGTH, useKernels } from '../estimateKernels.js';

/** Sums of one channel's fit summary (internal; see `channelSums`). */
export interface ChannelSums {
  /** Samples from `from` on. */
  count: number;
  /** Σ (x[k] − mean)² of the measurements, mean = Σ x[k] / max(count, 1). */
  spread: number;
  /** Σ r[k]² of the residuals (0 without residuals). */
  squares: number;
}

/**
 * The sums of a channel's fit summary in `fitMotor`: the measurements' spread about their mean
 * and the residuals' sum of squares, over k ≥ `from`, each summed in order of k. Long channels go
 * through the package's WebAssembly kernel (the same operations in the same order, so the same
 * bits, and as quick on the first call as on later ones); the loops here are the reference and
 * the fallback.
 *
 * @param meas - measurements
 * @param res - residuals (read from `from` to their own end), or null
 * @param from - first sample
 * @returns the sums
 */
export function channelSums(meas: Float64Array, res: Float64Array | null, from: number): ChannelSums {
  const count = meas.length > from ? meas.length - from : 0;
  const nr = res === null || res.length <= from ? 0 : res.length - from;
  if (useKernels.on && count >= KERNEL_MIN_LENGTH && from >= 0) {
    const room = estimateKernel.room(8 * (count + nr));
    if (room !== null) {
      const mem = room.f64, ex = room.exports;
      claimKernelMemory(count + nr);
      mem.set(meas.subarray(from), 0);
      if (nr > 0) mem.set(res!.subarray(from), count);
      const mean = ex.sum(0, count) / Math.max(count, 1);
      return { count, spread: ex.spread(0, count, mean), squares: nr > 0 ? ex.sumSquares(8 * count, nr) : 0 };
    }
  }
  return channelSumsScalar(meas, res, from);
}

/** `channelSums` in plain JavaScript (the reference). */
export function channelSumsScalar(meas: Float64Array, res: Float64Array | null, from: number): ChannelSums {
  let s = 0, m = 0, cnt = 0;
  for (let k = from; k < meas.length; k++) { m += meas[k]!; cnt++; }
  m /= Math.max(cnt, 1);
  let v = 0;
  for (let k = from; k < meas.length; k++) v += (meas[k]! - m) * (meas[k]! - m);
  if (res !== null) for (let k = from; k < res.length; k++) s += res[k]! * res[k]!;
  return { count: cnt, spread: v, squares: s };
}
