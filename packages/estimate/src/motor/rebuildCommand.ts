import { detectVoltageSegments } from './detectVoltageSegments.js';
import { estimateNoiseLevel } from './estimateNoiseLevel.js';
import { fourierMagnitudes } from './fourierMagnitudes.js';
import { medianInPlace } from './selectKth.js';
import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import { solveSymmetricSystem } from '../solver/solveSymmetricSystem.js';
import type { InputHandling, VoltageSegment } from './types.js';
import { zeroPhaseLowPass } from './zeroPhaseLowPass.js';

/** What `rebuildCommand` returns. */
export interface RebuiltCommand {
  /** The voltage to feed the model [V]. */
  voltage: Float64Array;
  /** What was done and why. */
  handling: InputHandling;
  /** The constant segments when the command is piecewise constant, else null. */
  segments: VoltageSegment[] | null;
  /**
   * The sine fit as a linear model when `handling.method` is `sine-fit`: columns 1, cos(ω_j·k),
   * sin(ω_j·k) (k the sample index), their Gram matrix XᵀX and the least-squares coefficients.
   */
  sineBasis?: SineBasis;
}

/** A least-squares sine fit v_k ≈ Σ_c β_c·x_c(k) over the sample index k. */
export interface SineBasis {
  /** Angular frequencies per sample ω_j [rad/sample]. */
  omega: Float64Array;
  /** Coefficients β̂ [V]: constant, then cos/sin pairs. */
  coefficients: Float64Array;
  /** Gram matrix XᵀX, q×q row-major, q = 1 + 2·omega.length. */
  gram: Float64Array;
}

/** Ratio RMS(measured − rebuilt)/σ below which a rebuild is taken to explain the data. */
const ACCEPT_RATIO = 1.5;
/** Most sines fitted to a smooth input. */
const MAX_SINES = 40;
/** Most harmonics of a whole-record period (common practice, no source). */
const MAX_HARMONICS = 64;

/**
 * Turns a measured, noisy terminal voltage into the model input without the errors-in-variables
 * bias of feeding the noise through the model: a piecewise-constant command (step, staircase,
 * PRBS) is replaced by its segment means, a smooth periodic one (multisine) by a least-squares
 * sum of sines at its spectral peaks, and a smooth input the sines do not explain by a zero-phase
 * low-pass at three times its highest peak. Otherwise the raw samples are used and the reason
 * says that the constants may be biased.
 *
 * ## Method
 * The noise σ comes from `estimateNoiseLevel`, re-estimated from the second differences inside
 * the detected segments when that is smaller (frequent switches inflate the first estimate).
 * Change points are jumps above 6·√2·σ (`detectVoltageSegments`); the segmentation is accepted when the within-segment RMS is below
 * 1.5σ and there are fewer segments than n/8. For the sines, peaks of the rectangular-window,
 * zero-padded magnitude spectrum above 10× its median are located by parabolic interpolation on
 * the log magnitude; when the peaks are harmonics of one base frequency the base is refined by
 * least squares over all of them; amplitudes and phases are then fitted by linear least squares
 * together with a constant, accepted under the same 1.5σ rule. When the peaks do not explain the
 * input, harmonics of the record length, f0 = 1/((n − 1)·h) or 1/(n·h), up to the highest
 * significant peak (at most 64) are tried the same way (a multisine periodic over the record).
 *
 * @param time - sample times [s] (uniform sampling assumed for the spectrum)
 * @param voltage - measured voltage [V]
 * @param mode - `auto` (rebuild) or `measured` (use the raw samples, still detect the step time)
 * @param phase - for jittered samples, the index on the command's own clock of the value each sample
 *   saw (the sines are fitted and evaluated at it); null for samples on the clock
 * @returns the model input, the handling record, and the segments when found
 * @example
 * const t = Float64Array.from({ length: 200 }, (_, k) => k * 1e-3);
 * const v = Float64Array.from(t, (s, k) => (s >= 0.05 ? 12 : 0) + 0.01 * Math.sin(7 * k));
 * rebuildCommand(t, v, 'auto').handling.method; // => 'segment-means'
 */
