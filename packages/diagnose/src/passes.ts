/**
 * One-pass loops of the detectors over the samples, each in plain JavaScript (the reference, and
 * the fallback) and through the WebAssembly kernels of scanKernels.wat (not exported from the
 * package).
 *
 * Why: a fresh process runs each of these loops once or twice per diagnosis, unoptimised
 * (≈ 4 ms per pass over 1e5 samples against ≈ 0.5 ms once optimised); a WebAssembly function is
 * compiled before its first call. The kernels do the same floating-point operations in the same
 * order (no fused multiply–add), with the same comparisons (false with NaN), so every result is
 * the same bits as the JavaScript's; the tests compare the two with Object.is.
 *
 * Series are copied into the kernel's memory (≈ 0.1 ms per 1e5 doubles) once per caller and read
 * by every kernel that caller runs; below `KERNEL_MIN` samples the JavaScript runs.
 */
import { createKernel } from '@motorprint/model/kernels';
import type { KernelRoom } from '@motorprint/model/kernels';
import { wasm } from './scanKernels.wasm.js';

interface ScanExports {
  finiteResiduals(py: number, pyh: number, pe: number, n: number, out: number): number;
  residualSums(py: number, pyh: number, pres: number, pdev: number, n: number, mean: number, ybar: number, all: number, out: number): void;
  extremes(px: number, n: number, out: number): void;
  pinnedSamples(px: number, n: number, rail: number, side: number, sigma4: number, longest: number, minSlope: number): number;
  absInto(px: number, pout: number, n: number): void;
  plateauRun(pi: number, pw: number, n: number, threshold: number, out: number): void;
  firstNotFinite(px: number, n: number): number;
  olsMeans(px: number, py: number, n: number, out: number): number;
  olsMoments(px: number, py: number, n: number, xb: number, yb: number, all: number, out: number): void;
  olsLagOne(px: number, py: number, n: number, intercept: number, slope: number, all: number, out: number): void;
  finiteRange(pt: number, pr: number, n: number, out: number): void;
  meanSquares(pv: number, n: number, out: number): void;
}

const kernel = createKernel<ScanExports>(wasm);

/** Series shorter than this run the JavaScript loops (the kernel's copies would not pay). */
export const KERNEL_MIN = 4096;

/** Whether the kernels can run here (WebAssembly present and its memory available). */
export function scanKernelRuns(): boolean {
  return kernel.room(8 * OUT) !== null;
}

/** Doubles at the start of the kernel memory kept for results. */
const OUT = 16;

/**
 * Series copied into the kernel's memory: `at[i]` is the byte address of `series[i]` (each of
 * length n), `free` the first double index after them. Valid until the next `room` call.
 */
interface Resident {
  room: KernelRoom<ScanExports>;
  at: number[];
  free: number;
}

/** Copies the series (all of length n) into the kernel's memory with `spare` more doubles after them; null where the kernel cannot run. */
function resident(series: Float64Array[], n: number, spare = 0): Resident | null {
  const room = kernel.room(8 * (OUT + series.length * n + spare));
  if (room === null) return null;
  const at: number[] = [];
  let free = OUT;
  for (const x of series) {
    room.f64.set(x.subarray(0, n), free);
    at.push(8 * free);
    free += n;
  }
  return { room, at, free };
}

/** Whether the kernels run for this n (the `useKernel` argument: true forces them where they exist, false forbids them). */
function wanted(n: number, useKernel: boolean | undefined): boolean {
  return useKernel ?? n >= KERNEL_MIN;
}

// ---------------------------------------------------------------------------------------------
// residualStats

/** What `residualPasses` returns; the sums are NaN/0 when n < 8 (the caller throws then). */
export interface ResidualPasses {
  n: number; sy: number; se: number; dev: Float64Array;
  c0: number; see: number; cee: number; syy: number; cyy: number; above: number; below: number; runs: number;
}

/**
 * e = ŷ − y over the rows where both are finite (n of them, with Σy and Σe in order of k), then
 * with mean = Σe/n and ȳ = Σy/n the deviations e − mean (dev, length n) with c0 = Σ dev², the
 * compensated (Neumaier) Σe² and Σ(y − ȳ)² (value and correction) and the runs test's counts on
 * the signs of e. When n < 8 only n, sy, se are computed.
 */
