import { zohInto, zohSensitivitiesInto } from '@motorprint/model';
import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import type { NormalEquations } from '../solver/types.js';
import { freeRunInKernel, RUN_BLOCK } from './freeRunKernel.js';

/**
 * Buffers of one motor problem, shared by every pass (internal). The Jacobian chunk is
 * column-major with stride `st`; column `sink` (the last one) receives the entries of
 * columns that are not fitted, so the hot loop writes every column without a branch.
 */
export interface SweepBuffers {
  /** Rows per Jacobian column in the chunk. */
  st: number;
  /** Residual chunk. */
  r: Float64Array;
  /** Jacobian chunk, (p + 1)·st. */
  jac: Float64Array;
  /** Index of the sink column. */
  sink: number;
  /** Rows currently in the chunk. */
  rows: number;
  /** Accumulator of this evaluation (null: residual series only). */
  acc: NormalEquations | null;
  /** Whether Jacobian rows are wanted. */
  wantJ: boolean;
  /** ZOH matrices and their derivatives (`zohSensitivitiesInto` layout, 56). */
  mats: Float64Array;
  /** Scratch of `zohSensitivitiesInto`. */
  work: Float64Array;
  /** Slot matrices for the record's interval: [Φ, Γv, Γτ] then 6 slots × 8 log-scaled derivatives. */
  slot: Float64Array;
  /** Slot matrices for a partial interval (breakaway). */
  slot2: Float64Array;
  /** State: i, ω, then ∂(i, ω)/∂ln p for the 6 slots (R, L, Kt or K, Ke, J, b), then the response to a unit load torque. */
  x: Float64Array;
  /** Sensitivities to the input-basis coefficients (2 per coefficient). */
  su: Float64Array;
  /** Input-basis values at the current sample. */
  phi: Float64Array;
  /** Effect columns of the score test (`EffectColumns`), or null in a fit. */
  effects: EffectColumns | null;
}

/**
 * The four effect columns a score test adds to the lumped model at its fit (internal): the
 * first-order responses of current and speed to Coulomb friction Tc·sgn ω, to drag c·ω|ω| (both
 * as load torque, per N·m and per N·m·s²/rad²) and to a winding-heating rise of a fixed thermal
 * time constant τ: its size and its time course (R·(1 + ΔT/(k + T_ref)) with ΔT = Rth·F and
 * τ·∂F/∂τ, F the copper loss R·i² through 1/(τs + 1), as voltage −R·ΔT·i/(k + T_ref) per unit Rth).
 * Each is the linear model's zero-order-hold response to its input held over the interval at the
 * model's sample values; columns `col` … `col + 3` of the chunk.
 */
export interface EffectColumns {
  /** Index of the first of the four columns. */
  col: number;
  /** Thermal time constant of the heating columns [s]. */
  tau: number;
  /** Copper constant k + reference temperature [°C] (the heating columns' scale). */
  copper: number;
  /** State: (i, ω) responses of Tc, c, heating size, heating course; then F and τ·∂F/∂τ. */
  state: Float64Array;
}

/** What one linear pass needs to know about a recording at the current θ (internal). */
export interface SweepSpec {
  n: number;
  time: Float64Array;
  /** Uniform interval [s] or NaN for a non-uniform time base. */
  h: number;
  mi: Float64Array | null;
  mw: Float64Array | null;
  sI: number;
  sW: number;
  outI: Float64Array | null;
  outW: Float64Array | null;
  /** Current offset [A]. */
  off: number;
  /** Constant load torque on the rotor while it runs [N·m] (load level + Tc·direction). */
  tau: number;
  /** Column offsets (column index · st) of the 6 slots, Tc, load and offset. */
  col: Int32Array;
  /** Whitened scale of the Tc, load and offset columns. */
  tcW: number;
  ldW: number;
  offW: number;
  /** Model input when the basis is not fitted: per-sample input, or class levels via `cls`. */
  input: Float64Array;
  cls: Int32Array | null;
  levels: Float64Array;
  /** Fitted input basis: 0 none, 1 level classes, 2 sines (constant, then cos/sin pairs). */
  basis: 0 | 1 | 2;
  /** Number of basis coefficients fitted (0 when frozen). */
  m: number;
  /** Basis coefficients [V] and their columns (index · st) and θ scale. */
  beta: Float64Array;
  colU: Int32Array;
  uScale: number;
  /** Angular frequencies per sample of the sines [rad/sample]. */
  omega: Float64Array;
  /** Rotor held at rest from t = 0 until Kt·i − load crosses Tc (Coulomb friction with a stuck start). */
  stuck: boolean;
  /** Running direction (±1), load level [N·m] and Tc [N·m] for the breakaway test. */
  direction: number;
  load: number;
  Tc: number;
  R: number; L: number; Kt: number; Ke: number; J: number; b: number;
  tied: boolean;
}

