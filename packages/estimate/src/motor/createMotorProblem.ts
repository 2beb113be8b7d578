import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import type { LeastSquaresProblem, NormalEquations } from '../solver/types.js';
import type { PreparedRecording } from './prepareRecording.js';
import { sweepLinearModel } from './sweepLinearModel.js';
import type { SweepBuffers, SweepSpec } from './sweepLinearModel.js';

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
  /** θ indices of the sine-fit input coefficients (constant, then cos/sin pairs; β = θ·sineScale [V]). */
  sine: number[];
  sineScale: number;
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

/**
 * The motor problem: a solver problem over the free entries of θ (the frozen ones keep their
 * values from `thetaFull`), plus ways to move between the free and the full vector and to read
 * the residual series at a full θ.
 */
export interface MotorProblem extends LeastSquaresProblem {
  /** Constants at a full θ. */
  constantsAt(theta: Float64Array): Constants;
  /** Residual series (model − measured, in channel units) at a full θ, one entry per recording. */
  residualsAt(theta: Float64Array): ResidualSeries[];
  /**
   * Sum of squares at a full θ accumulated into `acc` (no Jacobian), with the residual series
   * stored on the way (the pass of `residualsAt` and of `evaluate` in one).
   */
  ssrWithResiduals(theta: Float64Array, acc: NormalEquations): { ssr: number; residuals: ResidualSeries[] };
  /** Full θ from a free one (frozen entries from the problem's full vector). */
  toFull(free: ArrayLike<number>): Float64Array;
  /** Free entries of a full θ. */
  toFree(full: ArrayLike<number>): Float64Array;
}

const CHUNK = 4096;

/**
 * The sweep's row buffers (residual rows and the Jacobian chunk), shared by every problem: a run
 * starts them from row 0 (zeroing the Jacobian first) and has summed every row it wrote before it
 * returns, and no run starts inside another, so what one problem leaves in them no other reads.
 * Kept, because a fresh Jacobian chunk of ≈ 0.5 MB costs the first touch of its pages in every
 * problem (five per fit of one recording; DEVELOPERS.md, "Speed of a fresh process").
 */
const sharedRows = { r: new Float64Array(0), jac: new Float64Array(0) };

/** Views of the shared row buffers of the given lengths (grown when too short). */
function rowBuffers(rLength: number, jacLength: number): { r: Float64Array; jac: Float64Array } {
  if (sharedRows.r.length < rLength) sharedRows.r = new Float64Array(rLength);
  if (sharedRows.jac.length < jacLength) sharedRows.jac = new Float64Array(jacLength);
  return { r: sharedRows.r.subarray(0, rLength), jac: sharedRows.jac.subarray(0, jacLength) };
}

/**
 * Builds the joint weighted least-squares problem over all prepared recordings: residuals
 * (model − measured)/σ per channel and sample, plus the voltage (and torque) samples as rows of
 * their own, with the analytic Jacobian w.r.t. θ accumulated chunk by chunk into JᵀJ and Jᵀr
 * (J is never stored).
 *
 * Models per kind: locked-rotor — first-order armature L·di/dt = v − R·i, exact hold recursion
 * with its own sensitivities; step, prbs, multisine, steady-state, loaded — the exact
 * zero-order-hold linear model with its forward sensitivities (`sweepLinearModel`; the matrices
 * and their parameter derivatives come from `zohSensitivitiesInto` of `@motorprint/model`), with a
 * constant load torque (the load level plus Tc·sgn ω when Coulomb friction is in the model) and,
 * with Coulomb friction, the rotor held at rest until Kt·i − load crosses Tc; coast-down — the
 * closed-form speed decay ω = ω0·e^{−at} + (Tc/J)·expm1(−at)/a, a = b/J, until the stop.
 *
 * Errors in variables: the model input is a linear combination of basis signals with fitted
 * coefficients — level classes of a piecewise-constant command, u(t) = Σ_c U_c·[class(t) = c], or
 * the constant and sines of a sine-fit input. The voltage samples give rows (u_k − v_k)/σ_v, added
 * in closed form from their sufficient statistics (per class: count, mean and spread; for the
 * sines: the Cholesky factor of the Gram matrix and the residual sum of squares). ∂x/∂β_j is the
 * response to basis signal j, propagated like any other sensitivity, so the input uncertainty
 * enters the covariance. A current-sensor offset adds to the modelled current; a loaded run's load
 * level gets rows (τ_L − τ_k)/σ_τ from the torque channel.
 *
 * `frozen` marks θ entries held at their value in `thetaFull` (the solver sees only the others);
 * the problem then never propagates the sensitivities of the frozen input coefficients, which is
 * what keeps the per-sample cost low while the constants are iterated.
 *
 * Chain rule: positive constants are fitted as θ = ln p, so ∂r/∂θ = p·∂r/∂p; with Kt = Ke one
 * θ entry takes the sum of both sensitivities.
 *
 * @param recs - prepared recordings
 * @param layout - the parameter layout
 * @param thetaFull - full θ; frozen entries keep these values (copied)
 * @param frozen - per full θ entry, true when it is held; null: nothing frozen
 * @param effects - for a score test (`scoreLumped`): the four effect columns of `EffectColumns`
 *   follow the free entries (indices p … p + 3 of an accumulator of p + 4 columns); null in a fit
 * @returns the problem for `solveLeastSquares`
 */
