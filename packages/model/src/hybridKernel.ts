import type { DetailedParams } from './types.js';

/**
 * Internal kernel of `simulateHybrid`: the detailed motor model advanced piece by piece in closed
 * form. Not exported from the package; `simulateHybridInto` is the public entry.
 *
 * Modes of the rotor and armature:
 * - RUN: both states free; L·di/dt = u − R·i − Ke·ω, J·dω/dt = Kt·i − b·ω − τ with τ the friction
 *   and load torque, constant over a piece (Coulomb friction has the sign of the running direction;
 *   drag c·ω|ω| is linearised about the piece's midpoint speed, a predictor–corrector step).
 * - STUCK: ω = 0 (static friction holds); L·di/dt = u − R·i; breakaway when |Kt·i − τ_load| > Ts.
 * - LIMIT: the drive's current regulator holds i = ±Imax; J·dω/dt = ±Kt·Imax − b·ω − τ.
 * - OPEN: the armature circuit is open, i = 0; J·dω/dt = −b·ω − τ; the terminals show Ke·ω.
 * - HELD: the rotor is clamped (locked-rotor test): ω = 0 whatever the torque.
 * Every piece is linear with constant coefficients, so its solution is exact (2×2 matrix
 * exponential or a scalar exponential). Events — ω reaching 0, the breakaway torque, |i| reaching
 * Imax, the voltage falling below what the limit needs — are located inside a piece (closed form
 * where the piece is first order, Illinois regula falsi on the closed-form solution otherwise), so
 * the trajectory is a smooth function of the constants between events.
 */

export const RUN = 0;
export const STUCK = 1;
export const LIMIT = 2;
export const OPEN = 3;
export const HELD = 4;

/** Mutable state of the kernel. */
export interface HybridState {
  i: number;
  w: number;
  th: number;
  T: number;
  mode: number;
  /** Running direction for the friction sign (±1). */
  dir: number;
  /** Sign of the limited current in LIMIT mode. */
  lim: number;
}

/** Constants of one simulation, resolved once. */
export interface HybridConstants {
  /** Resistance at the reference temperature [Ω]. */
  R: number;
  L: number;
  Kt: number;
  Ke: number;
  J: number;
  b: number;
  Tc: number;
  Ts: number;
  cd: number;
  Vmax: number;
  Imax: number;
  Rs: number;
  load: number;
  /** Thermal model on. */
  thermal: boolean;
  Rth: number;
  Cth: number;
  ambient: number;
  /** Copper law: R(T) = R·(k + T)/(k + Tref). */
  k: number;
  Tref: number;
}

/** Scratch for the 2×2 solution: E = e^{As} (4), Q = A⁻¹(E − I) (4). */
export interface PieceScratch {
  E: Float64Array;
  Q: Float64Array;
}

/** Resistance at temperature T. */
export function resistanceAt(c: HybridConstants, T: number): number {
  return c.thermal ? (c.R * (c.k + T)) / (c.k + c.Tref) : c.R;
}

/**
 * e^{As} for A = [[a, b], [c, d]] into E (row-major) and ∫₀ˢe^{Aτ}dτ into Q, by the
 * Cayley–Hamilton form f(A) = f₀·I + f₁·(A − μI) with the divided differences of f over the two
 * eigenvalues μ ± √δ; series in z = δ·s² near repeated eigenvalues, so the result is smooth in
 * the entries of A.
 */
