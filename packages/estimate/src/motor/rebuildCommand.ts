import { detectVoltageSegments } from './detectVoltageSegments.js';
import { estimateNoiseLevel } from './estimateNoiseLevel.js';
import { fourierMagnitudes } from './fourierMagnitudes.js';
import { solveSymmetricSystem } from './solveSymmetricSystem.js';
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
}

/** Ratio RMS(measured − rebuilt)/σ below which a rebuild is taken to explain the data. */
const ACCEPT_RATIO = 1.5;
/** Most sines fitted to a smooth input. */
const MAX_SINES = 40;

/**
 * Turns a measured, noisy terminal voltage into the model input without the errors-in-variables
 * bias of feeding the noise through the model: a piecewise-constant command (step, staircase,
 * PRBS) is replaced by its segment means, a smooth periodic one (multisine) by a least-squares
 * sum of sines at its spectral peaks, and a smooth input the sines do not explain by a zero-phase
 * low-pass at three times its highest peak. Otherwise the raw samples are used and the reason
 * says that the constants may be biased.
 *
 * ## Method
 * The noise σ comes from `estimateNoiseLevel`. Change points are jumps above 6·√2·σ
 * (`detectVoltageSegments`); the segmentation is accepted when the within-segment RMS is below
 * 1.5σ and there are fewer segments than n/8. For the sines, peaks of the rectangular-window,
 * zero-padded magnitude spectrum above 10× its median are located by parabolic interpolation on
 * the log magnitude; when the peaks are harmonics of one base frequency the base is refined by
 * least squares over all of them; amplitudes and phases are then fitted by linear least squares
 * together with a constant, accepted under the same 1.5σ rule.
 *
 * @param time - sample times [s] (uniform sampling assumed for the spectrum)
 * @param voltage - measured voltage [V]
 * @param mode - `auto` (rebuild) or `measured` (use the raw samples, still detect the step time)
 * @returns the model input, the handling record, and the segments when found
 * @example
 * const t = Float64Array.from({ length: 200 }, (_, k) => k * 1e-3);
 * const v = Float64Array.from(t, (s, k) => (s >= 0.05 ? 12 : 0) + 0.01 * Math.sin(7 * k));
 * rebuildCommand(t, v, 'auto').handling.method; // => 'segment-means'
 */
export function rebuildCommand(time: Float64Array, voltage: Float64Array, mode: 'auto' | 'measured'): RebuiltCommand {
  const n = voltage.length;
  const sigma = estimateNoiseLevel(voltage).sigma;
  const segs = detectVoltageSegments(voltage, sigma);
  const stepTime = segs.length > 1 ? time[segs[1]!.start]! : null;
  const piecewise = new Float64Array(n);
  for (const s of segs) piecewise.fill(s.level, s.start, s.end);
  const pwRatio = rmsDiff(voltage, piecewise) / Math.max(sigma, 1e-300);
  const isPiecewise = segs.length <= n / 8 && pwRatio < ACCEPT_RATIO;
  if (mode === 'measured') {
    return {
      voltage: Float64Array.from(voltage),
      handling: { method: 'measured', reason: 'asked for the raw measured voltage (options.voltage = "measured"); its noise biases the constants', stepTime: isPiecewise ? stepTime : null, residualRatio: 0, voltageSigma: sigma },
      segments: isPiecewise ? segs : null,
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
  const sines = fitSines(voltage, h);
  if (sines !== null) {
    const ratio = rmsDiff(voltage, sines.values) / Math.max(sigma, 1e-300);
    if (ratio < ACCEPT_RATIO) {
      return {
        voltage: sines.values,
        handling: {
          method: 'sine-fit',
          reason: `smooth periodic input: ${sines.frequencies.length} sine(s) at the spectral peaks explain it to ${fmt(ratio)}σ`,
          frequencies: sines.frequencies,
          stepTime: null,
          residualRatio: ratio,
          voltageSigma: sigma,
        },
        segments: null,
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

function fmt(x: number): string {
  return Number.isFinite(x) ? x.toPrecision(3) : String(x);
}

function rmsDiff(a: Float64Array, b: Float64Array): number {
  let s = 0;
  for (let k = 0; k < a.length; k++) s += (a[k]! - b[k]!) * (a[k]! - b[k]!);
  return Math.sqrt(s / a.length);
}

function fitSines(v: Float64Array, h: number): { values: Float64Array; frequencies: number[] } | null {
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
  const K = freqs.length;
  const p = 2 * K + 1;
  const A = new Float64Array(p * p);
  const rhs = new Float64Array(p);
  const row = new Float64Array(p);
  const cw = freqs.map((f) => 2 * Math.PI * f * h);
  for (let k = 0; k < n; k++) {
    row[0] = 1;
    for (let j = 0; j < K; j++) {
      const ph = cw[j]! * k;
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
  const coef = solveSymmetricSystem(A, rhs, p);
  if (coef === null) return null;
  const values = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    let s = coef[0]!;
    for (let j = 0; j < K; j++) {
      const ph = cw[j]! * k;
      s += coef[1 + 2 * j]! * Math.cos(ph) + coef[2 + 2 * j]! * Math.sin(ph);
    }
    values[k] = s;
  }
  return { values, frequencies: freqs };
}