/** Fills `out` with [Φ, Γv, Γτ] and, when `withSlots`, the slot derivatives scaled by the constants (∂/∂ln p). */
function combineSlots(mats: Float64Array, out: Float64Array, s: SweepSpec, withSlots: boolean): void {
  for (let e = 0; e < 8; e++) out[e] = mats[e]!;
  if (!withSlots) return;
  const pv0 = s.R, pv1 = s.L, pv2 = s.Kt, pv3 = s.Ke, pv4 = s.J, pv5 = s.b;
  for (let e = 0; e < 8; e++) {
    out[8 + e] = pv0 * mats[8 + e]!;
    out[16 + e] = pv1 * mats[16 + e]!;
    if (s.tied) {
      out[24 + e] = pv2 * mats[24 + e]! + pv3 * mats[32 + e]!;
      out[32 + e] = 0;
    } else {
      out[24 + e] = pv2 * mats[24 + e]!;
      out[32 + e] = pv3 * mats[32 + e]!;
    }
    out[40 + e] = pv4 * mats[40 + e]!;
    out[48 + e] = pv5 * mats[48 + e]!;
  }
}

function discretise(b: SweepBuffers, s: SweepSpec, h: number, out: Float64Array): void {
  const params = { R: s.R, L: s.L, Kt: s.Kt, Ke: s.Ke, J: s.J, b: s.b };
  if (b.wantJ) zohSensitivitiesInto(b.mats, params, h, b.work);
  else zohInto(b.mats, params, h);
  combineSlots(b.mats, out, s, b.wantJ);
}

function flush(b: SweepBuffers): void {
  if (b.acc !== null && b.rows > 0) accumulateNormalEquations(b.acc, b.r, b.wantJ ? b.jac : null, b.rows, b.st);
  b.rows = 0;
}

/** Input value and (when the basis is fitted) the basis values at sample k. */
function inputAt(s: SweepSpec, phi: Float64Array, k: number): number {
  if (s.basis === 2 && s.m > 0) {
    let v = 0;
    phi[0] = 1;
    v += s.beta[0]!;
    const K = (s.m - 1) >> 1;
    for (let j = 0; j < K; j++) {
      const ph = s.omega[j]! * k;
      const c = Math.cos(ph), sn = Math.sin(ph);
      phi[1 + 2 * j] = c;
      phi[2 + 2 * j] = sn;
      v += s.beta[1 + 2 * j]! * c + s.beta[2 + 2 * j]! * sn;
    }
    return v;
  }
  if (s.cls !== null) {
    const q = s.cls[k]!;
    if (s.m > 0) { phi.fill(0, 0, s.m); phi[q] = 1; }
    return s.levels[q]!;
  }
  return s.input[k]!;
}

/**
 * Writes the current and speed rows of sample k from the state in `b.x`/`b.su` (generic, used
 * while the rotor is stuck; the free run has its own inlined copy).
 */
function writeRowsGeneric(b: SweepBuffers, s: SweepSpec, k: number): void {
  const x = b.x, r = b.r, jac = b.jac, col = s.col, wantJ = b.wantJ;
  for (let ch = 0; ch < 2; ch++) {
    const meas = ch === 0 ? s.mi : s.mw;
    if (meas === null) continue;
    const sc = ch === 0 ? s.sI : s.sW;
    const row = b.rows;
    const res = x[ch]! + (ch === 0 ? s.off : 0) - meas[k]!;
    const out = ch === 0 ? s.outI : s.outW;
    if (out !== null) out[k] = res;
    r[row] = res * sc;
    if (wantJ) {
      for (let j = 0; j < 6; j++) jac[col[j]! + row] = x[2 + 2 * j + ch]! * sc;
      const t = x[14 + ch]! * sc;
      jac[col[6]! + row] = t * s.tcW;
      jac[col[7]! + row] = t * s.ldW;
      jac[col[8]! + row] = ch === 0 ? s.offW * sc : 0;
      for (let j = 0; j < s.m; j++) jac[s.colU[j]! + row] = b.su[2 * j + ch]! * s.uScale * sc;
    }
    b.rows = row + 1;
  }
  if (b.effects === null && b.rows >= b.st - 1) flush(b);
}

