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
 *
 * A series a caller only reads on the spot (to hand it to another kernel, e.g. `laggedSumsInto`, or
 * to `fitLinearModel`) is returned as a view of this kernel's memory, not copied out: such results
 * say "valid until the next call of a function of this file". A fresh array of 1e5 doubles costs
 * ≈ 0.5 ms in a fresh process, nearly all of it the first touch of its pages (measured:
 * DEVELOPERS.md, "Speed of a fresh process").
 */
import { createKernel } from '@motorprint/model/kernels';
import type { KernelRoom } from '@motorprint/model/kernels';
import { firstNotFinite } from './internal.js';
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
  signRows(pw: number, pr: number, n: number, dead: number, all: number, ps: number, py: number, prows: number, out: number): number;
  lagOneSums(py: number, ps: number, prows: number, m: number, c: number, g: number, out: number): void;
  restRows(pv: number, vLimit: number, po: number, oLimit: number, hasOther: number, n: number, pidx: number): number;
  delaySteps(pv: number, pr: number, n: number, finite: number, psteps: number, pkept: number, out: number): void;
  increments(pa: number, pb: number, n: number, pda: number, pdb: number, out: number): void;
  sumInto(pa: number, pb: number, pout: number, n: number): number;
  centralDifferences(pw: number, n: number, h2: number, pacc: number, out: number): void;
  signWithDeadBand(pw: number, n: number, band: number, ps: number): void;
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
// checkRecording

/** Index of the first sample of x that is not finite, or −1. */
export function firstNotFiniteOf(x: Float64Array, useKernel?: boolean): number {
  const n = x.length;
  if (wanted(n, useKernel)) {
    const r = resident([x], n);
    if (r !== null) return r.room.exports.firstNotFinite(r.at[0]!, n);
  }
  return firstNotFinite(x);
}

// ---------------------------------------------------------------------------------------------
// residualStats

/** What `residualPasses` returns; the sums are NaN/0 when n < 8 (the caller throws then); `dev` is valid until the next call of a function of this file. */
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
  if (n < 8) return { n, sy, se, dev: f64.subarray(eAt, eAt + n), c0: NaN, see: NaN, cee: NaN, syy: NaN, cyy: NaN, above: 0, below: 0, runs: 0 };
  x.residualSums(r.at[0]!, r.at[1]!, 8 * eAt, 8 * eAt, N, se / n, sy / n, n === N ? 1 : 0, 0);
  return {
    n, sy, se, dev: f64.subarray(eAt, eAt + n),
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

// ---------------------------------------------------------------------------------------------
// detectResidualCoulomb

/** The rows of `detectResidualCoulomb` (see there) and their lag-one sums. */
export interface CoulombRows {
  /** Rows with residual and speed finite, and how many of them are moving forward, backward, or still. */
  m: number; pos: number; neg: number; rest: number;
  /** s = sgn(speed) with the dead band, and the residual, on those rows (length m). */
  s: Float64Array; y: Float64Array;
  /** The rows' indices, or null when every row is kept. */
  rows: Int32Array | null;
  /** Σ e_j² and Σ e_j·e_{j−1} over consecutive rows, e_j = y_j − c − g·s_j. */
  lagOne(c: number, g: number): [number, number];
}

/** The rows and signs of `detectResidualCoulomb` (speed and residual of one length); `s` and `y` are valid until the next call of a function of this file. */
export function coulombRows(speed: Float64Array, residual: Float64Array, dead: number, useKernel?: boolean): CoulombRows {
  const n = speed.length;
  if (wanted(n, useKernel)) {
    const r = resident([speed, residual], n, 2 * n + Math.ceil(n / 2));
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      const [pw, pr] = r.at as [number, number];
      const all = k.firstNotFinite(pr, n) < 0 && k.firstNotFinite(pw, n) < 0;
      const sAt = r.free, yAt = r.free + n, rowsAt = 8 * (r.free + 2 * n);
      const m = k.signRows(pw, pr, n, dead, all ? 1 : 0, 8 * sAt, 8 * yAt, rowsAt, 0);
      const pos = f64[0]!, neg = f64[1]!, rest = f64[2]!;
      const py = all ? pr : 8 * yAt;
      return {
        m, pos, neg, rest,
        s: f64.subarray(sAt, sAt + m),
        y: all ? residual.subarray(0, m) : f64.subarray(yAt, yAt + m),
        rows: all ? null : new Int32Array(f64.buffer, rowsAt, m).slice(),
        lagOne: (c, g) => { k.lagOneSums(py, 8 * sAt, all ? -1 : rowsAt, m, c, g, 0); return [f64[0]!, f64[1]!]; },
      };
    }
  }
  // (Every row finite, the usual case: the rows are 0…n − 1 and y is the residual itself.)
  const all = firstNotFinite(residual) < 0 && firstNotFinite(speed) < 0;
  const rows = all ? null : new Int32Array(n);
  const sAll = new Float64Array(n);
  const yAll = all ? residual : new Float64Array(n);
  let m = 0, pos = 0, neg = 0, rest = 0;
  for (let k = 0; k < n; k++) {
    const r = residual[k]!, w = speed[k]!;
    if (!all) {
      if (!Number.isFinite(r) || !Number.isFinite(w)) continue;
      rows![m] = k;
      yAll[m] = r;
    }
    if (w > dead) { pos++; sAll[m] = 1; } else if (w < -dead) { neg++; sAll[m] = -1; } else rest++;
    m++;
  }
  const s = sAll.subarray(0, m);
  const y = yAll.subarray(0, m);
  return { m, pos, neg, rest, s, y, rows: rows === null ? null : rows.subarray(0, m), lagOne: (c, g) => lagOneSums(y, s, rows, c, g) };
}