export function createMotorProblem(recs: PreparedRecording[], layout: ParameterLayout, thetaFull: ArrayLike<number>, frozen: boolean[] | null, effects: { tau: number; copper: number } | null = null): MotorProblem {
  const pFull = layout.names.length;
  const free: number[] = [];
  const colOf = new Int32Array(pFull);
  for (let j = 0; j < pFull; j++) {
    if (frozen !== null && frozen[j]) colOf[j] = -1;
    else { colOf[j] = free.length; free.push(j); }
  }
  const p = free.length;
  // Columns of the chunk: the free entries, (score pass) four effect columns, then the sink.
  const sink = effects === null ? p : p + 4;
  const pCols = sink + 1;
  // Column stride of the Jacobian chunk: not a power of two, so that the ~10 columns written per
  // row do not all map to the same cache set (a 64 KiB stride made every row a conflict miss).
  const st = 2 * CHUNK + 40;
  const full = Float64Array.from(thetaFull);
  const maxBasis = Math.max(1, ...recs.map((x) => (x.levels !== null ? x.levels.classes.length : x.sines !== null ? x.sines.coefficients.length : 0)));
  const buf: SweepBuffers = {
    st, ...rowBuffers(st, pCols * st), sink, rows: 0, acc: null, wantJ: false,
    mats: new Float64Array(56), work: new Float64Array(128), slot: new Float64Array(56), slot2: new Float64Array(56),
    x: new Float64Array(16), su: new Float64Array(2 * maxBasis), phi: new Float64Array(maxBasis),
    effects: effects === null ? null : { col: p, tau: effects.tau, copper: effects.copper, state: new Float64Array(10) },
  };
  const r2 = new Float64Array(2);
  const jac2 = new Float64Array(pCols * 2);
  const U = new Float64Array(maxBasis);
  const beta = new Float64Array(maxBasis);
  /** Column offset (index·st) of a full θ index, the sink when absent or frozen. */
  const colAt = (i: number, stride: number): number => (i < 0 || colOf[i]! < 0 ? sink : colOf[i]!) * stride;

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
  const levelRows = (acc: NormalEquations, index: number, value: number, scale: number, s: { count: number; mean: number; sumSq: number }, sigma: number, wantJ: boolean): void => {
    if (s.count === 0) return;
    const sq = Math.sqrt(s.count);
    r2[0] = (sq * (value - s.mean)) / sigma;
    r2[1] = Math.sqrt(s.sumSq) / sigma;
    // A held (frozen) coefficient has no Jacobian column: its rows add to rᵀr only.
    const withJ = wantJ && colAt(index, 1) !== sink;
    if (withJ) { jac2.fill(0); jac2[colAt(index, 2)] = (sq * scale) / sigma; }
    accumulateNormalEquations(acc, r2, withJ ? jac2 : null, 2, 2);
    acc.rows += s.count - 2;
  };

  /** Voltage rows of a sine-fit input: Lᵀ(β − β̂)/σ and √RSS/σ (the sum of squares of all n rows). */
  const sineRows = (acc: NormalEquations, rec: PreparedRecording, sl: RecordingSlots, wantJ: boolean): void => {
    const sm = rec.sines!;
    const q = sm.coefficients.length;
    const sig = rec.handling.voltageSigma;
    const rr = new Float64Array(q + 1);
    const jj = new Float64Array(pCols * (q + 1));
    for (let a = 0; a < q; a++) {
      // Row a of Lᵀ(β − β̂): Σ_{c ≥ a} L[c][a]·(β_c − β̂_c).
      let s = 0;
      for (let c = a; c < q; c++) {
        const lca = sm.cholesky[c * q + a]!;
        s += lca * (beta[c]! - sm.coefficients[c]!);
        if (wantJ) jj[colAt(sl.sine[c]!, q + 1) + a] = (lca * sl.sineScale) / sig;
      }
      rr[a] = s / sig;
    }
    rr[q] = Math.sqrt(sm.rss) / sig;
    accumulateNormalEquations(acc, rr, wantJ ? jj : null, q + 1, q + 1);
    acc.rows += sm.count - (q + 1);
  };

  const run = (theta: Float64Array, wantJ: boolean, acc: NormalEquations | null, store: ResidualSeries[] | null): number => {
    const c = constantsAt(theta);
    if (!(c.R > 0 && c.L > 0 && c.Kt > 0 && c.Ke > 0 && c.J > 0 && c.b > 0) || !Number.isFinite(c.R * c.L * c.Kt * c.Ke * c.J * c.b * c.Tc)) {
      return NaN;
    }
    const lay = layout;
    buf.acc = acc;
    buf.wantJ = wantJ;
    for (let ri = 0; ri < recs.length; ri++) {
      const rec = recs[ri]!;
      const sl = lay.recordings[ri]!;
      const out = store === null ? null : store[ri]!;
      const lv = rec.levels;
      const nc = lv === null ? 0 : lv.classes.length;
      for (let q = 0; q < nc; q++) U[q] = theta[sl.level[q]!]! * sl.levelScale;
      const ns = sl.sine.length;
      for (let q = 0; q < ns; q++) beta[q] = theta[sl.sine[q]!]! * sl.sineScale;
      const off = sl.offset >= 0 ? theta[sl.offset]! * sl.offsetScale : 0;
      if (wantJ) buf.jac.fill(0);
      buf.rows = 0;
      if (rec.kind === 'locked-rotor') lockedRotorPass(buf, rec, sl, c, off, U, colAt, lay, out);
      else if (rec.kind === 'coast-down') coastDownPass(buf, rec, sl, c, theta, colAt, lay, out);
      else sweepLinearModel(buf, linearSpec(rec, sl, c, off, theta, U, beta, colAt, lay, st, out));
      if (buf.rows > 0 && acc !== null) accumulateNormalEquations(acc, buf.r, wantJ ? buf.jac : null, buf.rows, st);
      buf.rows = 0;
      if (acc !== null && lv !== null) {
        for (let q = 0; q < nc; q++) levelRows(acc, sl.level[q]!, U[q]!, sl.levelScale, lv.classes[q]!, rec.handling.voltageSigma, wantJ);
      }
      if (acc !== null && ns > 0) sineRows(acc, rec, sl, wantJ);
      if (acc !== null && sl.load >= 0 && rec.torqueStats !== null) {
        levelRows(acc, sl.load, theta[sl.load]! * sl.loadScale, sl.loadScale, rec.torqueStats, rec.torqueStats.sigma, wantJ);
      }
    }
    return acc === null ? 0 : acc.ssr;
  };

  const toFull = (f: ArrayLike<number>): Float64Array => {
    const t = Float64Array.from(full);
    for (let j = 0; j < p; j++) t[free[j]!] = f[j]!;
    return t;
  };
  const work = Float64Array.from(full);
  const newStore = (): ResidualSeries[] => recs.map((x) => ({
    current: x.current === null ? null : new Float64Array(x.time.length).fill(NaN),
    speed: x.speed === null ? null : new Float64Array(x.time.length).fill(NaN),
  }));
  return {
    parameterCount: p,
    evaluate(theta, wantJacobian, acc) {
      for (let j = 0; j < p; j++) work[free[j]!] = theta[j]!;
      try {
        return run(work, wantJacobian, acc, null);
      } catch {
        return NaN;
      }
    },
    constantsAt,
    toFull,
    toFree(f) {
      const t = new Float64Array(p);
      for (let j = 0; j < p; j++) t[j] = f[free[j]!]!;
      return t;
    },
    residualsAt(theta) {
      const store = newStore();
      run(theta, false, null, store);
      return store;
    },
    ssrWithResiduals(theta, acc) {
      const residuals = newStore();
      let ssr: number;
      try {
        ssr = run(theta, false, acc, residuals);
      } catch {
        ssr = NaN;
      }
      return { ssr, residuals };
    },
  };
}