/** Advances state and sensitivities over one interval with the matrices in `M` (generic form). */
function advanceGeneric(b: SweepBuffers, s: SweepSpec, M: Float64Array, v: number): void {
  const x = b.x;
  const i = x[0]!, w = x[1]!, tau = s.tau;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!;
  if (b.wantJ) {
    for (let j = 0; j < 6; j++) {
      const o = 8 + 8 * j;
      const si = x[2 + 2 * j]!, sw = x[3 + 2 * j]!;
      x[2 + 2 * j] = p11 * si + p12 * sw + M[o]! * i + M[o + 1]! * w + M[o + 4]! * v + M[o + 6]! * tau;
      x[3 + 2 * j] = p21 * si + p22 * sw + M[o + 2]! * i + M[o + 3]! * w + M[o + 5]! * v + M[o + 7]! * tau;
    }
    const ti = x[14]!, tw = x[15]!;
    x[14] = p11 * ti + p12 * tw + M[6]!;
    x[15] = p21 * ti + p22 * tw + M[7]!;
    const su = b.su, phi = b.phi;
    for (let j = 0; j < s.m; j++) {
      const ui = su[2 * j]!, uw = su[2 * j + 1]!;
      su[2 * j] = p11 * ui + p12 * uw + M[4]! * phi[j]!;
      su[2 * j + 1] = p21 * ui + p22 * uw + M[5]! * phi[j]!;
    }
  }
  x[0] = p11 * i + p12 * w + M[4]! * v + M[6]! * tau;
  x[1] = p21 * i + p22 * w + M[5]! * v + M[7]! * tau;
}

/**
 * Locked-rotor advance over h with the rotor held (ω = 0): i⁺ = a·i + (1 − a)·v/R,
 * a = e^{−R·h/L}, with its log-sensitivities to R and L and to the basis coefficients.
 */
function advanceStuck(b: SweepBuffers, s: SweepSpec, h: number, v: number): void {
  const x = b.x;
  const q = (s.R * h) / s.L;
  const a = Math.exp(-q);
  const iss = v / s.R;
  const i = x[0]!;
  if (b.wantJ) {
    x[2] = a * x[2]! - q * a * (i - iss) - (1 - a) * iss;
    x[4] = a * x[4]! + q * a * (i - iss);
    const su = b.su, phi = b.phi, g = (1 - a) / s.R;
    for (let j = 0; j < s.m; j++) su[2 * j] = a * su[2 * j]! + g * phi[j]!;
  }
  x[0] = a * i + (1 - a) * iss;
}

/**
 * One pass of the exact zero-order-hold linear model over a free-shaft recording: writes the
 * whitened current and speed residual rows and their Jacobian rows into the chunk buffers and
 * accumulates full chunks. With Coulomb friction (`s.stuck`) the rotor is held at rest from
 * t = 0 and breaks away at the instant Kt·i − load crosses Tc, located inside the sample
 * interval from the locked-rotor closed form; from then on the model runs with the constant
 * load −Tc·direction. The breakaway time depends on the constants, but its term in the
 * sensitivities, (ẋ⁻ − ẋ⁺)·∂t_b/∂θ, is exactly zero: at t_b the net torque Kt·i − load − Tc is
 * zero, so ω̇ is 0 on both sides, and di/dt = (v − R·i)/L is the same on both sides (ω = 0).
 * Re-sticking after a stop is not modelled (the speed stays on one side of zero in the
 * experiments that use this pass).
 *
 * With `b.effects` set (the score pass) it also writes the four effect columns of
 * `EffectColumns` for every row.
 *
 * Kernel: allocates nothing in the sample loop; returns nothing (rows left in the chunk stay in
 * `b.rows`). It throws only for effect columns asked of a model with Coulomb friction (a stuck
 * start), which its one caller, `scoreLumped`, rules out beforehand.
 *
 * @param b - shared buffers (state is reset here)
 * @param s - the recording at the current constants
 */
export function sweepLinearModel(b: SweepBuffers, s: SweepSpec): void {
  const n = s.n;
  b.x.fill(0);
  b.su.fill(0, 0, 2 * s.m);
  if (b.effects !== null) {
    // The score pass is taken at a lumped fit without Coulomb friction (no stuck start).
    if (s.stuck) throw new RangeError('sweepLinearModel: effect columns need a model without Coulomb friction');
    b.effects.state.fill(0);
  }
  const uniform = s.h === s.h;
  if (uniform) discretise(b, s, s.h, b.slot);
  let k = 0;
  if (s.stuck) {
    const dir = s.direction;
    const iStar = (s.load + dir * s.Tc) / s.Kt;
    // Not stuck at all when the load alone overcomes the breakaway torque at rest.
    if (!(dir * (s.Kt * 0 - s.load) > s.Tc)) {
      for (; k < n; k++) {
        const v = inputAt(s, b.phi, k);
        writeRowsGeneric(b, s, k);
        if (k + 1 >= n) return;
        const h = s.time[k + 1]! - s.time[k]!;
        const i0 = b.x[0]!;
        const iss = v / s.R;
        const iEnd = iss + (i0 - iss) * Math.exp((-s.R * h) / s.L);
        if (dir * (s.Kt * iEnd - s.load) > s.Tc) {
          // Breakaway inside (t_k, t_{k+1}]: i(t) = iss + (i0 − iss)·e^{−R(t − t_k)/L} = iStar.
          let h1 = (s.L / s.R) * Math.log((i0 - iss) / (iStar - iss));
          if (!(h1 >= 0)) h1 = 0;
          if (h1 > h) h1 = h;
          advanceStuck(b, s, h1, v);
          b.x[0] = iStar;
          const h2 = h - h1;
          if (h2 > 0) {
            discretise(b, s, h2, b.slot2);
            advanceGeneric(b, s, b.slot2, v);
          }
          k++;
          break;
        }
        advanceStuck(b, s, h, v);
      }
    }
  }
  if (k >= n) return;
  if (uniform) {
    freeRun(b, s, k, n);
    return;
  }
  // Non-uniform time base: runs of one interval, re-discretised when the interval changes.
  let hC = NaN;
  for (; k < n; k++) {
    if (k + 1 < n) {
      const h = s.time[k + 1]! - s.time[k]!;
      if (h !== hC) { discretise(b, s, h, b.slot); hC = h; }
    }
    freeRun(b, s, k, k + 1);
  }
}

