/**
 * Internal machinery of `simulateDetailed`: the right-hand side of the detailed model and one
 * Dormand–Prince 5(4) step. Not exported from the package.
 */

/** Number of integrated components: i, ω, θ, T, then the energy integrals. */
export const NV = 10;
// Component indices.
export const I = 0, W = 1, TH = 2, TEMP = 3, EIN = 4, ECU = 5, EFR = 6, ELD = 7, ESRC = 8, EMIS = 9;

/** Resolved constants and the switching state of the detailed model. */
export interface DetailedContext {
  R: number; L: number; Kt: number; Ke: number; Jtot: number; b: number;
  Tc: number; Ts: number; cd: number; Vmax: number; Imax: number; Rs: number;
  thermal: boolean; k: number; Tref: number; Tamb: number; Rth: number; Cth: number;
  loadTorque: number; loadDamping: number;
  /** Commanded voltage held over the current interval [V]. */
  v: number;
  /** Armature open (i ≡ 0). */
  open: boolean;
  /** Rotor held by static friction. */
  stuck: boolean;
  /** Direction of motion used for sgn(ω) at ω = 0 while sliding. */
  dir: number;
  /** Terminal voltage of the last rhs call [V]. */
  vt: number;
  k1: Float64Array; k2: Float64Array; k3: Float64Array; k4: Float64Array;
  k5: Float64Array; k6: Float64Array; k7: Float64Array; tmp: Float64Array;
}

/** Right-hand side dy/dt of the detailed model at state y. */
export function rhs(c: DetailedContext, y: Float64Array, dy: Float64Array): void {
  const i = c.open ? 0 : y[I]!;
  const w = c.stuck ? 0 : y[W]!;
  const T = y[TEMP]!;
  const Rt = c.thermal ? (c.R * (c.k + T)) / (c.k + c.Tref) : c.R;
  let di = 0;
  let vt: number;
  if (c.open) {
    vt = c.Ke * w;
  } else {
    let vc = c.v;
    if (vc > c.Vmax) vc = c.Vmax;
    else if (vc < -c.Vmax) vc = -c.Vmax;
    vt = vc - c.Rs * i;
    di = (vt - Rt * i - c.Ke * w) / c.L;
    if ((i >= c.Imax && di > 0) || (i <= -c.Imax && di < 0)) {
      di = 0;
      vt = Rt * i + c.Ke * w;
    }
  }
  c.vt = vt;
  let dw = 0;
  const aw = w < 0 ? -w : w;
  if (!c.stuck) {
    const sg = w > 0 ? 1 : w < 0 ? -1 : c.dir;
    dw = (c.Kt * i - c.b * w - c.Tc * sg - c.cd * w * aw - c.loadTorque - c.loadDamping * w) / c.Jtot;
  }
  dy[I] = di;
  dy[W] = dw;
  dy[TH] = w;
  dy[TEMP] = c.thermal ? (i * i * Rt - (T - c.Tamb) / c.Rth) / c.Cth : 0;
  dy[EIN] = vt * i;
  dy[ECU] = Rt * i * i;
  dy[EFR] = c.b * w * w + c.Tc * aw + c.cd * aw * aw * aw;
  dy[ELD] = (c.loadTorque + c.loadDamping * w) * w;
  dy[ESRC] = c.open ? 0 : c.Rs * i * i;
  dy[EMIS] = (c.Ke - c.Kt) * i * w;
}

/**
 * One Dormand–Prince 5(4) step of size h from y (the first stage derivative must be in c.k1).
 * Writes the 5th-order solution into y1 and returns the scaled error norm over i, ω, T
 * (≤ 1 means accept).
 */
export function dpStep(c: DetailedContext, y: Float64Array, h: number, y1: Float64Array, sc: Float64Array, rtol: number): number {
  const { k1, k2, k3, k4, k5, k6, k7, tmp } = c;
  for (let j = 0; j < NV; j++) tmp[j] = y[j]! + h * (0.2 * k1[j]!);
  rhs(c, tmp, k2);
  for (let j = 0; j < NV; j++) tmp[j] = y[j]! + h * ((3 / 40) * k1[j]! + (9 / 40) * k2[j]!);
  rhs(c, tmp, k3);
  for (let j = 0; j < NV; j++) tmp[j] = y[j]! + h * ((44 / 45) * k1[j]! - (56 / 15) * k2[j]! + (32 / 9) * k3[j]!);
  rhs(c, tmp, k4);
  for (let j = 0; j < NV; j++) {
    tmp[j] = y[j]! + h * ((19372 / 6561) * k1[j]! - (25360 / 2187) * k2[j]! + (64448 / 6561) * k3[j]! - (212 / 729) * k4[j]!);
  }
  rhs(c, tmp, k5);
  for (let j = 0; j < NV; j++) {
    tmp[j] = y[j]! + h * ((9017 / 3168) * k1[j]! - (355 / 33) * k2[j]! + (46732 / 5247) * k3[j]! + (49 / 176) * k4[j]! - (5103 / 18656) * k5[j]!);
  }
  rhs(c, tmp, k6);
  for (let j = 0; j < NV; j++) {
    y1[j] = y[j]! + h * ((35 / 384) * k1[j]! + (500 / 1113) * k3[j]! + (125 / 192) * k4[j]! - (2187 / 6784) * k5[j]! + (11 / 84) * k6[j]!);
  }
  rhs(c, y1, k7);
  let err = 0;
  for (let j = 0; j < 4; j++) {
    if (j === TH) continue;
    const e = h * ((71 / 57600) * k1[j]! - (71 / 16695) * k3[j]! + (71 / 1920) * k4[j]! - (17253 / 339200) * k5[j]! + (22 / 525) * k6[j]! - (1 / 40) * k7[j]!);
    const ay = Math.max(Math.abs(y[j]!), Math.abs(y1[j]!));
    const r = e / (sc[j]! + rtol * ay);
    err += r * r;
  }
  return Math.sqrt(err / 3);
}