/** The linear pass's view of one recording at the current θ. */
function linearSpec(
  rec: PreparedRecording, sl: RecordingSlots, c: Constants, off: number, theta: Float64Array, U: Float64Array, beta: Float64Array,
  colAt: (i: number, stride: number) => number, lay: ParameterLayout, st: number, out: ResidualSeries | null,
): SweepSpec {
  const TL = sl.load >= 0 ? theta[sl.load]! * sl.loadScale : rec.loadTorque;
  const tied = lay.iKt >= 0 && lay.iKt === lay.iKe;
  const col = Int32Array.of(
    colAt(lay.iR, st), colAt(lay.iL, st), colAt(lay.iKt, st), tied ? colAt(-1, st) : colAt(lay.iKe, st), colAt(lay.iJ, st), colAt(lay.iB, st),
    colAt(lay.iTc, st), colAt(sl.load, st), colAt(sl.offset, st),
  );
  // Input basis: fitted only when its coefficients are free.
  let basis: 0 | 1 | 2 = 0;
  let idx: number[] = [];
  let uScale = 1;
  if (rec.levels !== null && sl.level.length > 0 && colAt(sl.level[0]!, 1) !== colAt(-1, 1)) { basis = 1; idx = sl.level; uScale = sl.levelScale; }
  else if (rec.sines !== null && sl.sine.length > 0 && colAt(sl.sine[0]!, 1) !== colAt(-1, 1)) { basis = 2; idx = sl.sine; uScale = sl.sineScale; }
  const uniform = typeof rec.timeBase === 'number';
  // Held sine coefficients away from the voltage-only fit (a polish trial): rebuild the input.
  let input = rec.input;
  if (rec.sines !== null && basis === 0 && sl.sine.length > 0 && rec.sines.coefficients.some((v, j) => v !== beta[j])) {
    input = new Float64Array(rec.time.length);
    const om = rec.sines.omega, K = om.length;
    for (let k = 0; k < input.length; k++) {
      let v = beta[0]!;
      for (let j = 0; j < K; j++) v += beta[1 + 2 * j]! * Math.cos(om[j]! * k) + beta[2 + 2 * j]! * Math.sin(om[j]! * k);
      input[k] = v;
    }
  }
  return {
    n: rec.time.length, time: rec.time, h: uniform ? (rec.timeBase as number) : NaN,
    mi: rec.current, mw: rec.speed,
    sI: rec.currentNoise === null ? 1 : 1 / rec.currentNoise.sigma,
    sW: rec.speedNoise === null ? 1 : 1 / rec.speedNoise.sigma,
    outI: out === null ? null : out.current, outW: out === null ? null : out.speed,
    off, tau: TL + c.Tc * rec.direction, col,
    tcW: lay.tcScale * rec.direction, ldW: sl.loadScale, offW: sl.offsetScale,
    input, cls: rec.levels === null ? null : rec.levels.classOf, levels: U,
    basis, m: idx.length, beta, colU: Int32Array.from(idx, (i) => colAt(i, st)), uScale,
    omega: rec.sines === null ? new Float64Array(0) : rec.sines.omega,
    stuck: c.Tc > 0, direction: rec.direction, load: TL, Tc: c.Tc,
    R: c.R, L: c.L, Kt: c.Kt, Ke: c.Ke, J: c.J, b: c.b, tied,
  };
}