/** Samples [k0, k1) of a free run without sensitivities (residual rows only). */
function freeRunValues(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  const M = b.slot, x = b.x, r = b.r, phi = b.phi;
  const n = s.n;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!, g1 = M[4]!, g2 = M[5]!, t1 = M[6]!, t2 = M[7]!;
  const sI = s.sI, sW = s.sW, off = s.off, tau = s.tau;
  const mi = s.mi, mw = s.mw, outI = s.outI, outW = s.outW;
  const frozenInput = s.m === 0;
  const cls = s.cls, levels = s.levels, input = s.input;
  const xt1 = t1 * tau, xt2 = t2 * tau;
  let i = x[0]!, w = x[1]!;
  let rows = b.rows;
  for (let k = k0; k < k1; k++) {
    const v = cls !== null ? levels[cls[k]!]! : frozenInput ? input[k]! : inputAt(s, phi, k);
    if (mi !== null) {
      const res = i + off - mi[k]!;
      if (outI !== null) outI[k] = res;
      r[rows++] = res * sI;
    }
    if (mw !== null) {
      const res = w - mw[k]!;
      if (outW !== null) outW[k] = res;
      r[rows++] = res * sW;
    }
    if (k + 1 >= n) break;
    const iNext = p11 * i + p12 * w + g1 * v + xt1;
    w = p21 * i + p22 * w + g2 * v + xt2;
    i = iNext;
  }
  b.rows = rows;
  x[0] = i; x[1] = w;
}

/** Samples per call of a run kernel (two rows each fit the chunk). */
const BLOCK = RUN_BLOCK;

/**
 * Dispatches a run to the variant for the wanted outputs, in blocks of `BLOCK` samples: each
 * kernel is then called many times per pass and optimised as a whole function with feedback for
 * every path (one call over 1e6 samples ran in on-stack-replacement code that deoptimised at the
 * loop exit on every pass). Long runs of `freeRunSens` and `freeRunValues` go to their WebAssembly
 * forms (`freeRunInKernel`, the same operations in the same order, the chunk accumulated at the
 * same rows), which are as quick on their first pass as once warm; these loops stay the reference
 * and the fallback.
 */
function freeRun(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  // Long uniform runs without effect columns or a fitted basis: the same loops in WebAssembly.
  if (freeRunInKernel(b, s, k0, k1)) return;
  for (let k = k0; k < k1; k += BLOCK) {
    const e = k + BLOCK < k1 ? k + BLOCK : k1;
    if (b.rows + 2 * (e - k) > b.st) flush(b);
    if (b.effects !== null && b.wantJ) freeRunEffects(b, s, k, e);
    else if (!b.wantJ) freeRunValues(b, s, k, e);
    else if (s.m > 0) freeRunBasis(b, s, k, e);
    else freeRunSens(b, s, k, e);
  }
}

/**
 * The hot loop: samples [k0, k1) of a free run with the matrices in `b.slot` (one interval for
 * the whole run), with the sensitivities to the constants. Scalar locals only, every column
 * written without a branch (absent columns go to the sink column), separate from the other
 * variants so that each is optimised for its own path.
 */