/**
 * Σ e_j² and Σ e_j·e_{j−1} over consecutive rows (rows null: all are), e_j = y_j − c − g·s_j (each residual formed once
 * and reused as the previous one: the same number the formula gives again).
 */
function lagOneSums(y: Float64Array, s: Float64Array, rows: Int32Array | null, c: number, g: number): [number, number] {
  const m = y.length;
  let ss = 0, s1 = 0, prev = 0;
  for (let j = 0; j < m; j++) {
    const e = y[j]! - c - g * s[j]!;
    ss += e * e;
    if (j > 0 && (rows === null || rows[j]! === rows[j - 1]! + 1)) s1 += e * prev;
    prev = e;
  }
  return [ss, s1];
}

// ---------------------------------------------------------------------------------------------
// detectSensorOffset

/** The samples k < n with |voltage| and |other| (when given) not at or above their limits, in order. */
export function restRows(voltage: Float64Array, vLimit: number, other: Float64Array | undefined, oLimit: number, n: number, useKernel?: boolean): Int32Array {
  if (wanted(n, useKernel) && n <= voltage.length && (other === undefined || n <= other.length)) {
    const r = resident(other ? [voltage, other] : [voltage], n, Math.ceil(n / 2));
    if (r !== null) {
      const idxAt = 8 * r.free;
      const m = r.room.exports.restRows(r.at[0]!, vLimit, other ? r.at[1]! : 0, oLimit, other ? 1 : 0, n, idxAt);
      return new Int32Array(r.room.f64.buffer, idxAt, m).slice();
    }
  }
  const idx = new Int32Array(n);
  let m = 0;
  if (other) {
    for (let k = 0; k < n; k++) if (!(Math.abs(voltage[k]!) >= vLimit) && !(Math.abs(other[k]!) >= oLimit)) idx[m++] = k;
  } else {
    for (let k = 0; k < n; k++) if (!(Math.abs(voltage[k]!) >= vLimit)) idx[m++] = k;
  }
  return idx.subarray(0, m);
}

// ---------------------------------------------------------------------------------------------
// detectResidualDelay

/**
 * The voltage steps Δv(k) = v[k] − v[k−1] (0 where not finite, and at k = 0) with ΣΔv², and the
 * residual with 0 where it is not finite (the residual itself when every one is: `finite`), with
 * Σe² and the count over k ≥ 1 where e is finite. `steps` and `kept` are valid until the next call
 * of a function of this file.
 */
export function delaySteps(voltage: Float64Array, residual: Float64Array, useKernel?: boolean):
  { finite: boolean; steps: Float64Array; kept: Float64Array; vv: number; ee: number; rows: number } {
  const n = residual.length;
  if (wanted(n, useKernel) && voltage.length === n) {
    const r = resident([voltage, residual], n, 2 * n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      const [pv, pr] = r.at as [number, number];
      const finite = k.firstNotFinite(pr, n) < 0;
      const stepsAt = r.free, keptAt = r.free + n;
      k.delaySteps(pv, pr, n, finite ? 1 : 0, 8 * stepsAt, 8 * keptAt, 0);
      return {
        finite, steps: f64.subarray(stepsAt, stepsAt + n), kept: finite ? residual : f64.subarray(keptAt, keptAt + n),
        vv: f64[0]!, ee: f64[1]!, rows: f64[2]!,
      };
    }
  }
  let vv = 0, ee = 0, rows = 0;
  const finite = firstNotFinite(residual) < 0;
  const steps = new Float64Array(n);
  const kept = finite ? residual : new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const e = residual[k]!;
    if (!finite && Number.isFinite(e)) kept[k] = e;
    if (k === 0) continue;
    const dv = voltage[k]! - voltage[k - 1]!;
    if (Number.isFinite(dv)) { steps[k] = dv; vv += dv * dv; }
    if (Number.isFinite(e)) { ee += e * e; rows++; }
  }
  return { finite, steps, kept, vv, ee, rows };
}