export function expm2(a: number, b: number, c: number, d: number, s: number, out: PieceScratch): void {
  // Pieces of a linear run repeat the same matrix and lengths sample after sample (one length, or
  // two where the command's own clock splits each interval): the last few results are reused when
  // every argument is the same, bit for bit, so nothing changes.
  for (let slot = 0; slot < CACHE_SLOTS; slot++) {
    const k = slot * 5;
    if (a === CACHE_KEY[k] && b === CACHE_KEY[k + 1] && c === CACHE_KEY[k + 2] && d === CACHE_KEY[k + 3] && s === CACHE_KEY[k + 4]) {
      const E = out.E, Q = out.Q, o = slot * 4;
      E[0] = CACHE_E[o]!; E[1] = CACHE_E[o + 1]!; E[2] = CACHE_E[o + 2]!; E[3] = CACHE_E[o + 3]!;
      Q[0] = CACHE_Q[o]!; Q[1] = CACHE_Q[o + 1]!; Q[2] = CACHE_Q[o + 2]!; Q[3] = CACHE_Q[o + 3]!;
      return;
    }
  }
  expm2Fresh(a, b, c, d, s, out);
  const slot = cacheNext;
  cacheNext = (cacheNext + 1) % CACHE_SLOTS;
  CACHE_KEY[slot * 5] = a; CACHE_KEY[slot * 5 + 1] = b; CACHE_KEY[slot * 5 + 2] = c; CACHE_KEY[slot * 5 + 3] = d; CACHE_KEY[slot * 5 + 4] = s;
  CACHE_E.set(out.E, slot * 4);
  CACHE_Q.set(out.Q, slot * 4);
}

const CACHE_SLOTS = 4;
const CACHE_KEY = new Float64Array(5 * CACHE_SLOTS).fill(NaN);
const CACHE_E = new Float64Array(4 * CACHE_SLOTS);
const CACHE_Q = new Float64Array(4 * CACHE_SLOTS);
let cacheNext = 0;

function expm2Fresh(a: number, b: number, c: number, d: number, s: number, out: PieceScratch): void {
  const mu = 0.5 * (a + d);
  const h = 0.5 * (a - d);
  const delta = h * h + b * c;
  const z = delta * s * s;
  let f0: number, f1: number;
  const em = Math.exp(mu * s);
  if (Math.abs(z) < 1e-4) {
    // cosh(√z), sinh(√z)/√z and their integrals by series (|z| small).
    const ch = 1 + z / 2 + (z * z) / 24 + (z * z * z) / 720;
    const sh = 1 + z / 6 + (z * z) / 120 + (z * z * z) / 5040;
    f0 = em * ch;
    f1 = em * s * sh;
  } else if (delta > 0) {
    const r = Math.sqrt(delta);
    const e1 = Math.exp((mu + r) * s), e2 = Math.exp((mu - r) * s);
    f0 = 0.5 * (e1 + e2);
    f1 = (0.5 * (e1 - e2)) / r;
  } else {
    const r = Math.sqrt(-delta);
    f0 = em * Math.cos(r * s);
    f1 = (em * Math.sin(r * s)) / r;
  }
  const E = out.E;
  E[0] = f0 + f1 * h;
  E[1] = f1 * b;
  E[2] = f1 * c;
  E[3] = f0 - f1 * h;
  // Q = A⁻¹(E − I): exact for an invertible A (det > 0 for every motor with R, Kt, Ke > 0).
  const det = a * d - b * c;
  const x0 = E[0]! - 1, x1 = E[1]!, x2 = E[2]!, x3 = E[3]! - 1;
  const Q = out.Q;
  // Small s: E − I loses digits; use the series ∫e^{Aτ} = sI + s²A/2 + s³A²/6 + … instead.
  const rho = Math.abs(mu) + Math.sqrt(Math.abs(delta));
  if (rho * s < 1e-3) {
    const a2 = a * a + b * c, b2 = a * b + b * d, c2 = c * a + d * c, d2 = c * b + d * d;
    const s2 = (s * s) / 2, s3 = (s * s * s) / 6;
    Q[0] = s + s2 * a + s3 * a2;
    Q[1] = s2 * b + s3 * b2;
    Q[2] = s2 * c + s3 * c2;
    Q[3] = s + s2 * d + s3 * d2;
  } else {
    Q[0] = (d * x0 - b * x2) / det;
    Q[1] = (d * x1 - b * x3) / det;
    Q[2] = (-c * x0 + a * x2) / det;
    Q[3] = (-c * x1 + a * x3) / det;
  }
}