export function residualPasses(measured: Float64Array, predicted: Float64Array, useKernel?: boolean): ResidualPasses {
  const N = measured.length;
  if (wanted(N, useKernel)) {
    const r = residualPassesKernel(measured, predicted);
    if (r !== null) return r;
  }
  const e = new Float64Array(N);
  let n = 0;
  let sy = 0, se = 0;
  for (let k = 0; k < N; k++) {
    const y = measured[k]!;
    const yh = predicted[k]!;
    if (!Number.isFinite(y) || !Number.isFinite(yh)) continue;
    const r = yh - y;
    e[n++] = r;
    sy += y;
    se += r;
  }
  const dev = e.subarray(0, n);
  if (n < 8) return { n, sy, se, dev, c0: NaN, see: NaN, cee: NaN, syy: NaN, cyy: NaN, above: 0, below: 0, runs: 0 };
  return { n, sy, se, dev, ...residualSums(measured, predicted, dev, dev, se / n, sy / n, n === N) };
}

/**
 * The pass over the kept rows (all of them when `all`): the deviations from `mean` into dev (which
 * may be res itself: res[j] is read before dev[j] is written) with
 * c0 = Σ dev², the compensated Σe² and Σ(y − ȳ)², and the runs test's counts.
 */
function residualSums(measured: Float64Array, predicted: Float64Array, res: Float64Array, dev: Float64Array, mean: number, ybar: number, all: boolean):
  { c0: number; see: number; cee: number; syy: number; cyy: number; above: number; below: number; runs: number } {
  const N = measured.length;
  let c0 = 0;
  // Compensated (Neumaier) sums: the squares of 1e6 residuals lose digits in a plain sum.
  let see = 0, cee = 0, syy = 0, cyy = 0;
  // The runs test's counts on the signs of e about 0 (as runsTest counts them), in the same pass.
  let above = 0, below = 0, runs = 0, last = 0;
  let j = 0;
  for (let k = 0; k < N; k++) {
    const y = measured[k]!;
    if (!all && (!Number.isFinite(y) || !Number.isFinite(predicted[k]!))) continue;
    const r = res[j]!;
    const v = r - mean;
    dev[j++] = v;
    c0 += v * v;
    const a = r * r;
    const t1 = see + a;
    cee += Math.abs(see) >= a ? see - t1 + a : a - t1 + see;
    see = t1;
    const d = (y - ybar) * (y - ybar);
    const t2 = syy + d;
    cyy += Math.abs(syy) >= d ? syy - t2 + d : d - t2 + syy;
    syy = t2;
    if (r !== 0) {
      const sign = r > 0 ? 1 : -1;
      if (sign > 0) above++;
      else below++;
      if (sign !== last) runs++;
      last = sign;
    }
  }
  return { c0, see, cee, syy, cyy, above, below, runs };
}

function residualPassesKernel(measured: Float64Array, predicted: Float64Array): ResidualPasses | null {
  const N = measured.length;
  const r = resident([measured, predicted], N, N);
  if (r === null) return null;
  const { exports: x, f64 } = r.room;
  const eAt = r.free;
  const n = x.finiteResiduals(r.at[0]!, r.at[1]!, 8 * eAt, N, 0);
  const sy = f64[0]!, se = f64[1]!;
  if (n < 8) return { n, sy, se, dev: f64.slice(eAt, eAt + n), c0: NaN, see: NaN, cee: NaN, syy: NaN, cyy: NaN, above: 0, below: 0, runs: 0 };
  x.residualSums(r.at[0]!, r.at[1]!, 8 * eAt, 8 * eAt, N, se / n, sy / n, n === N ? 1 : 0, 0);
  return {
    n, sy, se, dev: f64.slice(eAt, eAt + n),
    c0: f64[0]!, see: f64[1]!, cee: f64[2]!, syy: f64[3]!, cyy: f64[4]!, above: f64[5]!, below: f64[6]!, runs: f64[7]!,
  };
}

// ---------------------------------------------------------------------------------------------
// detectSaturation

/** Rail parameters of `pinnedSamples` (see detectSaturation). */
export interface RailTest { sigma: number; longest: number; minSlope: number }

/**
 * One channel's scan for rails: the channel's [min, max] (read in order of k) and, through
 * `pinned`, the samples pinned at a rail value. The channel is copied into the kernel once for
 * both.
 */
export interface ChannelScan {
  min: number;
  max: number;
  pinned(rail: number, side: 1 | -1, test: RailTest): number;
}

