import { zeroPhaseLowPass } from '@motorprint/estimate';
import { fCdf } from '@motorprint/estimate/distributions';
import { noiseLevel } from './internal.js';

/** One coefficient test of the steady current–speed line (internal). */
export interface SteadyLineTerm {
  /** Estimate [drive unit · speed unit^-k]. */
  estimate: number;
  /** Standard error (known plateau SEs, inflated by the lack of fit when it exceeds them). */
  se: number;
  /** Two-sided p-value, Student t with plateaus − parameters degrees of freedom. */
  pValue: number;
}

/**
 * Steady current–speed line from settled plateau means (internal, used by `detectFriction`).
 * Returns null when fewer than 4 plateaus with distinct speeds are found.
 *
 * ## Method
 * Plateaus are the runs where the low-passed voltage holds still (changes by < 5 % of its range
 * across one filter interval); the second half of each is its settled window. Per window the
 * mean drive, the mean filtered speed ω̄ and the mean acceleration ā = Δω_f/T are taken; the drive
 * mean is corrected by â·ā (â = J/Kt from the dynamic regression, so a plateau that has not fully
 * settled is still usable). Each corrected mean has its own SE² = σ_i²/m + â²·2σ_ωf²/T² (white raw
 * noise; windows do not overlap, so the plateau means are independent observations).
 * Weighted least squares of the means on [ω̄, 1, ω̄|ω̄|] (curvature) and on [ω̄, 1] (intercept),
 * weights 1/SE²; a coefficient's SE is the known-variance SE scaled by √max(1, χ²/dof), and the
 * p-value uses t with plateaus − parameters degrees of freedom (conservative on few plateaus).
 *
 * ## References
 * N. R. Draper, H. Smith (1998), Applied Regression Analysis, 3rd ed., §9 (weighted least squares).
 */
export function steadyLineTest(
  dt: number, voltage: Float64Array, drive: Float64Array, speed: Float64Array, accGain: number,
): { plateaus: number; curvature: SteadyLineTerm; intercept: SteadyLineTerm; interceptGivenCurvature: SteadyLineTerm } | null {
  const n = voltage.length;
  const fc = 1 / (40 * dt);
  const vf = zeroPhaseLowPass(voltage, dt, fc);
  const wf = zeroPhaseLowPass(speed, dt, fc);
  const g = Math.max(1, Math.round(1 / (fc * dt)));
  let vmin = Infinity, vmax = -Infinity;
  for (let k = 0; k < n; k++) { if (vf[k]! < vmin) vmin = vf[k]!; if (vf[k]! > vmax) vmax = vf[k]!; }
  const thr = Math.max(0.05 * (vmax - vmin), 10 * noiseLevel(voltage).sigma * Math.sqrt(2 * fc * dt));
  const still = new Uint8Array(n);
  for (let k = g; k + g < n; k++) still[k] = Math.abs(vf[k + g]! - vf[k - g]!) < thr ? 1 : 0;
  const sigI = noiseLevel(drive).sigma;
  const sigWf = noiseLevel(speed).sigma * Math.sqrt(2 * fc * dt);
  const xs: number[] = [], ys: number[] = [], ses: number[] = [];
  for (let k = 0; k < n;) {
    if (!still[k]) { k++; continue; }
    let e = k;
    while (e < n && still[e]) e++;
    const len = e - k;
    if (len >= 4 * g && len >= 40) {
      // The settled half, split into `PARTS` non-overlapping windows (batch means).
      const h0 = k + (len >> 1), step = Math.floor((e - h0) / PARTS);
      for (let part = 0; part < PARTS; part++) {
        const a = h0 + part * step, b = a + step - 1, m = b - a + 1, T = (b - a) * dt;
        let si = 0, sw = 0;
        for (let j = a; j <= b; j++) { si += drive[j]!; sw += wf[j]!; }
        const acc = (wf[b]! - wf[a]!) / T;
        xs.push(sw / m);
        ys.push(si / m - accGain * acc);
        ses.push(Math.sqrt((sigI * sigI) / m + (accGain * accGain * 2 * sigWf * sigWf) / (T * T)));
      }
    }
    k = e;
  }
  const J = xs.length;
  if (J < 4 * PARTS) return null;
  let xmin = Infinity, xmax = -Infinity;
  for (const x of xs) { xmin = Math.min(xmin, x); xmax = Math.max(xmax, x); }
  if (!(xmax - xmin > 0)) return null;
  const col = { w: xs, one: xs.map(() => 1), d: xs.map((x) => x * Math.abs(x)) };
  const curve = wls([col.w, col.one, col.d], ys, ses);
  const line = wls([col.w, col.one], ys, ses);
  if (!curve || !line) return null;
  return { plateaus: J / PARTS, curvature: curve[2]!, intercept: line[1]!, interceptGivenCurvature: curve[1]! };
}

/** Windows per plateau. */
const PARTS = 2;

/** Weighted least squares with known SEs (small p, normal equations by Gauss–Jordan). */
function wls(cols: number[][], y: number[], se: number[]): SteadyLineTerm[] | null {
  const p = cols.length, J = y.length;
  if (J <= p) return null;
  const A = Array.from({ length: p }, () => new Array<number>(2 * p).fill(0));
  const r = new Array<number>(p).fill(0);
  for (let k = 0; k < J; k++) {
    const wk = 1 / (se[k]! * se[k]!);
    for (let i = 0; i < p; i++) {
      r[i]! += wk * cols[i]![k]! * y[k]!;
      for (let j = 0; j < p; j++) A[i]![j]! += wk * cols[i]![k]! * cols[j]![k]!;
    }
  }
  // Scale to unit diagonal before inverting (speed and speed² columns differ by orders of magnitude).
  const s = A.map((row, i) => 1 / Math.sqrt(row[i]!));
  for (let i = 0; i < p; i++) { for (let j = 0; j < p; j++) A[i]![j]! *= s[i]! * s[j]!; A[i]![p + i] = 1; }
  for (let c = 0; c < p; c++) {
    let piv = c;
    for (let i = c + 1; i < p; i++) if (Math.abs(A[i]![c]!) > Math.abs(A[piv]![c]!)) piv = i;
    [A[c], A[piv]] = [A[piv]!, A[c]!];
    const d = A[c]![c]!;
    if (!(Math.abs(d) > 1e-12)) return null;
    for (let j = 0; j < 2 * p; j++) A[c]![j]! /= d;
    for (let i = 0; i < p; i++) if (i !== c) { const f = A[i]![c]!; for (let j = 0; j < 2 * p; j++) A[i]![j]! -= f * A[c]![j]!; }
  }
  const inv = (i: number, j: number): number => A[i]![p + j]! * s[i]! * s[j]!;
  const beta = Array.from({ length: p }, (_, i) => { let v = 0; for (let j = 0; j < p; j++) v += inv(i, j) * r[j]!; return v; });
  let chi2 = 0;
  for (let k = 0; k < J; k++) {
    let e = y[k]!;
    for (let i = 0; i < p; i++) e -= beta[i]! * cols[i]![k]!;
    chi2 += (e / se[k]!) ** 2;
  }
  const dof = J - p;
  const scale = Math.sqrt(Math.max(1, chi2 / dof));
  return beta.map((b, i) => {
    const sei = Math.sqrt(inv(i, i)) * scale;
    const t = b / sei;
    return { estimate: b, se: sei, pValue: Number.isFinite(t) ? 1 - fCdf(t * t, 1, dof) : NaN };
  });
}