/** Locked-rotor recording: rows of the current, left in the chunk (full chunks are accumulated). */
function lockedRotorPass(buf: SweepBuffers, rec: PreparedRecording, sl: RecordingSlots, c: Constants, off: number, U: Float64Array, colAt: (i: number, stride: number) => number, lay: ParameterLayout, out: ResidualSeries | null): void {
  const { r, jac, st, su } = buf;
  const wantJ = buf.wantJ;
  const n = rec.time.length;
  const time = rec.time;
  const sI = rec.currentNoise === null ? 1 : 1 / rec.currentNoise.sigma;
  const mi = rec.current!;
  const cls = rec.levels === null ? null : rec.levels.classOf;
  const fitLevels = rec.levels !== null && sl.level.length > 0 && colAt(sl.level[0]!, 1) !== colAt(-1, 1);
  const nc = fitLevels ? rec.levels!.classes.length : 0;
  const cR = colAt(lay.iR, st), cL = colAt(lay.iL, st), cO = colAt(sl.offset, st);
  const colU = Int32Array.from(sl.level, (i) => colAt(i, st));
  const offW = sl.offsetScale * sI, uW = sl.levelScale * sI;
  const input = rec.input;
  let rows = buf.rows;
  // L·di/dt = v − R·i with v held: i⁺ = a·i + (1 − a)·v/R, a = e^{−R·h/L}; log-sensitivities.
  let i = 0, dR = 0, dL = 0;
  su.fill(0, 0, nc);
  const ef = wantJ ? buf.effects : null;
  const es = ef === null ? new Float64Array(0) : ef.state.fill(0);
  const cE = ef === null ? 0 : ef.col * st;
  let hC = NaN, a = 0, q = 0;
  for (let k = 0; k < n; k++) {
    if (k > 0) {
      const h = time[k]! - time[k - 1]!;
      if (h !== hC) { q = (c.R * h) / c.L; a = Math.exp(-q); hC = h; }
      const cl = cls === null ? -1 : cls[k - 1]!;
      const v = cl < 0 ? input[k - 1]! : U[cl]!;
      const iss = v / c.R;
      if (wantJ) {
        dR = a * dR - q * a * (i - iss) - (1 - a) * iss;
        dL = a * dL + q * a * (i - iss);
        const g = (1 - a) / c.R;
        for (let j = 0; j < nc; j++) su[j] = a * su[j]! + (j === cl ? g : 0);
      }
      if (ef !== null) {
        // Heating columns (the rotor is held, so friction and drag move nothing): the voltage
        // −κ·F·i and −κ·G·i held over the interval, through the held-rotor recursion.
        const F = es[8]!, G = es[9]!, P = c.R * i * i, g = (1 - a) / c.R, kappa = c.R / ef.copper;
        es[4] = a * es[4]! - g * kappa * F * i;
        es[6] = a * es[6]! - g * kappa * G * i;
        const qT = Math.exp(-h / ef.tau);
        es[8] = qT * F + (1 - qT) * P;
        es[9] = qT * G + ((qT * h) / ef.tau) * (F - P);
      }
      i = a * i + (1 - a) * iss;
    }
    const res = i + off - mi[k]!;
    if (out !== null) out.current![k] = res;
    r[rows] = res * sI;
    if (wantJ) {
      jac[cR + rows] = dR * sI;
      jac[cL + rows] = dL * sI;
      jac[cO + rows] = offW;
      for (let j = 0; j < nc; j++) jac[colU[j]! + rows] = su[j]! * uW;
      if (ef !== null) {
        jac[cE + rows] = 0;
        jac[cE + st + rows] = 0;
        jac[cE + 2 * st + rows] = es[4]! * sI;
        jac[cE + 3 * st + rows] = es[6]! * sI;
      }
    }
    rows++;
    if (rows === st) { buf.rows = rows; flushChunk(buf); rows = 0; }
  }
  buf.rows = rows;
}