function freeRunSens(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  const M = b.slot, x = b.x, r = b.r, jac = b.jac;
  const n = s.n;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!, g1 = M[4]!, g2 = M[5]!, t1 = M[6]!, t2 = M[7]!;
  const a0 = M[8]!, a1 = M[9]!, a2 = M[10]!, a3 = M[11]!, a4 = M[12]!, a5 = M[13]!, a6 = M[14]!, a7 = M[15]!;
  const b0 = M[16]!, b1 = M[17]!, b2 = M[18]!, b3 = M[19]!, b4 = M[20]!, b5 = M[21]!, b6 = M[22]!, b7 = M[23]!;
  const c0 = M[24]!, c1 = M[25]!, c2 = M[26]!, c3 = M[27]!, c4 = M[28]!, c5 = M[29]!, c6 = M[30]!, c7 = M[31]!;
  const d0 = M[32]!, d1 = M[33]!, d2 = M[34]!, d3 = M[35]!, d4 = M[36]!, d5 = M[37]!, d6 = M[38]!, d7 = M[39]!;
  const e0 = M[40]!, e1 = M[41]!, e2 = M[42]!, e3 = M[43]!, e4 = M[44]!, e5 = M[45]!, e6 = M[46]!, e7 = M[47]!;
  const f0 = M[48]!, f1 = M[49]!, f2 = M[50]!, f3 = M[51]!, f4 = M[52]!, f5 = M[53]!, f6 = M[54]!, f7 = M[55]!;
  const col = s.col;
  const cA = col[0]!, cB = col[1]!, cC = col[2]!, cD = col[3]!, cE = col[4]!, cF = col[5]!, cT = col[6]!, cLd = col[7]!, cO = col[8]!;
  const sI = s.sI, sW = s.sW, off = s.off, tau = s.tau;
  const tcI = s.tcW * sI, ldI = s.ldW * sI, tcW = s.tcW * sW, ldW = s.ldW * sW, offI = s.offW * sI;
  const mi = s.mi, mw = s.mw, outI = s.outI, outW = s.outW;
  const cls = s.cls, levels = s.levels, input = s.input;
  // Constant input terms of the slot recursions: Γτ-derivatives times the load.
  const at = a6 * tau, at2 = a7 * tau, bt = b6 * tau, bt2 = b7 * tau, ct = c6 * tau, ct2 = c7 * tau;
  const dt = d6 * tau, dt2 = d7 * tau, et = e6 * tau, et2 = e7 * tau, ft = f6 * tau, ft2 = f7 * tau;
  const xt1 = t1 * tau, xt2 = t2 * tau;
  let i = x[0]!, w = x[1]!;
  let ai = x[2]!, aw = x[3]!, bi = x[4]!, bw = x[5]!, ci = x[6]!, cw = x[7]!;
  let di = x[8]!, dw = x[9]!, ei = x[10]!, ew = x[11]!, fi = x[12]!, fw = x[13]!, ti = x[14]!, tw = x[15]!;
  let rows = b.rows;
  for (let k = k0; k < k1; k++) {
    const v = cls === null ? input[k]! : levels[cls[k]!]!;
    if (mi !== null) {
      const res = i + off - mi[k]!;
      if (outI !== null) outI[k] = res;
      r[rows] = res * sI;
      {
        jac[cA + rows] = ai * sI;
        jac[cB + rows] = bi * sI;
        jac[cC + rows] = ci * sI;
        jac[cD + rows] = di * sI;
        jac[cE + rows] = ei * sI;
        jac[cF + rows] = fi * sI;
        jac[cT + rows] = ti * tcI;
        jac[cLd + rows] = ti * ldI;
        jac[cO + rows] = offI;
      }
      rows++;
    }
    if (mw !== null) {
      const res = w - mw[k]!;
      if (outW !== null) outW[k] = res;
      r[rows] = res * sW;
      {
        jac[cA + rows] = aw * sW;
        jac[cB + rows] = bw * sW;
        jac[cC + rows] = cw * sW;
        jac[cD + rows] = dw * sW;
        jac[cE + rows] = ew * sW;
        jac[cF + rows] = fw * sW;
        jac[cT + rows] = tw * tcW;
        jac[cLd + rows] = tw * ldW;
        jac[cO + rows] = 0;
      }
      rows++;
    }
    if (k + 1 >= n) break;
    {
      let z = ai;
      ai = p11 * z + p12 * aw + a0 * i + a1 * w + a4 * v + at;
      aw = p21 * z + p22 * aw + a2 * i + a3 * w + a5 * v + at2;
      z = bi;
      bi = p11 * z + p12 * bw + b0 * i + b1 * w + b4 * v + bt;
      bw = p21 * z + p22 * bw + b2 * i + b3 * w + b5 * v + bt2;
      z = ci;
      ci = p11 * z + p12 * cw + c0 * i + c1 * w + c4 * v + ct;
      cw = p21 * z + p22 * cw + c2 * i + c3 * w + c5 * v + ct2;
      z = di;
      di = p11 * z + p12 * dw + d0 * i + d1 * w + d4 * v + dt;
      dw = p21 * z + p22 * dw + d2 * i + d3 * w + d5 * v + dt2;
      z = ei;
      ei = p11 * z + p12 * ew + e0 * i + e1 * w + e4 * v + et;
      ew = p21 * z + p22 * ew + e2 * i + e3 * w + e5 * v + et2;
      z = fi;
      fi = p11 * z + p12 * fw + f0 * i + f1 * w + f4 * v + ft;
      fw = p21 * z + p22 * fw + f2 * i + f3 * w + f5 * v + ft2;
      z = ti;
      ti = p11 * z + p12 * tw + t1;
      tw = p21 * z + p22 * tw + t2;
    }
    const iNext = p11 * i + p12 * w + g1 * v + xt1;
    w = p21 * i + p22 * w + g2 * v + xt2;
    i = iNext;
  }
  b.rows = rows;
  x[0] = i; x[1] = w;
  x[2] = ai; x[3] = aw; x[4] = bi; x[5] = bw; x[6] = ci; x[7] = cw;
  x[8] = di; x[9] = dw; x[10] = ei; x[11] = ew; x[12] = fi; x[13] = fw; x[14] = ti; x[15] = tw;
}

