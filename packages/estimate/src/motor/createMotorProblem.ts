import { zohInto, zohSensitivitiesInto } from '@motorprint/model';
import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import type { LeastSquaresProblem, NormalEquations } from '../solver/types.js';
import type { PreparedRecording } from './prepareRecording.js';

/** Where the nuisance parameters of one recording sit in θ (−1: absent). */
export interface RecordingSlots {
  /** θ index of each level class of a piecewise-constant command (level = θ·levelScale [V]). */
  level: number[];
  levelScale: number;
  /** Current-sensor offset (offset = θ·offsetScale [A]). */
  offset: number;
  offsetScale: number;
  /** Load torque level of a loaded run (τ = θ·loadScale [N·m]). */
  load: number;
  loadScale: number;
  /** Initial speed of a coast-down (ω0 = θ·w0Scale [rad/s]). */
  w0: number;
  w0Scale: number;
}

/** Where each constant sits in θ (−1: not fitted, the value in `fixed` is used). */
export interface ParameterLayout {
  /** θ names in order. */
  names: string[];
  /** Indices of ln R, ln L, ln Kt, ln Ke (equal to iKt when Kt = Ke), ln J, ln b, Tc/tcScale. */
  iR: number; iL: number; iKt: number; iKe: number; iJ: number; iB: number; iTc: number;
  /** Values of the constants that are not fitted (SI). */
  fixed: Constants;
  /** Tc = θ[iTc]·tcScale [N·m]. */
  tcScale: number;
  /** Nuisance slots per recording. */
  recordings: RecordingSlots[];
}

/** Physical constants at θ. */
export interface Constants { R: number; L: number; Kt: number; Ke: number; J: number; b: number; Tc: number }

/** Residual series per recording (model − measured; NaN where not fitted). */
export interface ResidualSeries { current: Float64Array | null; speed: Float64Array | null }

/** The motor problem: a solver problem plus a way to read the residual series at θ. */
export interface MotorProblem extends LeastSquaresProblem {
  /** Constants at θ. */
  constantsAt(theta: Float64Array): Constants;
  /** Residual series (model − measured, in channel units) at θ, one entry per recording. */
  residualsAt(theta: Float64Array): ResidualSeries[];
}

const CHUNK = 4096;

/**
 * Builds the joint weighted least-squares problem over all prepared recordings: residuals
 * (model − measured)/σ per channel and sample, plus the voltage (and torque) samples as rows of
 * their own, with the analytic Jacobian w.r.t. θ accumulated chunk by chunk into JᵀJ and Jᵀr
 * (J is never stored).
 *
 * Models per kind: locked-rotor — first-order armature L·di/dt = v − R·i, exact hold recursion
 * with its own sensitivities; step, prbs, multisine, steady-state, loaded — the exact
 * zero-order-hold linear model, propagated here together with its forward sensitivities (the
 * matrices and their parameter derivatives come from `zohSensitivitiesInto` of
 * `@motorprint/model`), with a constant load torque (the load level plus Tc·sgn ω when Coulomb
 * friction is in the model); coast-down — the closed-form speed decay
 * ω = ω0·e^{−at} + (Tc/J)·expm1(−at)/a, a = b/J, until the stop.
 *
 * Errors in variables: a piecewise-constant command is the sum of its level classes,
 * u(t) = Σ_c U_c·[class(t) = c]. Each U_c is a parameter; the voltage samples of the class give
 * rows (U_c − v_k)/σ_v (added in closed form from their count, mean and spread), and ∂x/∂U_c is the
 * response to the class indicator, propagated like any other sensitivity. The level uncertainty
 * so enters the covariance. A current-sensor offset adds to the modelled current; a loaded run's
 * load level gets rows (τ_L − τ_k)/σ_τ from the torque channel.
 *
 * Chain rule: positive constants are fitted as θ = ln p, so ∂r/∂θ = p·∂r/∂p; with Kt = Ke one
 * θ entry takes the sum of both sensitivities.
 *
 * @param recs - prepared recordings
 * @param layout - the parameter layout
 * @returns the problem for `solveLeastSquares`
 */