export function rebuildCommand(time: Float64Array, voltage: Float64Array, mode: 'auto' | 'measured', phase: Float64Array | null = null): RebuiltCommand {
  const n = voltage.length;
  let sigma = estimateNoiseLevel(voltage).sigma;
  let segs = detectVoltageSegments(voltage, sigma);
  // Frequent switches (a PRBS with few samples per bit) inflate the second-difference σ, which
  // raises the jump threshold and loses switches: re-estimate σ from the second differences that
  // lie wholly inside one segment and segment again, until σ settles (at most 3 times).
  for (let it = 0; it < 3 && segs.length > 1; it++) {
    const inner = withinSegmentSigma(voltage, segs);
    if (!(inner > 0) || !(inner < sigma)) break;
    const settled = sigma - inner <= 0.02 * sigma;
    sigma = inner;
    segs = detectVoltageSegments(voltage, sigma);
    if (settled) break;
  }
  const stepTime = segs.length > 1 ? time[segs[1]!.start]! : null;
  const piecewise = new Float64Array(n);
  for (const s of segs) piecewise.fill(s.level, s.start, s.end);
  const pwRatio = rmsDiff(voltage, piecewise) / Math.max(sigma, 1e-300);
  const isPiecewise = segs.length <= n / 8 && pwRatio < ACCEPT_RATIO;
  // Where the logged voltage is used as it is, its copy goes into the piecewise array, not needed any more
  // (a fresh array of n doubles costs the first touch of its pages again).
  if (mode === 'measured') {
    return {
      voltage: copyInto(piecewise, voltage),
      handling: { method: 'measured', reason: 'the raw measured voltage, as asked (no rebuilt command); its noise biases the constants', stepTime: isPiecewise ? stepTime : null, residualRatio: 0, voltageSigma: sigma },
      segments: isPiecewise ? segs : null,
    };
  }
  if (isPiecewise && sigma === 0) {
    // Not a sample of noise inside the levels: the command as the controller logged it.
    return {
      voltage: copyInto(piecewise, voltage),
      handling: {
        method: 'exact',
        reason: `exact command: ${segs.length} level(s) with no noise at all inside them; used as logged`,
        segments: segs.length,
        stepTime,
        residualRatio: 0,
        voltageSigma: 0,
      },
      segments: segs,
    };
  }
  if (isPiecewise) {
    return {
      voltage: piecewise,
      handling: {
        method: 'segment-means',
        reason: `piecewise-constant command: ${segs.length} level(s) separated by jumps above 6·√2·σ (σ = ${fmt(sigma)} V); within-level RMS ${fmt(pwRatio)}σ`,
        segments: segs.length,
        stepTime,
        residualRatio: pwRatio,
        voltageSigma: sigma,
      },
      segments: segs,
    };
  }
  const h = (time[n - 1]! - time[0]!) / (n - 1);
  let sines = fitSines(voltage, h, phase);
  let harmonic = false;
  // A periodic excitation (the usual multisine design): the period P [samples] shows as
  // x_k ≈ x_{k+P}; the differences give the noise free of the signal, σ = RMS(x_k − x_{k+P})/√2,
  // and the input is the significant harmonics of 1/(P·h).
  const period = sines !== null ? detectPeriod(voltage, h, phase) : null;
  if (period !== null) {
    const sigmaP = period.sigma;
    const K = Math.min(Math.floor(period.samples / 2) - 1, Math.max(1, Math.round(sines!.fmaxPeak * period.samples * h * 1.5)), 400);
    let cand = fitHarmonics(voltage, h, 1 / (period.samples * h), K, sigmaP, sines!.fmaxPeak, false, phase);
    // A few samples far off the periodic pattern (more than 6σ; at most 1 %) are left out: they
    // are replaced by the fit and the harmonics fitted again.
    let cleaned = voltage;
    if (cand !== null) {
      const off: number[] = [];
      for (let k = 0; k < n; k++) if (Math.abs(voltage[k]! - cand.values[k]!) > 6 * sigmaP) off.push(k);
      if (off.length > 0 && off.length <= 0.01 * n) {
        cleaned = Float64Array.from(voltage);
        for (const k of off) cleaned[k] = cand.values[k]!;
        cand = fitHarmonics(cleaned, h, 1 / (period.samples * h), K, sigmaP, sines!.fmaxPeak, false, phase);
      }
    }
    if (cand !== null && rmsDiff(cleaned, cand.values) / Math.max(sigmaP, 1e-300) < ACCEPT_RATIO) {
      const ratio = rmsDiff(cleaned, cand.values) / Math.max(sigmaP, 1e-300);
      return {
        voltage: cand.values,
        handling: {
          method: 'sine-fit',
          reason: `periodic input (period ${period.samples} samples): ${cand.frequencies.length} significant harmonic(s) of ${fmt(1 / (period.samples * h))} Hz explain it to ${fmt(ratio)}σ (σ = ${fmt(sigmaP)} V from period-to-period differences)`,
          frequencies: cand.frequencies,
          stepTime: null,
          residualRatio: ratio,
          voltageSigma: sigmaP,
        },
        segments: null,
        sineBasis: { omega: cand.omega, coefficients: cand.coefficients, gram: cand.gram },
      };
    }
  }
  if (sines !== null && !(rmsDiff(voltage, sines.values) / Math.max(sigma, 1e-300) < ACCEPT_RATIO)) {
    // Periodic excitation over the whole record (the usual multisine design): harmonics of
    // 1/((n − 1)·h) or 1/(n·h) up to the highest significant spectral peak; the spectral peaks of
    // such a record sit one bin apart, where the window's side lobes confuse the peak picking.
    for (const period of [(n - 1) * h, n * h]) {
      const f0 = 1 / period;
      const K = Math.min(MAX_HARMONICS, Math.max(1, Math.round(sines.fmaxPeak / f0)), Math.floor((n - 1) / 8));
      const cand = fitHarmonics(voltage, h, f0, K, sigma, sines.fmaxPeak, true, phase);
      if (cand !== null && rmsDiff(voltage, cand.values) / Math.max(sigma, 1e-300) < ACCEPT_RATIO) { sines = cand; harmonic = true; break; }
    }
  }
  if (sines !== null) {
    const ratio = rmsDiff(voltage, sines.values) / Math.max(sigma, 1e-300);
    if (ratio < ACCEPT_RATIO) {
      return {
        voltage: sines.values,
        handling: {
          method: 'sine-fit',
          reason: `smooth periodic input: ${sines.frequencies.length} sine(s) ${harmonic ? `at the harmonics of the record length (f0 = ${fmt(sines.frequencies[0]!)} Hz)` : 'at the spectral peaks'} explain it to ${fmt(ratio)}σ`,
          frequencies: sines.frequencies,
          stepTime: null,
          residualRatio: ratio,
          voltageSigma: sigma,
        },
        segments: null,
        sineBasis: { omega: sines.omega, coefficients: sines.coefficients, gram: sines.gram },
      };
    }
    const fmax = Math.max(...sines.frequencies);
    const cutoff = 3 * fmax;
    if (cutoff < 0.4 / h) {
      const lp = zeroPhaseLowPass(voltage, h, cutoff);
      const r = rmsDiff(voltage, lp) / Math.max(sigma, 1e-300);
      return {
        voltage: lp,
        handling: {
          method: 'low-pass',
          reason: `smooth input not explained by sines (${fmt(ratio)}σ); zero-phase low-pass at ${fmt(cutoff)} Hz (3× the highest peak) removes most of the noise, some bias remains`,
          frequencies: sines.frequencies,
          stepTime: null,
          residualRatio: r,
          voltageSigma: sigma,
        },
        segments: null,
      };
    }
  }
  return {
    voltage: Float64Array.from(voltage),
    handling: {
      method: 'measured',
      reason: `no piecewise-constant or smooth structure found (level RMS ${fmt(pwRatio)}σ); raw voltage used, its noise may bias the constants`,
      stepTime: null,
      residualRatio: 0,
      voltageSigma: sigma,
    },
    segments: null,
  };
}