/**
 * `freeRun` with the sensitivities to fitted input-basis coefficients (the joint polish).
 */
function freeRunBasis(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  const M = b.slot, x = b.x, r = b.r, jac = b.jac, su = b.su, phi = b.phi;
  const n = s.n, wantJ = true;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!, g1 = M[4]!, g2 = M[5]!, t1 = M[6]!, t2 = M[7]!;
  const a0 = M[8]!, a1 = M[9]!, a2 = M[10]!, a3 = M[11]!, a4 = M[12]!, a5 = M[13]!, a6 = M[14]!, a7 = M[15]!;
  const b0 = M[16]!, b1 = M[17]!, b2 = M[18]!, b3 = M[19]!, b4 = M[20]!, b5 = M[21]!, b6 = M[22]!, b7 = M[23]!;
  const c0 = M[24]!, c1 = M[25]!, c2 = M[26]!, c3 = M[27]!, c4 = M[28]!, c5 = M[29]!, c6 = M[30]!, c7 = M[31]!;
  const d0 = M[32]!, d1 = M[33]!, d2 = M[34]!, d3 = M[35]!, d4 = M[36]!, d5 = M[37]!, d6 = M[38]!, d7 = M[39]!;
  const e0 = M[40]!, e1 = M[41]!, e2 = M[42]!, e3 = M[43]!, e4 = M[44]!, e5 = M[45]!, e6 = M[46]!, e7 = M[47]!;
  const f0 = M[48]!, f1 = M[49]!, f2 = M[50]!, f3 = M[51]!, f4 = M[52]!, f5 = M[53]!, f6 = M[54]!, f7 = M[55]!;
  const col = s.col;
  const cA = col[0]!, cB = col[1]!, cC = col[2]!, cD = col[3]!, cE = col[4]!, cF = col[5]!, cT = col[6]!, cLd = col[7]!, cO = col[8]!;
  const sI = s.sI, sW = s.sW, off = s.off, tau = s.tau;
  const tcI = s.tcW * sI, ldI = s.ldW * sI, tcW = s.tcW * sW, ldW = s.ldW * sW, offI = s.offW * sI;
  const mi = s.mi, mw = s.mw, outI = s.outI, outW = s.outW;
  const m = s.m, colU = s.colU, uI = s.uScale * sI, uW = s.uScale * sW;
  const frozenInput = m === 0;
  const cls = s.cls, levels = s.levels, input = s.input;
  // Constant input terms of the slot recursions: Γτ-derivatives times the load.
  const at = a6 * tau, at2 = a7 * tau, bt = b6 * tau, bt2 = b7 * tau, ct = c6 * tau, ct2 = c7 * tau;
  const dt = d6 * tau, dt2 = d7 * tau, et = e6 * tau, et2 = e7 * tau, ft = f6 * tau, ft2 = f7 * tau;
  const xt1 = t1 * tau, xt2 = t2 * tau;
  let i = x[0]!, w = x[1]!;
  let ai = x[2]!, aw = x[3]!, bi = x[4]!, bw = x[5]!, ci = x[6]!, cw = x[7]!;
  let di = x[8]!, dw = x[9]!, ei = x[10]!, ew = x[11]!, fi = x[12]!, fw = x[13]!, ti = x[14]!, tw = x[15]!;
  let rows = b.rows;
  for (let k = k0; k < k1; k++) {
    const q = cls === null ? -1 : cls[k]!;
    const v = q >= 0 ? levels[q]! : frozenInput ? input[k]! : inputAt(s, phi, k);
    if (mi !== null) {
      const res = i + off - mi[k]!;
      if (outI !== null) outI[k] = res;
      r[rows] = res * sI;
      if (wantJ) {
        jac[cA + rows] = ai * sI;
        jac[cB + rows] = bi * sI;
        jac[cC + rows] = ci * sI;
        jac[cD + rows] = di * sI;
        jac[cE + rows] = ei * sI;
        jac[cF + rows] = fi * sI;
        jac[cT + rows] = ti * tcI;
        jac[cLd + rows] = ti * ldI;
        jac[cO + rows] = offI;
        for (let j = 0; j < m; j++) jac[colU[j]! + rows] = su[2 * j]! * uI;
      }
      rows++;
    }
    if (mw !== null) {
      const res = w - mw[k]!;
      if (outW !== null) outW[k] = res;
      r[rows] = res * sW;
      if (wantJ) {
        jac[cA + rows] = aw * sW;
        jac[cB + rows] = bw * sW;
        jac[cC + rows] = cw * sW;
        jac[cD + rows] = dw * sW;
        jac[cE + rows] = ew * sW;
        jac[cF + rows] = fw * sW;
        jac[cT + rows] = tw * tcW;
        jac[cLd + rows] = tw * ldW;
        jac[cO + rows] = 0;
        for (let j = 0; j < m; j++) jac[colU[j]! + rows] = su[2 * j + 1]! * uW;
      }
      rows++;
    }
    if (k + 1 >= n) break;
    if (wantJ) {
      let z = ai;
      ai = p11 * z + p12 * aw + a0 * i + a1 * w + a4 * v + at;
      aw = p21 * z + p22 * aw + a2 * i + a3 * w + a5 * v + at2;
      z = bi;
      bi = p11 * z + p12 * bw + b0 * i + b1 * w + b4 * v + bt;
      bw = p21 * z + p22 * bw + b2 * i + b3 * w + b5 * v + bt2;
      z = ci;
      ci = p11 * z + p12 * cw + c0 * i + c1 * w + c4 * v + ct;
      cw = p21 * z + p22 * cw + c2 * i + c3 * w + c5 * v + ct2;
      z = di;
      di = p11 * z + p12 * dw + d0 * i + d1 * w + d4 * v + dt;
      dw = p21 * z + p22 * dw + d2 * i + d3 * w + d5 * v + dt2;
      z = ei;
      ei = p11 * z + p12 * ew + e0 * i + e1 * w + e4 * v + et;
      ew = p21 * z + p22 * ew + e2 * i + e3 * w + e5 * v + et2;
      z = fi;
      fi = p11 * z + p12 * fw + f0 * i + f1 * w + f4 * v + ft;
      fw = p21 * z + p22 * fw + f2 * i + f3 * w + f5 * v + ft2;
      z = ti;
      ti = p11 * z + p12 * tw + t1;
      tw = p21 * z + p22 * tw + t2;
      for (let j = 0; j < m; j++) {
        const ui = su[2 * j]!, uw = su[2 * j + 1]!, e = q >= 0 ? (j === q ? 1 : 0) : phi[j]!;
        su[2 * j] = p11 * ui + p12 * uw + g1 * e;
        su[2 * j + 1] = p21 * ui + p22 * uw + g2 * e;
      }
    }
    const iNext = p11 * i + p12 * w + g1 * v + xt1;
    w = p21 * i + p22 * w + g2 * v + xt2;
    i = iNext;
  }
  b.rows = rows;
  x[0] = i; x[1] = w;
  x[2] = ai; x[3] = aw; x[4] = bi; x[5] = bw; x[6] = ci; x[7] = cw;
  x[8] = di; x[9] = dw; x[10] = ei; x[11] = ew; x[12] = fi; x[13] = fw; x[14] = ti; x[15] = tw;
}