export function createMotorProblem(recs: PreparedRecording[], layout: ParameterLayout): MotorProblem {
  const p = layout.names.length;
  const st = 2 * CHUNK;
  const r = new Float64Array(st);
  const jac = new Float64Array(p * st);
  const r2 = new Float64Array(2);
  const jac2 = new Float64Array(p * 2);
  const mats = new Float64Array(56);
  const work = new Float64Array(128);
  const S = new Float64Array(12);
  const maxClasses = Math.max(1, ...recs.map((x) => (x.levels === null ? 0 : x.levels.classes.length)));
  const SU = new Float64Array(2 * maxClasses);
  const U = new Float64Array(maxClasses);

  const ctx: PassContext = { layout, st, r, jac, mats, work, S, SU, U };

  const constantsAt = (theta: Float64Array): Constants => {
    const L = layout;
    const f = L.fixed;
    return {
      R: L.iR >= 0 ? Math.exp(theta[L.iR]!) : f.R,
      L: L.iL >= 0 ? Math.exp(theta[L.iL]!) : f.L,
      Kt: L.iKt >= 0 ? Math.exp(theta[L.iKt]!) : f.Kt,
      Ke: L.iKe >= 0 ? Math.exp(theta[L.iKe]!) : f.Ke,
      J: L.iJ >= 0 ? Math.exp(theta[L.iJ]!) : f.J,
      b: L.iB >= 0 ? Math.exp(theta[L.iB]!) : f.b,
      Tc: L.iTc >= 0 ? theta[L.iTc]! * L.tcScale : f.Tc,
    };
  };

  /** Adds rows with closed-form sums: count N of residuals (θ·scale − x_k)/σ with mean m and spread Σ(x − m)². */
  const levelRows = (acc: NormalEquations, col: number, value: number, scale: number, s: { count: number; mean: number; sumSq: number }, sigma: number, wantJ: boolean): number => {
    if (s.count === 0) return 0;
    const sq = Math.sqrt(s.count);
    r2[0] = (sq * (value - s.mean)) / sigma;
    r2[1] = Math.sqrt(s.sumSq) / sigma;
    if (wantJ) { jac2.fill(0); jac2[col * 2] = (sq * scale) / sigma; }
    accumulateNormalEquations(acc, r2, wantJ ? jac2 : null, 2, 2);
    acc.rows += s.count - 2;
    return r2[0] * r2[0] + r2[1] * r2[1];
  };

  const run = (theta: Float64Array, wantJ: boolean, acc: NormalEquations | null, store: ResidualSeries[] | null): number => {
    const c = constantsAt(theta);
    if (!(c.R > 0 && c.L > 0 && c.Kt > 0 && c.Ke > 0 && c.J > 0 && c.b > 0) || !Number.isFinite(c.R * c.L * c.Kt * c.Ke * c.J * c.b * c.Tc)) {
      return NaN;
    }
    const lay = layout;
    for (let ri = 0; ri < recs.length; ri++) {
      const rec = recs[ri]!;
      const sl = lay.recordings[ri]!;
      const out = store === null ? null : store[ri]!;
      const lv = rec.levels;
      const nc = lv === null ? 0 : lv.classes.length;
      for (let q = 0; q < nc; q++) U[q] = theta[sl.level[q]!]! * sl.levelScale;
      const off = sl.offset >= 0 ? theta[sl.offset]! * sl.offsetScale : 0;
      if (wantJ) jac.fill(0);
      let rows: number;
      if (rec.kind === 'locked-rotor') rows = lockedRotorPass(ctx, rec, sl, c, off, wantJ, acc, out);
      else if (rec.kind === 'coast-down') rows = coastDownPass(ctx, rec, sl, c, theta, wantJ, acc, out);
      else rows = linearPass(ctx, rec, sl, c, off, theta, wantJ, acc, out);
      if (rows > 0 && acc !== null) accumulateNormalEquations(acc, r, wantJ ? jac : null, rows, st);
      if (acc !== null && lv !== null) {
        for (let q = 0; q < nc; q++) levelRows(acc, sl.level[q]!, U[q]!, sl.levelScale, lv.classes[q]!, rec.handling.voltageSigma, wantJ);
      }
      if (acc !== null && sl.load >= 0 && rec.torqueStats !== null) {
        levelRows(acc, sl.load, theta[sl.load]! * sl.loadScale, sl.loadScale, rec.torqueStats, rec.torqueStats.sigma, wantJ);
      }
    }
    return acc === null ? 0 : acc.ssr;
  };

  return {
    parameterCount: p,
    evaluate(theta, wantJacobian, acc) {
      try {
        return run(theta, wantJacobian, acc, null);
      } catch {
        return NaN;
      }
    },
    constantsAt,
    residualsAt(theta) {
      const store: ResidualSeries[] = recs.map((x) => ({
        current: x.current === null ? null : new Float64Array(x.time.length).fill(NaN),
        speed: x.speed === null ? null : new Float64Array(x.time.length).fill(NaN),
      }));
      run(theta, false, null, store);
      return store;
    },
  };
}

