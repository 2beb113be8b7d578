/**
 * Small shared helpers of the detectors (not exported from the package).
 */
import { estimateNoiseLevel, keepsUnchanged, medianInterval, shareUnchangedNoise } from '@motorprint/estimate';
import type { NoiseLevel } from '@motorprint/estimate';
import { firstNotFiniteOf, trendSums } from './passes.js';
import type { TrendSums } from './passes.js';
import type { RecordingLike } from './types.js';

export { medianInterval } from '@motorprint/estimate';

/**
 * What was already computed inside the current `withSharedNoise` call, by array: the median sample
 * intervals of the time arrays. (The noise levels are shared by estimate's `shareUnchangedNoise`,
 * which the call opens: see `noiseLevel`.) Inside one synchronous call no array changes (the
 * detectors only read them), so the values are kept by identity; the map is dropped when the
 * outermost call returns or throws.
 */
let shared: { intervals: Map<Float64Array, number> } | null = null;

/** Runs `work` with the noise levels and sample intervals of its arrays computed once each (see `noiseLevel`). */
export function withSharedNoise<T>(work: () => T): T {
  if (shared !== null) return work();
  shared = { intervals: new Map() };
  try {
    return shareUnchangedNoise(work);
  } finally {
    shared = null;
  }
}

/**
 * `estimateNoiseLevel(x)`, once per array inside a `withSharedNoise` call: the detectors of one
 * diagnosis ask for the same channels' levels again and again, and outside such a call
 * `estimateNoiseLevel`'s memo compares every sample to its copy on each ask. Inside it the array is
 * named unchanged (the detectors only read it), so its level is kept by identity. A failure is not
 * kept: it is raised again.
 */
export function noiseLevel(x: Float64Array): NoiseLevel {
  if (shared !== null) keepsUnchanged([x]);
  return estimateNoiseLevel(x);
}

/** `medianInterval(time)`, once per array inside a `withSharedNoise` call. */
function intervalOf(time: Float64Array): number {
  if (shared === null) return medianInterval(time);
  let dt = shared.intervals.get(time);
  if (dt === undefined) {
    dt = medianInterval(time);
    shared.intervals.set(time, dt);
  }
  return dt;
}

/** Noise SD of a channel, or NaN when the channel is absent. */
export function noiseOf(x: Float64Array | undefined): number {
  return x instanceof Float64Array && x.length >= 4 ? noiseLevel(x).sigma : NaN;
}

/**
 * Recordings already checked, with what the check found: `scanRecording` and `diagnoseFit` run
 * every detector on the same recording object, and each public detector checks its argument;
 * the scan over the samples is done once per object. A recording whose time array or any channel
 * array was replaced (or a channel added or removed) is checked again; samples changed in place
 * inside the same arrays are not seen (channels are read-only to the detectors).
 */
const checked = new WeakMap<object, { n: number; dt: number; arrays: unknown[] }>();

/** The arrays a check (or a shared scan) covered, in a fixed order: time, then each channel by name. */
export function arraysOf(rec: RecordingLike): unknown[] {
  return [rec.time, ...Object.keys(rec.channels).sort().map((k) => (rec.channels as Record<string, unknown>)[k])];
}

/** Checks a recording shape for a public detector (once per recording object); returns n and the sample interval. */
export function checkRecording(fn: string, rec: RecordingLike): { n: number; dt: number } {
  if (rec === null || typeof rec !== 'object' || !(rec.time instanceof Float64Array)) throw new TypeError(`${fn}: recording.time must be a Float64Array`);
  if (rec.channels === null || typeof rec.channels !== 'object') throw new TypeError(`${fn}: recording.channels must be an object`);
  const arrays = arraysOf(rec);
  const seen = checked.get(rec);
  if (seen !== undefined && seen.n === rec.time.length && seen.arrays.length === arrays.length && seen.arrays.every((a, i) => a === arrays[i])) return { n: seen.n, dt: seen.dt };
  const n = rec.time.length;
  for (const [name, v] of Object.entries(rec.channels)) {
    if (v === undefined) continue;
    if (!(v instanceof Float64Array)) throw new TypeError(`${fn}: recording.channels.${name} must be a Float64Array`);
    if (v.length !== n) throw new TypeError(`${fn}: recording.channels.${name} has ${v.length} samples, time has ${n}`);
    const k = firstNotFiniteOf(v);
    if (k >= 0) throw new RangeError(`${fn}: recording.channels.${name}[${k}] must be finite (got ${v[k]})`);
  }
  const dt = intervalOf(rec.time);
  if (!(dt > 0)) throw new RangeError(`${fn}: recording.time must be increasing (median interval ${dt})`);
  checked.set(rec, { n, dt, arrays });
  return { n, dt };
}

/**
 * `medianInterval(rec.time)`, read from `checkRecording`'s record of the recording when it was
 * checked with these same arrays (it holds that very value), computed otherwise.
 */
export function sampleIntervalOf(rec: RecordingLike): number {
  const seen = rec !== null && typeof rec === 'object' ? checked.get(rec) : undefined;
  if (seen !== undefined && rec.time instanceof Float64Array && seen.n === rec.time.length) {
    const arrays = arraysOf(rec);
    if (seen.arrays.length === arrays.length && seen.arrays.every((a, i) => a === arrays[i])) return seen.dt;
  }
  return intervalOf(rec.time);
}

/** Rounds for evidence tables (4 significant digits). */
export function sig(x: number): number {
  return Number.isFinite(x) ? Number(x.toPrecision(4)) : x;
}

/**
 * Ordinary least squares of y on [1, x] over the rows where both are finite, with the slope's
 * standard error inflated for AR(1) residuals by √((1 + r₁)/(1 − r₁)), r₁ the lag-1
 * autocorrelation of the fitted residuals clamped to [0, 0.98] (the usual effective-sample-size
 * correction for serially correlated errors). NaN fields when fewer than 8 rows or x is constant.
 * The passes over the rows are `sums` (`trendSums` of passes.ts, made here unless the caller
 * needs them too).
 */
export function slopeWithSerialCorrection(x: Float64Array, y: Float64Array, sums: TrendSums = trendSums(x, y)): { slope: number; intercept: number; se: number; rows: number; lag1: number; sd: number } {
  const { m, sx, sy } = sums;
  const bad = { slope: NaN, intercept: NaN, se: NaN, rows: m, lag1: NaN, sd: NaN };
  if (m < 8) return bad;
  const xb = sx / m, yb = sy / m;
  const { sxx, sxy } = sums.moments(xb, yb);
  if (!(sxx > 0)) return bad;
  const slope = sxy / sxx, intercept = yb - slope * xb;
  const { ss, s1 } = sums.lagOne(intercept, slope);
  const r1 = ss > 0 ? Math.min(0.98, Math.max(0, s1 / ss)) : 0;
  const s2 = ss / (m - 2);
  return { slope, intercept, se: Math.sqrt(s2 / sxx) * Math.sqrt((1 + r1) / (1 - r1)), rows: m, lag1: r1, sd: Math.sqrt(s2) };
}

/** Index of the first sample of x that is not finite, or −1 (one small loop for every channel, optimised once). */
export function firstNotFinite(x: Float64Array): number {
  const n = x.length;
  for (let k = 0; k < n; k++) if (!Number.isFinite(x[k]!)) return k;
  return -1;
}