// ---------------------------------------------------------------------------------------------
// detectInputDelay

/** The increments da[k − 1] = a[k] − a[k − 1], db likewise (length n − 1), with Σda² and Σdb² (a, b of length n ≥ 1); da and db are valid until the next call of a function of this file. */
export function increments(a: Float64Array, b: Float64Array, useKernel?: boolean): { da: Float64Array; db: Float64Array; aa: number; bb: number } {
  const n = a.length;
  if (wanted(n, useKernel) && n >= 1 && b.length === n) {
    const r = resident([a, b], n, 2 * n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      const daAt = r.free, dbAt = r.free + n;
      k.increments(r.at[0]!, r.at[1]!, n, 8 * daAt, 8 * dbAt, 0);
      return { da: f64.subarray(daAt, daAt + n - 1), db: f64.subarray(dbAt, dbAt + n - 1), aa: f64[0]!, bb: f64[1]! };
    }
  }
  const da = new Float64Array(n - 1), db = new Float64Array(n - 1);
  let aa = 0, bb = 0;
  for (let k = 1; k < n; k++) {
    da[k - 1] = a[k]! - a[k - 1]!;
    db[k - 1] = b[k]! - b[k - 1]!;
    aa += da[k - 1]! * da[k - 1]!;
    bb += db[k - 1]! * db[k - 1]!;
  }
  return { da, db, aa, bb };
}

// ---------------------------------------------------------------------------------------------
// diagnoseFit

/** The model output ŷ = measured + residual, and how many of its samples are finite. */
export function modelOutput(measured: Float64Array, res: Float64Array, useKernel?: boolean): { predicted: Float64Array; finiteRows: number } {
  const n = measured.length;
  if (wanted(n, useKernel) && res.length === n) {
    const r = resident([measured, res], n, n);
    if (r !== null) {
      const finiteRows = r.room.exports.sumInto(r.at[0]!, r.at[1]!, 8 * r.free, n);
      return { predicted: r.room.f64.slice(r.free, r.free + n), finiteRows };
    }
  }
  const predicted = new Float64Array(n);
  let finiteRows = 0;
  for (let k = 0; k < n; k++) {
    const v = measured[k]! + res[k]!;
    predicted[k] = v;
    if (Number.isFinite(v)) finiteRows++;
  }
  return { predicted, finiteRows };
}

// ---------------------------------------------------------------------------------------------
// mechanicalRegression

/** The filtered speed's scan: its range, the central differences, and the sign with a dead band. */
export interface SpeedScan {
  /** acc[k] = (w[k+1] − w[k−1]) / h2 for 1 ≤ k < n − 1 (acc[0] = acc[n − 1] = 0: the caller sets the ends). */
  acc: Float64Array;
  /** Smallest and largest w (read in order of k). */
  wmin: number; wmax: number;
  /** s[k] = 1 when w[k] > band, −1 when w[k] < −band, else 0 (a fresh array, or a view valid until the next call of a function of this file). */
  sign(band: number): Float64Array;
}

/** The passes of `mechanicalRegression` over the filtered speed w (copied into the kernel once for both). */
export function speedScan(w: Float64Array, h2: number, useKernel?: boolean): SpeedScan {
  const n = w.length;
  if (wanted(n, useKernel)) {
    const r = resident([w], n, n);
    if (r !== null) {
      const { exports: k, f64 } = r.room;
      const at = r.free;
      k.centralDifferences(r.at[0]!, n, h2, 8 * at, 0);
      return {
        acc: f64.slice(at, at + n), wmin: f64[0]!, wmax: f64[1]!,
        sign: (band) => { k.signWithDeadBand(r.at[0]!, n, band, 8 * at); return f64.subarray(at, at + n); },
      };
    }
  }
  const acc = new Float64Array(n);
  // The central differences and the speed's range in one pass (the range still read in order of k).
  let wmin = Infinity, wmax = -Infinity;
  for (let k = 0; k < n; k++) {
    const v = w[k]!;
    if (v < wmin) wmin = v;
    if (v > wmax) wmax = v;
    if (k >= 1 && k + 1 < n) acc[k] = (w[k + 1]! - w[k - 1]!) / h2;
  }
  return {
    acc, wmin, wmax,
    sign: (band) => {
      const s = new Float64Array(n);
      for (let k = 0; k < n; k++) s[k] = w[k]! > band ? 1 : w[k]! < -band ? -1 : 0;
      return s;
    },
  };
}