/** Friction and load torque on the running rotor for direction `dir` at linearisation speed wl: returns [b_eff, τ]. */
function torqueTerms(c: HybridConstants, dir: number, wl: number, out: Float64Array): void {
  // Drag c·ω|ω| ≈ c·wl|wl| + 2c|wl|·(ω − wl) = 2c|wl|·ω − c·wl|wl|.
  const aw = Math.abs(wl);
  out[0] = c.b + 2 * c.cd * aw;
  out[1] = dir * c.Tc + c.load - c.cd * wl * aw;
}

const TT = new Float64Array(2);

/**
 * RUN piece of length s from the state: writes the end state into `end` ([i, ω, Δθ]) without
 * changing `st`. u is the drive voltage after the voltage limit; R the winding resistance plus Rs.
 */
function runPiece(c: HybridConstants, st: HybridState, u: number, Rt: number, s: number, wl: number, sc: PieceScratch, end: Float64Array): void {
  torqueTerms(c, st.dir, wl, TT);
  const be = TT[0]!, tau = TT[1]!;
  const a11 = -Rt / c.L, a12 = -c.Ke / c.L, a21 = c.Kt / c.J, a22 = -be / c.J;
  // Steady state of the piece: A·x + g = 0 with g = [u/L, −τ/J].
  const det = Rt * be + c.Kt * c.Ke;
  const iss = (u * be + c.Ke * tau) / det;
  const wss = (c.Kt * u - Rt * tau) / det;
  expm2(a11, a12, a21, a22, s, sc);
  const e1 = st.i - iss, e2 = st.w - wss;
  const E = sc.E, Q = sc.Q;
  end[0] = iss + E[0]! * e1 + E[1]! * e2;
  end[1] = wss + E[2]! * e1 + E[3]! * e2;
  end[2] = wss * s + Q[2]! * e1 + Q[3]! * e2;
}

/** First-order piece x' = −a·(x − xss): value and integral after s. */
function firstOrder(x0: number, xss: number, a: number, s: number, out: Float64Array): void {
  const as = a * s;
  const E = Math.exp(-as);
  out[0] = xss + (x0 - xss) * E;
  // ∫₀ˢ x = xss·s + (x0 − xss)·(1 − e^{−as})/a, with −expm1 for accuracy at small a·s.
  out[1] = xss * s + (x0 - xss) * (as < 1e-12 ? s : -Math.expm1(-as) / a);
}

const END = new Float64Array(3);
const TRY = new Float64Array(3);
const FO = new Float64Array(2);

/** Tolerance of located events, relative to the piece length. */
const EVENT_TOL = 1e-13;

/**
 * Locates the first root of f on (0, s] given f(0) ≥ 0 > f(s) or f(0) ≤ 0 < f(s) (Illinois regula
 * falsi). A start exactly on the root (f(0) = 0) is moved off it by a hair first.
 */
function locate(f: (x: number) => number, s: number, f0: number, fs: number): number {
  let a = 0, b = s, fa = f0, fb = fs, side = 0;
  if (fa === 0) {
    a = s * 1e-12;
    fa = f(a);
    if (fa === 0 || (fa > 0) === (fb > 0)) return 0;
  }
  for (let it = 0; it < 100; it++) {
    const x = (a * fb - b * fa) / (fb - fa);
    if (!(x > a && x < b)) break;
    const fx = f(x);
    if (fx === 0) return x;
    if ((fx > 0) === (fb > 0)) {
      b = x; fb = fx;
      if (side === -1) fa *= 0.5;
      side = -1;
    } else {
      a = x; fa = fx;
      if (side === 1) fb *= 0.5;
      side = 1;
    }
    if (b - a <= EVENT_TOL * s) break;
  }
  return 0.5 * (a + b);
}

/**
 * Advances the state by s seconds with the held drive voltage uCmd (before the voltage limit),
 * handling every event inside. Returns the number of events located.
 */