/** Buffers shared by the passes of one problem. */
interface PassContext {
  layout: ParameterLayout;
  st: number;
  r: Float64Array;
  jac: Float64Array;
  mats: Float64Array;
  work: Float64Array;
  S: Float64Array;
  SU: Float64Array;
  U: Float64Array;
}

/** Locked-rotor recording: rows of the current; returns the rows left in the chunk. */
function lockedRotorPass(ctx: PassContext, rec: PreparedRecording, sl: RecordingSlots, c: Constants, off: number, wantJ: boolean, acc: NormalEquations | null, out: ResidualSeries | null): number {
  const { r, jac, st, U, SU } = ctx;
  const lay = ctx.layout;
  const iR = lay.iR, iL = lay.iL;
  const n = rec.time.length;
  const time = rec.time;
  const sI = rec.currentNoise === null ? 1 : 1 / rec.currentNoise.sigma;
  const mi = rec.current;
  const cls = rec.levels === null ? null : rec.levels.classOf;
  const nc = rec.levels === null ? 0 : rec.levels.classes.length;
  const iOff = sl.offset, offS = sl.offsetScale;
  const input = rec.input;
  let rows = 0;
  // L·di/dt = v − R·i with v held: i⁺ = a·i + (1 − a)·v/R, a = e^{−R·h/L}.
  let i = 0, dR = 0, dL = 0;
  SU.fill(0, 0, nc);
  let hC = NaN, a = 0, daR = 0, daL = 0;
  for (let k = 0; k < n; k++) {
    if (k > 0) {
      const h = time[k]! - time[k - 1]!;
      if (h !== hC) { a = Math.exp((-c.R * h) / c.L); daR = (-h / c.L) * a; daL = ((c.R * h) / (c.L * c.L)) * a; hC = h; }
      const q = cls === null ? -1 : cls[k - 1]!;
      const v = q < 0 ? input[k - 1]! : U[q]!;
      const iss = v / c.R;
      if (wantJ) {
        const nR = a * dR + daR * (i - iss) - (1 - a) * (v / (c.R * c.R));
        dL = a * dL + daL * (i - iss);
        dR = nR;
        for (let j = 0; j < nc; j++) SU[j] = a * SU[j]! + (j === q ? (1 - a) / c.R : 0);
      }
      i = a * i + (1 - a) * iss;
    }
    const res = i + off - mi![k]!;
    if (out !== null) out.current![k] = res;
    r[rows] = res * sI;
    if (wantJ) {
      if (iR >= 0) jac[iR * st + rows] = dR * c.R * sI;
      if (iL >= 0) jac[iL * st + rows] = dL * c.L * sI;
      for (let j = 0; j < nc; j++) jac[sl.level[j]! * st + rows] = SU[j]! * sl.levelScale * sI;
      if (iOff >= 0) jac[iOff * st + rows] = offS * sI;
    }
    rows++;
    if (rows === st) { if (acc !== null) accumulateNormalEquations(acc, r, wantJ ? jac : null, rows, st); rows = 0; }
  }
  return rows;
}