/**
 * `freeRun` of the score pass: the fit's rows, Jacobian and state (`freeRunSens` or
 * `freeRunBasis`), then the four effect columns of `b.effects` (see `EffectColumns`) for the same
 * rows. The model's current and speed at each sample are run again from the block's start with the
 * kernels' own operations, so they are the kernels' values to the bit. Recordings without both a
 * current and a speed channel take the generic rows instead.
 */
function freeRunEffects(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  if (s.mi === null || s.mw === null) { freeRunEffectsGeneric(b, s, k0, k1); return; }
  const M = b.slot, x = b.x, jac = b.jac, st = b.st, phi = b.phi;
  const ef = b.effects!, e = ef.state;
  const row0 = b.rows;
  let i = x[0]!, w = x[1]!;
  if (s.m > 0) freeRunBasis(b, s, k0, k1); else freeRunSens(b, s, k0, k1);
  const c0 = ef.col * st, c1 = c0 + st, c2 = c1 + st, c3 = c2 + st;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!, g1 = M[4]!, g2 = M[5]!, t1 = M[6]!, t2 = M[7]!;
  const xt1 = t1 * s.tau, xt2 = t2 * s.tau;
  const n = s.n, tau = ef.tau, kappa = s.R / ef.copper, sI = s.sI, sW = s.sW, time = s.time;
  const cls = s.cls, levels = s.levels, input = s.input, frozenInput = s.m === 0;
  let eTi = e[0]!, eTw = e[1]!, eCi = e[2]!, eCw = e[3]!, eFi = e[4]!, eFw = e[5]!, eGi = e[6]!, eGw = e[7]!, F = e[8]!, G = e[9]!;
  let row = row0;
  for (let k = k0; k < k1; k++) {
    jac[c0 + row] = eTi * sI; jac[c1 + row] = eCi * sI; jac[c2 + row] = eFi * sI; jac[c3 + row] = eGi * sI;
    row++;
    jac[c0 + row] = eTw * sW; jac[c1 + row] = eCw * sW; jac[c2 + row] = eFw * sW; jac[c3 + row] = eGw * sW;
    row++;
    if (k + 1 >= n) break;
    const v = cls !== null ? levels[cls[k]!]! : frozenInput ? input[k]! : inputAt(s, phi, k);
    const h = time[k + 1]! - time[k]!;
    // Inputs held over the interval: load torques sgn ω and ω|ω|, heating voltages −κ·F·i and −κ·G·i.
    const uT = w > 0 ? 1 : w < 0 ? -1 : 0, uC = w * Math.abs(w);
    const P = s.R * i * i, uF = -kappa * F * i, uG = -kappa * G * i;
    let z = eTi;
    eTi = p11 * z + p12 * eTw + t1 * uT; eTw = p21 * z + p22 * eTw + t2 * uT;
    z = eCi;
    eCi = p11 * z + p12 * eCw + t1 * uC; eCw = p21 * z + p22 * eCw + t2 * uC;
    z = eFi;
    eFi = p11 * z + p12 * eFw + g1 * uF; eFw = p21 * z + p22 * eFw + g2 * uF;
    z = eGi;
    eGi = p11 * z + p12 * eGw + g1 * uG; eGw = p21 * z + p22 * eGw + g2 * uG;
    const q = Math.exp(-h / tau);
    const Fn = q * F + (1 - q) * P;
    G = q * G + ((q * h) / tau) * (F - P);
    F = Fn;
    // The kernels' own state update.
    const iNext = p11 * i + p12 * w + g1 * v + xt1;
    w = p21 * i + p22 * w + g2 * v + xt2;
    i = iNext;
  }
  e[0] = eTi; e[1] = eTw; e[2] = eCi; e[3] = eCw; e[4] = eFi; e[5] = eFw; e[6] = eGi; e[7] = eGw; e[8] = F; e[9] = G;
}