/** The rail scan of x (see `ChannelScan`); the kernel holds x until the next kernel call. */
export function channelScan(x: Float64Array, useKernel?: boolean): ChannelScan {
  const n = x.length;
  if (wanted(n, useKernel)) {
    const r = resident([x], n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      k.extremes(r.at[0]!, n, 0);
      return {
        min: f64[0]!, max: f64[1]!,
        pinned: (rail, side, t) => k.pinnedSamples(r.at[0]!, n, rail, side, 4 * t.sigma, t.longest, t.minSlope),
      };
    }
  }
  const [min, max] = extremes(x);
  return { min, max, pinned: (rail, side, t) => pinnedSamples(x, rail, side, t.sigma, t.longest, t.minSlope) };
}

/** [smallest, largest] of x, read in order of k. */
function extremes(x: Float64Array): [number, number] {
  let max = -Infinity, min = Infinity;
  const n = x.length;
  for (let k = 0; k < n; k++) {
    const v = x[k]!;
    if (v > max) max = v;
    if (v < min) min = v;
  }
  return [min, max];
}

/**
 * Samples on runs (of at least 3) at a rail value `rail` that look railed: the signal reaches
 * the rail still moving towards it (a slope of more than 2 noise SDs per sample over the 5 samples
 * before the run, and more than two codes per sample on a quantised channel, that carried on for
 * half the run would pass the rail by more than 4 noise SDs), or the run is longer than noise
 * could hold one value (`longest`). Repeated identical values at the extremes of a quantised
 * signal (an ADC code dithered by noise, or a plateau quieter than one code) are not clipping.
 */
function pinnedSamples(x: Float64Array, rail: number, side: 1 | -1, sigma: number, longest: number, minSlope: number): number {
  const n = x.length;
  let total = 0;
  for (let k = 0; k < n; ) {
    if (x[k] !== rail) { k++; continue; }
    let e = k;
    while (e < n && x[e] === rail) e++;
    const len = e - k;
    if (len >= 3) {
      let moving = false;
      if (k >= 6) {
        // Slope over the 5 samples before the run (its noise SD is √2·σ/5 ≈ 0.28σ): more than 2σ per
        // sample is movement, not noise.
        const slope = (x[k - 1]! - x[k - 6]!) / 5;
        const carried = x[k - 1]! + slope * (len / 2);
        moving = side * (carried - rail) > 4 * sigma && side * slope > minSlope;
      }
      // A long run counts only when the signal arrives at it (not one the record starts on: a
      // rotor at rest before a step reads exactly 0 on an encoder).
      if (moving || (len >= longest && k > 0)) total += len;
    }
    k = e;
  }
  return total;
}

/** |current| as a fresh array, and the plateau scan over it (see `plateauRun`). */
export interface PlateauScan {
  magnitude: Float64Array;
  run(threshold: number): { count: number; wLo: number; wHi: number };
}

/**
 * |current[k]| for every k, and `run(threshold)`: the longest run of samples with |current| ≥
 * threshold, with the smallest and largest speed on it (the first longest run).
 */
export function plateauScan(current: Float64Array, speed: Float64Array, useKernel?: boolean): PlateauScan {
  const n = current.length;
  if (wanted(n, useKernel)) {
    const r = resident([current, speed], n, n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      k.absInto(r.at[0]!, 8 * r.free, n);
      const magnitude = f64.slice(r.free, r.free + n);
      return {
        magnitude,
        run: (threshold) => {
          k.plateauRun(r.at[0]!, r.at[1]!, n, threshold, 0);
          return { count: f64[0]!, wLo: f64[1]!, wHi: f64[2]! };
        },
      };
    }
  }
  const magnitude = new Float64Array(n);
  for (let k = 0; k < n; k++) magnitude[k] = Math.abs(current[k]!);
  return { magnitude, run: (threshold) => plateauRun(current, speed, threshold) };
}

function plateauRun(current: Float64Array, speed: Float64Array, threshold: number): { count: number; wLo: number; wHi: number } {
  const n = current.length;
  let count = 0, wLo = Infinity, wHi = -Infinity, run = 0, lo = Infinity, hi = -Infinity;
  for (let k = 0; k < n; k++) {
    if (Math.abs(current[k]!) >= threshold) {
      run++;
      if (speed[k]! < lo) lo = speed[k]!;
      if (speed[k]! > hi) hi = speed[k]!;
      if (run > count) { count = run; wLo = lo; wHi = hi; }
    } else {
      run = 0; lo = Infinity; hi = -Infinity;
    }
  }
  return { count, wLo, wHi };
}