/** Coast-down recording: rows of the speed decay; returns the rows left in the chunk. */
function coastDownPass(ctx: PassContext, rec: PreparedRecording, sl: RecordingSlots, c: Constants, theta: Float64Array, wantJ: boolean, acc: NormalEquations | null, out: ResidualSeries | null): number {
  const { r, jac, st } = ctx;
  const lay = ctx.layout;
  const iJ = lay.iJ, iB = lay.iB, iTc = lay.iTc;
  const n = rec.time.length;
  const time = rec.time;
  const sW = rec.speedNoise === null ? 1 : 1 / rec.speedNoise.sigma;
  const mw = rec.speed;
  let rows = 0;
  const a = c.b / c.J;
  const g = c.Tc / c.J;
  const wi = sl.w0;
  const w0 = theta[wi]! * sl.w0Scale;
  const t0 = time[rec.first]!;
  for (let k = rec.first; k < n; k++) {
    const t = time[k]! - t0;
    const at = a * t;
    const E = Math.exp(-at);
    // q = expm1(−at)/a and ∂q/∂a, by series when at is small.
    let q: number, dq: number;
    if (at < 1e-5) { q = -t + 0.5 * a * t * t; dq = 0.5 * t * t - (a * t * t * t) / 3; }
    else { q = Math.expm1(-at) / a; dq = (-t * E - q) / a; }
    let w = w0 * E + g * q;
    let dA = -w0 * t * E + g * dq, dG = q, dW0 = E;
    const stopped = (w0 >= 0 ? w <= 0 : w >= 0) && g !== 0 && Math.sign(g) === Math.sign(w0);
    if (stopped) { w = 0; dA = 0; dG = 0; dW0 = 0; }
    const res = w - mw![k]!;
    if (out !== null) out.speed![k] = res;
    r[rows] = res * sW;
    if (wantJ) {
      // a = b/J, g = Tc/J: ∂/∂b = ∂A/J, ∂/∂J = −(a·∂A + g·∂G)/J, ∂/∂Tc = ∂G/J.
      if (iB >= 0) jac[iB * st + rows] = (dA / c.J) * c.b * sW;
      if (iJ >= 0) jac[iJ * st + rows] = (-(a * dA + g * dG) / c.J) * c.J * sW;
      if (iTc >= 0) jac[iTc * st + rows] = (dG / c.J) * lay.tcScale * sW;
      jac[wi * st + rows] = dW0 * sl.w0Scale * sW;
    }
    rows++;
    if (rows === st) { if (acc !== null) accumulateNormalEquations(acc, r, wantJ ? jac : null, rows, st); rows = 0; }
  }
  return rows;
}