export function advance(c: HybridConstants, st: HybridState, uCmd: number, s: number, sc: PieceScratch): number {
  let left = s;
  let events = 0;
  const u = uCmd > c.Vmax ? c.Vmax : uCmd < -c.Vmax ? -c.Vmax : uCmd;
  const friction = c.Tc > 0 || c.Ts > 0;
  for (let guard = 0; left > 0 && guard < 64; guard++) {
    // Winding resistance at the piece's midpoint temperature (predicted from the power now).
    const Rw = c.thermal
      ? resistanceAt(c, st.T + (0.5 * left * (resistanceAt(c, st.T) * st.i * st.i - (st.T - c.ambient) / c.Rth)) / c.Cth)
      : c.R;
    const Rt = Rw + c.Rs;
    const i0 = st.i;
    if (st.mode === HELD || st.mode === STUCK) {
      // ω = 0: first-order armature i' = −a·(i − iss).
      const iss = u / Rt, a = Rt / c.L;
      const pinned = Math.abs(st.i) >= c.Imax && (iss - st.i) * st.i > 0;
      if (pinned) {
        // At the current limit and pushed further: the regulator holds i.
        if (st.mode === STUCK && Math.abs(c.Kt * st.i - c.load) > c.Ts) {
          st.mode = LIMIT; st.lim = st.i > 0 ? 1 : -1; st.dir = st.lim; events++;
          continue;
        }
        thermalStep(c, st, st.i, st.i, Rw, left);
        left = 0;
        continue;
      }
      const at = (target: number): number => {
        const ratio = (target - iss) / (st.i - iss);
        return ratio > 0 && ratio <= 1 ? (-1 / a) * Math.log(ratio) : Infinity;
      };
      let t = Infinity, which = 0, target = 0;
      if (Number.isFinite(c.Imax) && Math.abs(iss) > c.Imax) {
        const tl = at(Math.sign(iss) * c.Imax);
        if (tl < t) { t = tl; which = 1; target = Math.sign(iss) * c.Imax; }
      }
      if (st.mode === STUCK) {
        const iUp = (c.Ts + c.load) / c.Kt, iDn = (-c.Ts + c.load) / c.Kt;
        if (st.i > iUp || st.i < iDn) { st.mode = RUN; st.dir = st.i > iUp ? 1 : -1; events++; continue; }
        if (iss > iUp && st.i <= iUp) { const tb = at(iUp); if (tb < t) { t = tb; which = 2; target = iUp; } }
        if (iss < iDn && st.i >= iDn) { const tb = at(iDn); if (tb < t) { t = tb; which = 3; target = iDn; } }
      }
      if (which === 0 || !(t <= left)) {
        firstOrder(st.i, iss, a, left, FO);
        st.i = FO[0]!;
        thermalStep(c, st, i0, st.i, Rw, left);
        left = 0;
        continue;
      }
      st.i = target;
      thermalStep(c, st, i0, st.i, Rw, t);
      left -= t;
      events++;
      if (which >= 2) { st.mode = RUN; st.dir = which === 2 ? 1 : -1; }
      continue;
    }
    if (st.mode === OPEN) {
      // i = 0: J·ω' = −b_eff·ω − τ.
      st.i = 0;
      if (st.w === 0) {
        if (c.load === 0 || (friction && Math.abs(c.load) <= c.Ts)) {
          thermalStep(c, st, 0, 0, Rw, left);
          left = 0;
          continue;
        }
        st.dir = c.load > 0 ? -1 : 1;
      } else st.dir = st.w > 0 ? 1 : -1;
      torqueTerms(c, st.dir, st.w, TT);
      let a = TT[0]! / c.J, wss = -TT[1]! / TT[0]!;
      firstOrder(st.w, wss, a, left, FO);
      if (c.cd > 0) {
        torqueTerms(c, st.dir, 0.5 * (st.w + FO[0]!), TT);
        a = TT[0]! / c.J; wss = -TT[1]! / TT[0]!;
        firstOrder(st.w, wss, a, left, FO);
      }
      let piece = left;
      let stop = false;
      if (friction && st.dir * FO[0]! < 0) {
        piece = (-1 / a) * Math.log((0 - wss) / (st.w - wss));
        firstOrder(st.w, wss, a, piece, FO);
        stop = true;
        events++;
      }
      st.th += FO[1]!;
      st.w = stop ? 0 : FO[0]!;
      thermalStep(c, st, 0, 0, Rw, piece);
      left -= piece;
      continue;
    }
    if (st.mode === LIMIT) {
      const iL = st.lim * c.Imax;
      // Leave the limit when the drive voltage no longer pushes |i| up: lim·(u − Rt·iL − Ke·ω) < 0.
      if (st.lim * (u - Rt * iL - c.Ke * st.w) < 0) { st.mode = RUN; continue; }
      const wx = (u - Rt * iL) / c.Ke;
      if (st.w !== 0) st.dir = st.w > 0 ? 1 : -1;
      else st.dir = st.lim;
      torqueTerms(c, st.dir, st.w, TT);
      let a = TT[0]! / c.J, wss = (c.Kt * iL - TT[1]!) / TT[0]!;
      firstOrder(st.w, wss, a, left, FO);
      if (c.cd > 0) {
        torqueTerms(c, st.dir, 0.5 * (st.w + FO[0]!), TT);
        a = TT[0]! / c.J; wss = (c.Kt * iL - TT[1]!) / TT[0]!;
        firstOrder(st.w, wss, a, left, FO);
      }
      const wEnd = FO[0]!;
      const hit = (w: number): number => {
        const ratio = (w - wss) / (st.w - wss);
        return ratio > 0 && ratio <= 1 ? (-1 / a) * Math.log(ratio) : Infinity;
      };
      let t = Infinity, which = 0;
      if (st.lim * (u - Rt * iL - c.Ke * wEnd) < 0) { const tx = hit(wx); if (tx < t) { t = tx; which = 1; } }
      if (friction && st.w !== 0 && st.dir * wEnd < 0) { const tz = hit(0); if (tz < t) { t = tz; which = 2; } }
      const piece = which === 0 ? left : Math.min(t, left);
      firstOrder(st.w, wss, a, piece, FO);
      st.th += FO[1]!;
      st.w = which === 2 ? 0 : FO[0]!;
      st.i = iL;
      thermalStep(c, st, iL, iL, Rw, piece);
      left -= piece;
      if (which !== 0) {
        events++;
        if (which === 1) st.mode = RUN;
        else if (Math.abs(c.Kt * iL - c.load) <= c.Ts) st.mode = STUCK;
      }
      continue;
    }
    // RUN.
    if (st.w !== 0) st.dir = st.w > 0 ? 1 : -1;
    let wl = st.w;
    runPiece(c, st, u, Rt, left, wl, sc, END);
    if (c.cd > 0) {
      wl = 0.5 * (st.w + END[1]!);
      runPiece(c, st, u, Rt, left, wl, sc, END);
    }
    let t = Infinity, which = 0;
    if (friction && st.dir * END[1]! < 0) {
      const dir = st.dir;
      const f = (x: number): number => { runPiece(c, st, u, Rt, x, wl, sc, TRY); return dir * TRY[1]!; };
      t = locate(f, left, dir * st.w, dir * END[1]!);
      which = 1;
    }
    if (Math.abs(END[0]!) > c.Imax) {
      const sign = END[0]! > 0 ? 1 : -1;
      const f = (x: number): number => { runPiece(c, st, u, Rt, x, wl, sc, TRY); return sign * TRY[0]! - c.Imax; };
      const f0 = sign * st.i - c.Imax;
      const tl = f0 >= 0 ? 0 : locate(f, left, f0, sign * END[0]! - c.Imax);
      if (tl < t) { t = tl; which = 2; }
    }
    if (which === 0) {
      st.i = END[0]!;
      st.w = END[1]!;
      st.th += END[2]!;
      thermalStep(c, st, i0, st.i, Rw, left);
      left = 0;
      continue;
    }
    runPiece(c, st, u, Rt, t, wl, sc, END);
    st.th += END[2]!;
    thermalStep(c, st, i0, END[0]!, Rw, t);
    left -= t;
    events++;
    if (which === 1) {
      st.i = END[0]!;
      st.w = 0;
      const drive = c.Kt * st.i - c.load;
      if (Math.abs(drive) <= c.Ts) st.mode = STUCK;
      else st.dir = drive > 0 ? 1 : -1;
    } else {
      st.lim = END[0]! > 0 ? 1 : -1;
      st.i = st.lim * c.Imax;
      st.w = END[1]!;
      st.mode = LIMIT;
    }
  }
  return events;
}