// ---------------------------------------------------------------------------------------------
// slopeWithSerialCorrection and detectResidualTrend

/** The sums of `slopeWithSerialCorrection` (see internal.ts), and the range of x over the rows with y finite. */
export interface TrendSums {
  /** Rows with x and y finite, and their Σx, Σy. */
  m: number; sx: number; sy: number;
  /** Σ dx², Σ dx·(y − yb) about the given means (over those rows). */
  moments(xb: number, yb: number): { sxx: number; sxy: number };
  /** Σe², Σ e·e_prev of e = y − intercept − slope·x over consecutive rows. */
  lagOne(intercept: number, slope: number): { ss: number; s1: number };
  /** Smallest and largest x over the rows with y finite (in order of k). */
  range(): { x0: number; x1: number };
}

/** The passes of a serially corrected line fit of y on x (x and y copied into the kernel once for all of them). */
export function trendSums(x: Float64Array, y: Float64Array, useKernel?: boolean): TrendSums {
  const n = y.length;
  if (wanted(n, useKernel)) {
    const r = resident([x, y], n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      const [px, py] = r.at as [number, number];
      const m = k.olsMeans(px, py, n, 0);
      const sx = f64[0]!, sy = f64[1]!;
      const all = m === n ? 1 : 0;
      return {
        m, sx, sy,
        moments: (xb, yb) => { k.olsMoments(px, py, n, xb, yb, all, 0); return { sxx: f64[0]!, sxy: f64[1]! }; },
        lagOne: (intercept, slope) => { k.olsLagOne(px, py, n, intercept, slope, all, 0); return { ss: f64[0]!, s1: f64[1]! }; },
        range: () => { k.finiteRange(px, py, n, 0); return { x0: f64[0]!, x1: f64[1]! }; },
      };
    }
  }
  let m = 0, sx = 0, sy = 0;
  for (let k = 0; k < n; k++) if (Number.isFinite(y[k]!) && Number.isFinite(x[k]!)) { m++; sx += x[k]!; sy += y[k]!; }
  // Every row finite (the usual case): the same sums without the row tests.
  const all = m === n;
  return {
    m, sx, sy,
    moments: (xb, yb) => {
      let sxx = 0, sxy = 0;
      if (all) {
        for (let k = 0; k < n; k++) { const dx = x[k]! - xb; sxx += dx * dx; sxy += dx * (y[k]! - yb); }
      } else {
        for (let k = 0; k < n; k++) if (Number.isFinite(y[k]!) && Number.isFinite(x[k]!)) { const dx = x[k]! - xb; sxx += dx * dx; sxy += dx * (y[k]! - yb); }
      }
      return { sxx, sxy };
    },
    lagOne: (intercept, slope) => {
      let ss = 0, s1 = 0, prev = NaN;
      for (let k = 0; k < n; k++) {
        if (!all && (!Number.isFinite(y[k]!) || !Number.isFinite(x[k]!))) { prev = NaN; continue; }
        const e = y[k]! - intercept - slope * x[k]!;
        ss += e * e;
        if (Number.isFinite(prev)) s1 += e * prev;
        prev = e;
      }
      return { ss, s1 };
    },
    range: () => {
      let x0 = Infinity, x1 = -Infinity;
      for (let k = 0; k < n; k++) if (Number.isFinite(y[k]!)) { if (x[k]! < x0) x0 = x[k]!; if (x[k]! > x1) x1 = x[k]!; }
      return { x0, x1 };
    },
  };
}

// ---------------------------------------------------------------------------------------------
// detectWeakExcitation

/** mean = Σv/n and Σ(v − mean)² (n ≥ 1), each summed in order of k. */
export function meanSquares(v: Float64Array, useKernel?: boolean): { mean: number; ss: number } {
  const n = v.length;
  if (wanted(n, useKernel)) {
    const r = resident([v], n);
    if (r !== null) {
      r.room.exports.meanSquares(r.at[0]!, n, 0);
      return { mean: r.room.f64[0]!, ss: r.room.f64[1]! };
    }
  }
  let mean = 0;
  for (let k = 0; k < n; k++) mean += v[k]!;
  mean /= n;
  let ss = 0;
  for (let k = 0; k < n; k++) ss += (v[k]! - mean) * (v[k]! - mean);
  return { mean, ss };
}