/** 1.4826·MAD/√6 of the second differences whose three samples lie in one segment (see `estimateNoiseLevel`). */
function withinSegmentSigma(v: Float64Array, segs: VoltageSegment[]): number {
  let total = 0;
  for (const sg of segs) total += Math.max(sg.end - sg.start - 2, 0);
  if (total < 8) return NaN;
  // At most 2¹⁵ of them, every stride-th (as in estimateNoiseLevel).
  const stride = Math.max(1, Math.ceil(total / 32768));
  const dd = (v.length >= KERNEL_MIN_LENGTH ? segmentDifferencesKernel(v, segs, stride, Math.ceil(total / stride)) : null) ?? segmentDifferences(v, segs, stride, Math.ceil(total / stride));
  const m = dd.length;
  const med = medianInPlace(dd);
  for (let k = 0; k < m; k++) dd[k] = Math.abs(dd[k]! - med);
  return (1.482602218505602 * medianInPlace(dd)) / Math.sqrt(6);
}

/**
 * Every stride-th second difference (counted over all segments in order) whose three samples lie in
 * one segment, at most `cap` of them. Plain JavaScript: the reference of
 * {@link segmentDifferencesKernel} and its fallback (exported for the tests).
 */
export function segmentDifferences(v: Float64Array, segs: readonly VoltageSegment[], stride: number, cap: number): Float64Array {
  const d = new Float64Array(cap);
  let q = 0, c = 0;
  for (const sg of segs) {
    for (let k = sg.start + 1; k + 1 < sg.end; k++) {
      if (c++ % stride === 0 && q < d.length) d[q++] = v[k + 1]! - 2 * v[k]! + v[k - 1]!;
    }
  }
  return d.subarray(0, q);
}