function flushChunk(buf: SweepBuffers): void {
  if (buf.acc !== null && buf.rows > 0) accumulateNormalEquations(buf.acc, buf.r, buf.wantJ ? buf.jac : null, buf.rows, buf.st);
  buf.rows = 0;
}

/** Coast-down recording: rows of the speed decay, left in the chunk (full chunks are accumulated). */
function coastDownPass(buf: SweepBuffers, rec: PreparedRecording, sl: RecordingSlots, c: Constants, theta: Float64Array, colAt: (i: number, stride: number) => number, lay: ParameterLayout, out: ResidualSeries | null): void {
  const { r, jac, st } = buf;
  const wantJ = buf.wantJ;
  const cJ = colAt(lay.iJ, st), cB = colAt(lay.iB, st), cT = colAt(lay.iTc, st), cW = colAt(sl.w0, st);
  const n = rec.time.length;
  const time = rec.time;
  const sW = rec.speedNoise === null ? 1 : 1 / rec.speedNoise.sigma;
  const mw = rec.speed!;
  let rows = buf.rows;
  const a = c.b / c.J;
  const g = c.Tc / c.J;
  const w0 = theta[sl.w0]! * sl.w0Scale;
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
    const res = w - mw[k]!;
    if (out !== null) out.speed![k] = res;
    r[rows] = res * sW;
    if (wantJ) {
      // a = b/J, g = Tc/J: ∂/∂ln b = a·∂A, ∂/∂ln J = −(a·∂A + g·∂G), ∂/∂Tc = ∂G/J.
      jac[cB + rows] = a * dA * sW;
      jac[cJ + rows] = -(a * dA + g * dG) * sW;
      jac[cT + rows] = (dG / c.J) * lay.tcScale * sW;
      jac[cW + rows] = dW0 * sl.w0Scale * sW;
    }
    rows++;
    if (rows === st) { buf.rows = rows; flushChunk(buf); rows = 0; }
  }
  buf.rows = rows;
}