/** `freeRunEffects` for a recording without both current and speed: the generic rows and advance, sample by sample. */
function freeRunEffectsGeneric(b: SweepBuffers, s: SweepSpec, k0: number, k1: number): void {
  const M = b.slot, x = b.x, jac = b.jac, st = b.st;
  const ef = b.effects!, e = ef.state;
  const c0 = ef.col * st, c1 = c0 + st, c2 = c1 + st, c3 = c2 + st;
  const p11 = M[0]!, p12 = M[1]!, p21 = M[2]!, p22 = M[3]!, g1 = M[4]!, g2 = M[5]!, t1 = M[6]!, t2 = M[7]!;
  const n = s.n, tau = ef.tau, kappa = s.R / ef.copper;
  for (let k = k0; k < k1; k++) {
    const v = inputAt(s, b.phi, k);
    let row = b.rows;
    writeRowsGeneric(b, s, k);
    for (let ch = 0; ch < 2; ch++) {
      const sc = ch === 0 ? s.sI : s.sW;
      if ((ch === 0 ? s.mi : s.mw) === null) continue;
      jac[c0 + row] = e[ch]! * sc;
      jac[c1 + row] = e[2 + ch]! * sc;
      jac[c2 + row] = e[4 + ch]! * sc;
      jac[c3 + row] = e[6 + ch]! * sc;
      row++;
    }
    if (b.rows >= b.st - 1) flush(b);
    if (k + 1 >= n) break;
    const i = x[0]!, w = x[1]!;
    const h = s.time[k + 1]! - s.time[k]!;
    // Inputs held over the interval: load torques sgn ω and ω|ω|, heating voltages −κ·F·i and −κ·G·i.
    const uT = w > 0 ? 1 : w < 0 ? -1 : 0, uC = w * Math.abs(w);
    const F = e[8]!, G = e[9]!, P = s.R * i * i;
    const uF = -kappa * F * i, uG = -kappa * G * i;
    for (let j = 0; j < 4; j++) {
      const a = e[2 * j]!, bw = e[2 * j + 1]!;
      const gi = j < 2 ? t1 : g1, gw = j < 2 ? t2 : g2;
      const u = j === 0 ? uT : j === 1 ? uC : j === 2 ? uF : uG;
      e[2 * j] = p11 * a + p12 * bw + gi * u;
      e[2 * j + 1] = p21 * a + p22 * bw + gw * u;
    }
    const q = Math.exp(-h / tau);
    e[8] = q * F + (1 - q) * P;
    e[9] = q * G + ((q * h) / tau) * (F - P);
    advanceGeneric(b, s, M, v);
  }
}