/** {@link segmentDifferences} through the WebAssembly kernel (sampleKernels.wat): the same bits; null where it cannot run. */
export function segmentDifferencesKernel(v: Float64Array, segs: readonly VoltageSegment[], stride: number, cap: number): Float64Array | null {
  const n = v.length;
  const room = sampleKernels.room(8 * (n + cap));
  if (room === null) return null;
  const { f64, exports: k } = room;
  f64.set(v, 0);
  let q = 0, c = 0;
  for (const sg of segs) {
    // (Segments lie inside the series; one that does not is left to the JavaScript.)
    if (!(sg.start >= 0 && sg.end <= n)) return null;
    q = k.strideDifferences(0, sg.start, sg.end, c, stride, 8 * n, q, cap);
    c += Math.max(sg.end - sg.start - 2, 0);
  }
  return f64.slice(n, n + q);
}

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toPrecision(3) : String(x);
}

/** RMS of a − b over a's length (the sum through the sample kernel for long series: the same bits; exported for the tests). */
export function rmsDiff(a: Float64Array, b: Float64Array): number {
  const n = a.length;
  if (n >= KERNEL_MIN_LENGTH && b.length >= n) {
    const room = sampleKernels.room(16 * n);
    if (room !== null) {
      room.f64.set(a, 0);
      room.f64.set(b.subarray(0, n), n);
      return Math.sqrt(room.exports.squaredDistance(0, 8 * n, n) / n);
    }
  }
  return rmsDiffPlain(a, b);
}

/** {@link rmsDiff} in plain JavaScript (the reference of the kernel and its fallback; exported for the tests). */
export function rmsDiffPlain(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += (a[k]! - b[k]!) * (a[k]! - b[k]!);
  return Math.sqrt(s / a.length);
}

/** A sine fit: values, frequencies [Hz], ω per sample, coefficients, Gram matrix, highest significant spectral peak [Hz]. */
interface SineFit { values: Float64Array; frequencies: number[]; omega: Float64Array; coefficients: Float64Array; gram: Float64Array; fmaxPeak: number }

function fitSines(v: Float64Array, h: number, phase: Float64Array | null): SineFit | null {
  const n = v.length;
  const { magnitude, length } = fourierMagnitudes(v, 4);
  const sorted = Float64Array.from(magnitude).sort();
  const floor = sorted[sorted.length >> 1]!;
  const peaks: { bin: number; mag: number }[] = [];
  for (let k = 2; k + 1 < magnitude.length; k++) {
    const m = magnitude[k]!;
    if (m > 10 * floor && m >= magnitude[k - 1]! && m > magnitude[k + 1]!) peaks.push({ bin: k, mag: m });
  }
  if (peaks.length === 0) return null;
  const fmaxPeak = Math.max(...peaks.map((q) => q.bin)) / (length * h);
  peaks.sort((a, b) => b.mag - a.mag);
  const chosen = peaks.slice(0, MAX_SINES);
  const T = n * h;
  const df = 1 / T;
  let freqs: number[] = [];
  for (const pk of chosen) {
    const a = Math.log(magnitude[pk.bin - 1]!), b = Math.log(magnitude[pk.bin]!), c = Math.log(magnitude[pk.bin + 1]!);
    const denom = a - 2 * b + c;
    const shift = denom !== 0 ? (0.5 * (a - c)) / denom : 0;
    const f = (pk.bin + shift) / (length * h);
    if (!freqs.some((g) => Math.abs(g - f) < 0.5 * df)) freqs.push(f);
  }
  freqs.sort((x, y) => x - y);
  // Harmonics of one base frequency (the usual multisine design): refine the base by least
  // squares over all peaks, f0 = Σ kᵢ·fᵢ / Σ kᵢ², and place every sine at kᵢ·f0.
  const base = freqs[0]!;
  const ks = freqs.map((f) => Math.round(f / base));
  if (ks.every((k, i) => k >= 1 && Math.abs(freqs[i]! - k * base) < 0.25 * df * Math.max(1, k / 4) + 0.02 * base)) {
    let num = 0, den = 0;
    ks.forEach((k, i) => { num += k * freqs[i]!; den += k * k; });
    const f0 = num / den;
    freqs = ks.map((k) => k * f0);
  }
  return fitSineBasis(v, h, freqs, fmaxPeak, phase);
}