/** Winding temperature over a piece: Cth·T' = P − (T − T_amb)/Rth with P = R·mean(i²) held. */
function thermalStep(c: HybridConstants, st: HybridState, ia: number, ib: number, Rw: number, s: number): void {
  if (!c.thermal || !(s > 0)) return;
  const p = (Rw * (ia * ia + ia * ib + ib * ib)) / 3;
  const Tss = c.ambient + p * c.Rth;
  st.T = Tss + (st.T - Tss) * Math.exp(-s / (c.Rth * c.Cth));
}

/**
 * The running steady state under a held drive voltage u (after the limit): the speed where
 * Kt·(u − Ke·ω)/Rt = b·ω + Tc·sgn ω + cd·ω|ω| + τ_load, with the current that goes with it; at rest
 * (stuck) when the stall torque cannot break the rotor free; the current limit caps the current.
 * Writes [i, ω, mode] into out.
 */
export function steadyState(c: HybridConstants, uCmd: number, T: number, out: Float64Array): void {
  const u = uCmd > c.Vmax ? c.Vmax : uCmd < -c.Vmax ? -c.Vmax : uCmd;
  const Rt = resistanceAt(c, T) + c.Rs;
  const friction = c.Tc > 0 || c.Ts > 0;
  const stall = c.Kt * Math.max(-c.Imax, Math.min(c.Imax, u / Rt)) - c.load;
  if (friction && Math.abs(stall) <= c.Ts) {
    out[0] = Math.max(-c.Imax, Math.min(c.Imax, u / Rt)); out[1] = 0; out[2] = STUCK;
    return;
  }
  const dir = stall >= 0 ? 1 : -1;
  // cd·dir·ω² + (b + Kt·Ke/Rt)·ω + (Tc·dir + load − Kt·u/Rt) = 0, root on the side of dir.
  const B = c.b + (c.Kt * c.Ke) / Rt;
  const C = dir * c.Tc + c.load - (c.Kt * u) / Rt;
  let w: number;
  if (c.cd > 0) {
    const A = c.cd * dir;
    const disc = B * B - 4 * A * C;
    // The root continuous in cd as cd → 0: ω = −2C/(B + √disc) (dir > 0) or the mirror.
    w = (-2 * C) / (B + Math.sign(B) * Math.sqrt(Math.max(disc, 0)));
  } else w = -C / B;
  let i = (u - c.Ke * w) / Rt;
  let mode = RUN;
  if (Math.abs(i) > c.Imax) {
    // At the current limit: Kt·Imax·s = b·ω + Tc·dir + cd·ω|ω| + load.
    i = Math.sign(i) * c.Imax;
    const C2 = dir * c.Tc + c.load - c.Kt * i;
    w = c.cd > 0 ? (-2 * C2) / (c.b + Math.sqrt(Math.max(c.b * c.b - 4 * c.cd * dir * C2, 0))) : -C2 / c.b;
    mode = LIMIT;
  }
  out[0] = i; out[1] = w; out[2] = mode;
}

/**
 * Resolves the effect terms of `params` into the kernel's constants (absent terms off).
 */
export function hybridConstants(params: DetailedParams): HybridConstants {
  const Tc = params.Tc ?? 0;
  const thermal = params.Rth !== undefined && params.Cth !== undefined;
  const Tref = params.referenceTemperature ?? 20;
  const ambient = params.ambientTemperature ?? Tref;
  return {
    R: params.R, L: params.L, Kt: params.Kt, Ke: params.Ke, J: params.J, b: params.b,
    Tc, Ts: Math.max(params.Ts ?? Tc, Tc), cd: params.cd ?? 0,
    Vmax: params.Vmax ?? Infinity, Imax: params.Imax ?? Infinity, Rs: params.Rs ?? 0, load: params.loadTorque ?? 0,
    thermal, Rth: params.Rth ?? Infinity, Cth: params.Cth ?? Infinity, ambient,
    k: params.copperConstant ?? 234.5, Tref,
  };
}