/** Free-shaft recording (exact ZOH model with sensitivities): current and speed rows; returns the rows left in the chunk. */
function linearPass(ctx: PassContext, rec: PreparedRecording, sl: RecordingSlots, c: Constants, off: number, theta: Float64Array, wantJ: boolean, acc: NormalEquations | null, out: ResidualSeries | null): number {
  const { r, jac, st, U, SU } = ctx;
  const lay = ctx.layout;
  const iR = lay.iR, iL = lay.iL, iKt = lay.iKt, iKe = lay.iKe, iJ = lay.iJ, iB = lay.iB, iTc = lay.iTc;
  const n = rec.time.length;
  const time = rec.time;
  const sI = rec.currentNoise === null ? 1 : 1 / rec.currentNoise.sigma;
  const sW = rec.speedNoise === null ? 1 : 1 / rec.speedNoise.sigma;
  const mi = rec.current, mw = rec.speed;
  const cls = rec.levels === null ? null : rec.levels.classOf;
  const nc = rec.levels === null ? 0 : rec.levels.classes.length;
  const iOff = sl.offset, offS = sl.offsetScale;
  const input = rec.input;
  let rows = 0;
  const { mats, work, S } = ctx;
  const tied = iKt >= 0 && iKt === iKe;
  const params = { R: c.R, L: c.L, Kt: c.Kt, Ke: c.Ke, J: c.J, b: c.b };
  const TL = sl.load >= 0 ? theta[sl.load]! * sl.loadScale : rec.loadTorque;
  const tau = TL + c.Tc * rec.direction;
  const uniform = typeof rec.timeBase === 'number';
  let hC = NaN;
  let i = 0, w = 0;
  S.fill(0);
  SU.fill(0, 0, 2 * nc);
  let sLi = 0, sLw = 0;
  const fR = c.R, fL = c.L, fKt = c.Kt, fKe = c.Ke, fJ = c.J, fB = c.b;
  const tcS = lay.tcScale * rec.direction, ldS = sl.loadScale, iLd = sl.load;
  const lvS = sl.levelScale;
  const lvIdx = sl.level;
  for (let k = 0; k < n; k++) {
    if (mi !== null) {
      const res = i + off - mi[k]!;
      if (out !== null) out.current![k] = res;
      r[rows] = res * sI;
      if (wantJ) {
        if (iR >= 0) jac[iR * st + rows] = S[0]! * fR * sI;
        if (iL >= 0) jac[iL * st + rows] = S[2]! * fL * sI;
        if (tied) jac[iKt * st + rows] = (S[4]! * fKt + S[6]! * fKe) * sI;
        else {
          if (iKt >= 0) jac[iKt * st + rows] = S[4]! * fKt * sI;
          if (iKe >= 0) jac[iKe * st + rows] = S[6]! * fKe * sI;
        }
        if (iJ >= 0) jac[iJ * st + rows] = S[8]! * fJ * sI;
        if (iB >= 0) jac[iB * st + rows] = S[10]! * fB * sI;
        if (iTc >= 0) jac[iTc * st + rows] = sLi * tcS * sI;
        if (iLd >= 0) jac[iLd * st + rows] = sLi * ldS * sI;
        for (let j = 0; j < nc; j++) jac[lvIdx[j]! * st + rows] = SU[2 * j]! * lvS * sI;
        if (iOff >= 0) jac[iOff * st + rows] = offS * sI;
      }
      rows++;
    }
    if (mw !== null) {
      const res = w - mw[k]!;
      if (out !== null) out.speed![k] = res;
      r[rows] = res * sW;
      if (wantJ) {
        if (iR >= 0) jac[iR * st + rows] = S[1]! * fR * sW;
        if (iL >= 0) jac[iL * st + rows] = S[3]! * fL * sW;
        if (tied) jac[iKt * st + rows] = (S[5]! * fKt + S[7]! * fKe) * sW;
        else {
          if (iKt >= 0) jac[iKt * st + rows] = S[5]! * fKt * sW;
          if (iKe >= 0) jac[iKe * st + rows] = S[7]! * fKe * sW;
        }
        if (iJ >= 0) jac[iJ * st + rows] = S[9]! * fJ * sW;
        if (iB >= 0) jac[iB * st + rows] = S[11]! * fB * sW;
        if (iTc >= 0) jac[iTc * st + rows] = sLw * tcS * sW;
        if (iLd >= 0) jac[iLd * st + rows] = sLw * ldS * sW;
        for (let j = 0; j < nc; j++) jac[lvIdx[j]! * st + rows] = SU[2 * j + 1]! * lvS * sW;
      }
      rows++;
    }
    if (rows >= st - 1) { if (acc !== null) accumulateNormalEquations(acc, r, wantJ ? jac : null, rows, st); rows = 0; }
    if (k + 1 >= n) break;
    // Advance over [t_k, t_{k+1}] with the input held.
    const h = uniform ? (rec.timeBase as number) : time[k + 1]! - time[k]!;
    if (h !== hC) {
      if (wantJ) zohSensitivitiesInto(mats, params, h, work);
      else zohInto(mats, params, h);
      hC = h;
    }
    const q = cls === null ? -1 : cls[k]!;
    const v = q < 0 ? input[k]! : U[q]!;
    const p11 = mats[0]!, p12 = mats[1]!, p21 = mats[2]!, p22 = mats[3]!;
    const g1 = mats[4]!, g2 = mats[5]!, t1 = mats[6]!, t2 = mats[7]!;
    if (wantJ) {
      for (let j = 0; j < 6; j++) {
        const mo = 8 + 8 * j;
        const si = S[2 * j]!, sw = S[2 * j + 1]!;
        S[2 * j] = p11 * si + p12 * sw + mats[mo]! * i + mats[mo + 1]! * w + mats[mo + 4]! * v + mats[mo + 6]! * tau;
        S[2 * j + 1] = p21 * si + p22 * sw + mats[mo + 2]! * i + mats[mo + 3]! * w + mats[mo + 5]! * v + mats[mo + 7]! * tau;
      }
      for (let j = 0; j < nc; j++) {
        const si = SU[2 * j]!, sw = SU[2 * j + 1]!;
        const e = j === q ? 1 : 0;
        SU[2 * j] = p11 * si + p12 * sw + g1 * e;
        SU[2 * j + 1] = p21 * si + p22 * sw + g2 * e;
      }
      const li = sLi;
      sLi = p11 * li + p12 * sLw + t1;
      sLw = p21 * li + p22 * sLw + t2;
    }
    const iNext = p11 * i + p12 * w + g1 * v + t1 * tau;
    w = p21 * i + p22 * w + g2 * v + t2 * tau;
    i = iNext;
  }
  return rows;
}