/** Linear least squares of a constant plus sines at the given frequencies [Hz]. */
function fitSineBasis(v: Float64Array, h: number, freqs: number[], fmaxPeak: number, phase: Float64Array | null = null): SineFit | null {
  const n = v.length;
  const K = freqs.length;
  const p = 2 * K + 1;
  const A = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const row = new Float64Array(p);
  const cw = freqs.map((f) => 2 * Math.PI * f * h);
  for (let k = 0; k < n; k++) {
    row[0] = 1;
    const at = phase === null ? k : phase[k]!;
    for (let j = 0; j < K; j++) {
      const ph = cw[j]! * at;
      row[1 + 2 * j] = Math.cos(ph);
      row[2 + 2 * j] = Math.sin(ph);
    }
    const y = v[k]!;
    for (let i = 0; i < p; i++) {
      const ri = row[i]!;
      rhs[i] = rhs[i]! + ri * y;
      for (let j = i; j < p; j++) A[i * p + j] = A[i * p + j]! + ri * row[j]!;
    }
  }
  for (let i = 0; i < p; i++) for (let j = 0; j < i; j++) A[i * p + j] = A[j * p + i]!;
  const gram = Float64Array.from(A);
  const coef = solveSymmetricSystem(A, rhs, p);
  if (coef === null) return null;
  const values = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let s = coef[0]!;
    const at = phase === null ? k : phase[k]!;
    for (let j = 0; j < K; j++) {
      const ph = cw[j]! * at;
      s += coef[1 + 2 * j]! * Math.cos(ph) + coef[2 + 2 * j]! * Math.sin(ph);
    }
    values[k] = s;
  }
  return { values, frequencies: freqs, omega: Float64Array.from(cw), coefficients: coef, gram, fmaxPeak };
}

/**
 * Harmonics k·f0 of a base frequency near `f0`: fits K harmonics, keeps those whose amplitude is
 * clearly above the noise ((a² + b²)/(2σ²/n) > 25, i.e. more than 5 standard errors on a 2-dof
 * chi-square), then refines f0 by three parabolic steps on the residual sum of squares (the record
 * need not hold a whole number of periods exactly).
 */
function fitHarmonics(v: Float64Array, h: number, f0: number, K: number, sigma: number, fmaxPeak: number, refine = true, phase: Float64Array | null = null): SineFit | null {
  const n = v.length;
  const all = fitSineBasis(v, h, Array.from({ length: K }, (_, j) => (j + 1) * f0), fmaxPeak, phase);
  if (all === null) return null;
  const c = all.coefficients;
  const keep: number[] = [];
  const se2 = (2 * sigma * sigma) / n;
  for (let j = 0; j < K; j++) {
    const a = c[1 + 2 * j]!, b = c[2 + 2 * j]!;
    if ((a * a + b * b) / Math.max(se2, 1e-300) > 25) keep.push(j + 1);
  }
  if (keep.length === 0) return all;
  const rssAt = (f: number): { fit: SineFit | null; rss: number } => {
    const fit = fitSineBasis(v, h, keep.map((k) => k * f), fmaxPeak, phase);
    if (fit === null) return { fit, rss: Infinity };
    let r = 0;
    for (let k = 0; k < n; k++) { const d = v[k]! - fit.values[k]!; r += d * d; }
    return { fit, rss: r };
  };
  let f = f0;
  let best = rssAt(f);
  if (!refine) return best.fit;
  // Step: a tenth of the frequency change that moves the highest kept harmonic by one bin over the record.
  let step = 0.1 / (keep[keep.length - 1]! * n * h);
  for (let it = 0; it < 3; it++) {
    const lo = rssAt(f - step), hi = rssAt(f + step);
    const den = lo.rss - 2 * best.rss + hi.rss;
    let shift = den > 0 ? (0.5 * step * (lo.rss - hi.rss)) / den : 0;
    if (shift > 2 * step) shift = 2 * step;
    if (shift < -2 * step) shift = -2 * step;
    const next = rssAt(f + shift);
    if (next.rss < best.rss) { f += shift; best = next; }
    step *= 0.3;
  }
  return best.fit;
}

/**
 * The period of a periodic input in samples, from candidates P = m/(f·h) ± 2 built from the six
 * strongest tones f of its Hann-windowed spectrum (m = 1…64: the base frequency may lie below
 * every tone): the P with the smallest
 * RMS(x_k − x_{k+P}), accepted when that RMS is below a tenth of the series' SD and at least two
 * periods fit in the record. σ = RMS/√2 (each difference holds two independent noise samples).
 */
function detectPeriod(samples: Float64Array, h: number, phase: Float64Array | null): { samples: number; sigma: number } | null {
  // On the command's own clock when the samples are jittered: slot j holds the value a sample saw
  // there (NaN for a slot no sample saw).
  let x = samples;
  if (phase !== null) {
    let lo = Infinity, hi = -Infinity;
    for (let k = 0; k < phase.length; k++) { lo = Math.min(lo, phase[k]!); hi = Math.max(hi, phase[k]!); }
    x = new Float64Array(hi - lo + 1).fill(NaN);
    for (let k = 0; k < samples.length; k++) x[phase[k]! - lo] = samples[k]!;
  }
  const n = x.length;
  if (n < 32) return null;
  // The strongest tones of a Hann-windowed spectrum (the window keeps side lobes from posing as tones).
  const { magnitude, length } = fourierMagnitudes(samples, 4, 'hann');
  const tops: { f: number; m: number }[] = [];
  for (let k = 2; k + 1 < magnitude.length; k++) {
    const m = magnitude[k]!;
    if (m >= magnitude[k - 1]! && m > magnitude[k + 1]!) tops.push({ f: k / (length * h), m });
  }
  tops.sort((a, b) => b.m - a.m);
  const peaks = tops.slice(0, 6).map((t) => t.f);
  if (peaks.length === 0) return null;
  let m = 0, cnt = 0;
  for (let k = 0; k < n; k++) if (Number.isFinite(x[k]!)) { m += x[k]!; cnt++; }
  m /= Math.max(cnt, 1);
  let sd = 0;
  for (let k = 0; k < n; k++) if (Number.isFinite(x[k]!)) sd += (x[k]! - m) ** 2;
  sd = Math.sqrt(sd / Math.max(cnt, 1));
  const cands = new Set<number>();
  for (const f of peaks) {
    for (let mult = 1; mult <= 64; mult++) {
      const P = Math.round(mult / (f * h));
      for (let q = P - 2; q <= P + 2; q++) if (q >= 8 && 2 * q <= n) cands.add(q);
    }
  }
  let best: { samples: number; rms: number } | null = null;
  for (const q of cands) {
    {
      const d0 = new Float64Array(n - q);
      let used = 0;
      for (let k = 0; k + q < n; k++) { const v = Math.abs(x[k + q]! - x[k]!); if (Number.isFinite(v)) d0[used++] = v; }
      const d = d0.subarray(0, used);
      if (used < 8) continue;
      // Robust RMS: the central 96 % (a few samples may differ for reasons of their own), over
      // 0.9346, what a Gaussian keeps after that trim.
      d.sort();
      const keep = Math.max(1, Math.floor(0.96 * d.length));
      let s = 0;
      for (let k = 0; k < keep; k++) s += d[k]! * d[k]!;
      const rms = Math.sqrt(s / keep) / 0.9346;
      if (best === null || rms < best.rms - 1e-12 * sd) best = { samples: q, rms };
    }
  }
  if (best === null || !(best.rms < 0.1 * sd)) return null;
  return { samples: best.samples, sigma: best.rms / Math.SQRT2 };
}

/** `target` with the values of `source` (of its length) written into it. */
function copyInto(target: Float64Array, source: Float64Array): Float64Array {
  target.set(source);
  return target;
}
