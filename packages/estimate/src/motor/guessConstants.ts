import type { Constants } from './createMotorProblem.js';
import type { PreparedRecording } from './prepareRecording.js';
import { solveSymmetricSystem } from '../solver/solveSymmetricSystem.js';
import { KERNEL_MIN_LENGTH, sampleKernels } from './sampleKernels.js';
import { zeroPhaseLowPass } from './zeroPhaseLowPass.js';

/** Most samples the equation-error guess of a PRBS / multisine reads (common practice, no source: ≈ 0.8 PRBS period of the invented generator at 10 kHz; a start needs no more). */
const GUESS_WINDOW = 16384;

/** Starting values with their source. */
export type ConstantGuesses = { [K in keyof Constants]?: { value: number; source: string } };

/**
 * Initial guesses of the constants from closed-form relations, without help from the user.
 * Locked-rotor: R = ΔV/Δi_ss, L = R·τe from the 63 % current rise. Steady-state sweep: R and Ke
 * from V = R·i + Ke·ω across plateaus, b and Tc from Kt·i = b·ω + Tc (linear least squares), J
 * from the first rise. Free-run step / loaded: R from a locked-rotor guess or the current peak
 * V/i_peak, Ke = (V − R·i_ss)/ω_ss, b = Kt·i_ss/ω_ss, J = τm′·(R·b + Kt·Ke)/R from the 63 % speed
 * rise. PRBS / multisine: equation-error regression of the discretised ODE on zero-phase
 * filtered signals (V on di/dt, i, ω; Kt·i on dω/dt, ω). Coast-down: dω/dt = −(b/J)·ω − Tc/J by
 * linear least squares, scaled by a J from another recording.
 *
 * @param recs - prepared recordings
 * @param fixed - constants pinned by the caller (a pinned J scales the coast-down guesses)
 * @returns the guesses found (constants no recording speaks to are absent)
 */
export function guessConstants(recs: PreparedRecording[], fixed: Partial<Constants> = {}): ConstantGuesses {
  const g: ConstantGuesses = {};
  const set = (k: keyof Constants, value: number, source: string, overwrite = false): void => {
    if (!(Number.isFinite(value) && (k === 'Tc' || value > 0))) return;
    if (g[k] === undefined || overwrite) g[k] = { value, source };
  };
  const order = ['locked-rotor', 'steady-state', 'step', 'loaded', 'prbs', 'multisine', 'coast-down'];
  const sorted = [...recs].sort((a, b) => order.indexOf(a.kind) - order.indexOf(b.kind));
  for (const rec of sorted) {
    const n = rec.time.length;
    const segs = rec.segments;
    const tail = (x: Float64Array, frac: number): number => mean(x, Math.floor(n * (1 - frac)), n);
    if (rec.kind === 'locked-rotor' && rec.current !== null) {
      const i = rec.current;
      const v0 = segs !== null && segs.length > 1 ? segs[0]!.level : 0;
      const v1 = segs !== null ? segs[segs.length - 1]!.level : tail(rec.input, 0.3);
      const kStep = segs !== null && segs.length > 1 ? segs[segs.length - 1]!.start : 0;
      const i0 = kStep > 4 ? mean(i, 0, kStep) : 0;
      const iss = tail(i, 0.3);
      const R = (v1 - v0) / (iss - i0);
      set('R', R, `locked-rotor "${rec.name}": R = ΔV/Δi_ss`, true);
      const t63 = riseTime(rec.time, i, kStep, i0, iss, 0.632);
      const tau = t63 > rec.h ? t63 : fractionalTau(i, kStep, i0, iss, rec.h);
      set('L', R * tau, `locked-rotor "${rec.name}": L = R·τe (63 % rise)`, true);
    } else if (rec.current === null && rec.speed !== null && rec.kind !== 'coast-down' && !rec.table && segs !== null && segs.length >= 3) {
      // Voltage and speed only, several levels: the settled speed of each level on its voltage,
      // ω = g·(V − V0) over the levels where the rotor runs, g = K/(R·b + K²) ≈ 1/K and a dead
      // band V0 = R·Tc/K where friction holds the rotor; J from the first running level's 63 % rise.
      const R = fixed.R ?? g.R?.value ?? NaN;
      const pts: [number, number][] = [];
      for (const sg of segs) {
        const a = sg.start + Math.floor(0.6 * (sg.end - sg.start));
        if (sg.end - a < 3) continue;
        const w = mean(rec.speed, a, sg.end);
        pts.push([sg.level, w]);
      }
      const top = Math.max(...pts.map(([, w]) => Math.abs(w)), 0);
      const run = pts.filter(([v, w]) => Math.abs(w) > 0.05 * top && v * w > 0).map(([v, w]) => [Math.abs(v), Math.abs(w)] as [number, number]);
      if (run.length >= 2) {
        let sv = 0, sw = 0, svv = 0, svw = 0;
        for (const [v, w] of run) { sv += v; sw += w; svv += v * v; svw += v * w; }
        const m = run.length, den = m * svv - sv * sv;
        const gain = den > 0 ? (m * svw - sv * sw) / den : sw / sv;
        const V0 = den > 0 ? Math.max(0, (sv - sw / gain) / m) : 0;
        const K = 1 / gain;
        set('Kt', K, `levels of "${rec.name}": K ≈ 1/(dω/dV) across the running levels`);
        set('Ke', K, `levels of "${rec.name}": Kt = Ke`);
        const Rg = Number.isFinite(R) ? R : 1;
        set('b', 0.05 * K * K / Rg, `levels of "${rec.name}": b at 5 % of the electrical damping K²/R (a start)`);
        set('Tc', (V0 * K) / Rg, `levels of "${rec.name}": Tc = K·V0/R from the dead band V0`);
        const first = segs.findIndex((sg) => Math.abs(sg.level) > V0 * 1.2 && sg.end - sg.start > 8);
        if (first >= 0) {
          const sg = segs[first]!;
          const w0 = first > 0 ? rec.speed[sg.start - 1]! : 0;
          const w1 = mean(rec.speed, sg.start + Math.floor(0.6 * (sg.end - sg.start)), sg.end);
          const tm = riseTime(rec.time, rec.speed, sg.start, w0, w1, 0.632);
          const tau = tm > rec.h ? tm : 0.1 * (rec.time[sg.end - 1]! - rec.time[sg.start]!);
          set('J', (tau * (Rg * g.b!.value + K * K)) / Rg, `levels of "${rec.name}": J = τm′·(R·b + K²)/R from the first running level`);
        }
      }
    } else if (rec.kind === 'steady-state' && rec.current !== null && rec.speed !== null && segs !== null && segs.length >= 2) {
      const V: number[] = [], I: number[] = [], W: number[] = [];
      for (const s of segs) {
        const a = s.start + Math.floor(0.6 * (s.end - s.start));
        if (s.end - a < 3) continue;
        V.push(s.level); I.push(mean(rec.current, a, s.end)); W.push(mean(rec.speed, a, s.end));
      }
      const ls1 = linearFit([I, W], V);
      if (ls1 !== null) {
        set('R', ls1[0]!, `steady-state "${rec.name}": V = R·i + Ke·ω`);
        set('Ke', ls1[1]!, `steady-state "${rec.name}": V = R·i + Ke·ω`);
        set('Kt', ls1[1]!, `steady-state "${rec.name}": Kt = Ke`);
        const K = ls1[1]!;
        const ls2 = linearFit([W, W.map(() => 1)], I.map((x) => K * x));
        if (ls2 !== null) {
          set('b', ls2[0]!, `steady-state "${rec.name}": Kt·i = b·ω + Tc`);
          set('Tc', ls2[1]!, `steady-state "${rec.name}": Kt·i = b·ω + Tc`);
        }
        const s0 = segs[0]!;
        const wEnd = mean(rec.speed, s0.start + Math.floor(0.6 * (s0.end - s0.start)), s0.end);
        const tm = riseTime(rec.time, rec.speed, s0.start, 0, wEnd, 0.632);
        // R may have no guess (a regression that gave R ≤ 0 on a narrow or noisy staircase): J then keeps its default start.
        const R = g.R?.value, b = g.b?.value ?? 0;
        if (R !== undefined) set('J', (tm * (R * b + K * K)) / R, `steady-state "${rec.name}": J = τm′·(R·b + Kt·Ke)/R`);
      }
    } else if ((rec.kind === 'step' || rec.kind === 'loaded') && rec.speed !== null) {
      const kStep = segs !== null && segs.length > 1 ? segs[segs.length - 1]!.start : 0;
      const v1 = segs !== null ? segs[segs.length - 1]!.level : tail(rec.input, 0.2);
      const wss = tail(rec.speed, 0.2);
      const w0 = kStep > 4 ? mean(rec.speed, 0, kStep) : 0;
      const iss = rec.current !== null ? tail(rec.current, 0.2) : NaN;
      let R = g.R?.value ?? NaN;
      if (!Number.isFinite(R) && rec.current !== null) {
        let peak = 0;
        for (let k = Math.max(kStep, 1); k + 1 < n; k++) peak = Math.max(peak, (rec.current[k - 1]! + rec.current[k]! + rec.current[k + 1]!) / 3);
        R = v1 / peak;
        set('R', R, `step "${rec.name}": R ≈ V/i_peak`);
      }
      const K = Number.isFinite(iss) && Number.isFinite(R) ? (v1 - R * iss) / wss : v1 / wss;
      set('Ke', K, `step "${rec.name}": Ke = (V − R·i_ss)/ω_ss`);
      set('Kt', K, `step "${rec.name}": Kt = Ke`);
      const load = rec.loadTorque;
      const b = Number.isFinite(iss) ? (K * iss - load) / wss : NaN;
      set('b', b > 0 ? b : 1e-3 * K * K / (Number.isFinite(R) ? R : 1), `step "${rec.name}": b = Kt·i_ss/ω_ss`);
      const tm = riseTime(rec.time, rec.speed, kStep, w0, wss, 0.632);
      const Rg = Number.isFinite(R) ? R : 1;
      set('J', (tm * (Rg * g.b!.value + K * K)) / Rg, `step "${rec.name}": J = τm′·(R·b + Kt·Ke)/R`);
      if (rec.current !== null && g.L === undefined) {
        let kPeak = kStep, peak = -Infinity;
        for (let k = kStep; k < n; k++) if (rec.current[k]! > peak) { peak = rec.current[k]!; kPeak = k; }
        const tp = Math.max(rec.time[kPeak]! - rec.time[kStep]!, rec.h);
        set('L', (Rg * tp) / 3, `step "${rec.name}": L = R·t_peak/3 (rough)`);
      }
    } else if ((rec.kind === 'prbs' || rec.kind === 'multisine') && rec.current !== null && rec.speed !== null) {
      let cut = Math.min(0.1 / rec.h, 0.4 / rec.h);
      if (rec.encoder !== null) {
        // A speed from encoder counts moves in steps of q/h: low-pass it (and, below, every signal
        // of the equation alike, which keeps the linear relation exact) until the step noise,
        // q·2π·fc/√12 after the filter, is about 1 % of the speed's span (common practice, no source).
        let span = 0;
        for (let k = 0; k < Math.min(n, GUESS_WINDOW); k++) span = Math.max(span, Math.abs(rec.speed[k]!));
        const fc = (0.01 * span * Math.sqrt(12)) / (2 * Math.PI * rec.encoder);
        if (Number.isFinite(fc) && fc > 0) cut = Math.min(cut, Math.max(fc, 20 / (Math.min(n, GUESS_WINDOW) * rec.h)));
      }
      // A start needs no more than GUESS_WINDOW samples: a window from the first switch of the
      // command (past any pre-trigger baseline) keeps the cost O(1) on long records.
      const len = Math.min(n, GUESS_WINDOW);
      let k0 = 0;
      if (rec.handling.stepTime !== null && n > len) {
        let k = 0;
        while (k < n && rec.time[k]! < rec.handling.stepTime) k++;
        k0 = Math.min(Math.max(k - 8, 0), n - len);
      }
      const i = zeroPhaseLowPass(rec.current.subarray(k0, k0 + len), rec.h, cut);
      const w = zeroPhaseLowPass(rec.speed.subarray(k0, k0 + len), rec.h, cut);
      const di = derivative(i, rec.h), dw = derivative(w, rec.h);
      // The input through the same filter: V = L·di/dt + R·i + Ke·ω holds for the filtered signals.
      const u = zeroPhaseLowPass(rec.input.subarray(k0, k0 + len), rec.h, cut);
      const e1 = linearFit([di, i, w], u);
      if (e1 !== null) {
        set('L', e1[0]!, `${rec.kind} "${rec.name}": equation error V = L·di/dt + R·i + Ke·ω`);
        set('R', e1[1]!, `${rec.kind} "${rec.name}": equation error`);
        set('Ke', e1[2]!, `${rec.kind} "${rec.name}": equation error`);
        set('Kt', e1[2]!, `${rec.kind} "${rec.name}": Kt = Ke`);
        const K = e1[2]!;
        const Ki = new Float64Array(i.length);
        for (let k = 0; k < Ki.length; k++) Ki[k] = K * i[k]!;
        const e2 = linearFit([dw, w], Ki);
        if (e2 !== null) {
          set('J', e2[0]!, `${rec.kind} "${rec.name}": equation error Kt·i = J·dω/dt + b·ω`);
          set('b', e2[1]!, `${rec.kind} "${rec.name}": equation error`);
        }
      }
    } else if (rec.kind === 'coast-down' && rec.speed !== null) {
      if (rec.drivenBeforeCut && rec.drive !== null && rec.first > 4) {
        // The driven plateau before the cut and the open-circuit voltage after it.
        const k1 = rec.first;
        const V0 = mean(rec.drive, 0, k1 - 1), w0 = mean(rec.speed, 0, k1 - 1);
        let sv = 0, sw = 0;
        for (let k = k1 + 1; k < n; k++) { sv += rec.drive[k]! * rec.speed[k]!; sw += rec.speed[k]! * rec.speed[k]!; }
        const Ke = sw > 0 ? sv / sw : NaN;
        if (Number.isFinite(Ke) && Ke > 0) {
          set('Ke', Ke, `coast-down "${rec.name}": open-circuit voltage = Ke·ω`, true);
          set('Kt', Ke, `coast-down "${rec.name}": Kt = Ke`, true);
          if (rec.current !== null) {
            const i0 = mean(rec.current, 0, k1 - 1);
            set('R', (V0 - Ke * w0) / i0, `coast-down "${rec.name}": R = (V − Ke·ω)/i on the driven plateau`, true);
            set('b', (Ke * i0) / w0, `coast-down "${rec.name}": b = Kt·i/ω on the driven plateau`, true);
          }
        }
        // Decay rate from ln ω over the first half of the fall.
        const X: number[] = [], Y: number[] = [], C: number[] = [];
        for (let k = k1; k < n; k++) {
          const w = rec.speed[k]! * rec.direction;
          if (w > 0.5 * Math.abs(w0)) { X.push(rec.time[k]! - rec.time[k1]!); Y.push(Math.log(w)); C.push(1); }
        }
        const ls = linearFit([X, C], Y);
        if (ls !== null && g.b !== undefined && -ls[0]! > 0) set('J', g.b.value / -ls[0]!, `coast-down "${rec.name}": J = b/(decay rate)`, true);
        continue;
      }
      const seg = rec.speed.subarray(rec.first);
      const w = zeroPhaseLowPass(seg, rec.h, 0.05 / rec.h);
      const dw = derivative(w, rec.h);
      const w0 = Math.abs(w[0]!);
      const X: number[] = [], Y: number[] = [], C: number[] = [];
      for (let k = 2; k + 2 < w.length; k++) if (Math.abs(w[k]!) > 0.02 * w0) { X.push(w[k]! * rec.direction); C.push(1); Y.push(-dw[k]! * rec.direction); }
      const ls = linearFit([X, C], Y);
      const J = fixed.J ?? g.J?.value ?? 1e-4;
      if (g.J === undefined && fixed.J === undefined) set('J', J, `coast-down "${rec.name}": a unit for the ratios to J (J is not seen from speed alone)`);
      if (ls !== null) {
        set('b', ls[0]! * J, `coast-down "${rec.name}": dω/dt = −(b/J)·ω − Tc/J`);
        set('Tc', ls[1]! * J, `coast-down "${rec.name}": dω/dt = −(b/J)·ω − Tc/J`);
      }
    }
  }
  return g;
}

function mean(x: ArrayLike<number>, a: number, b: number): number {
  let s = 0;
  for (let k = a; k < b; k++) s += x[k]!;
  return s / Math.max(b - a, 1);
}

/** Time from sample k0 until x first passes x0 + f·(x1 − x0), linearly interpolated [s]. */
function riseTime(t: Float64Array, x: Float64Array, k0: number, x0: number, x1: number, f: number): number {
  const target = x0 + f * (x1 - x0);
  const up = x1 > x0;
  for (let k = k0 + 1; k < x.length; k++) {
    if (up ? x[k]! >= target : x[k]! <= target) {
      const a = x[k - 1]!, b = x[k]!;
      const frac = b !== a ? (target - a) / (b - a) : 1;
      return t[k - 1]! + Math.min(Math.max(frac, 0), 1) * (t[k]! - t[k - 1]!) - t[k0]!;
    }
  }
  return t[t.length - 1]! - t[k0]!;
}

/** τ from the fraction reached one sample after the step: f = 1 − e^{−h/τ}. */
function fractionalTau(x: Float64Array, k0: number, x0: number, x1: number, h: number): number {
  const f = (x[k0 + 1]! - x0) / (x1 - x0);
  return f > 0 && f < 1 ? -h / Math.log(1 - f) : h / 10;
}

/** Central-difference derivative of a smoothed series [unit/s] (through the sample kernel for long series: the same bits). */
function derivative(x: Float64Array, h: number): Float64Array {
  return (x.length >= KERNEL_MIN_LENGTH ? derivativeKernel(x, h) : null) ?? derivativePlain(x, h);
}

/** {@link derivative} through the WebAssembly kernel (sampleKernels.wat); null where it cannot run (exported for the tests). */
export function derivativeKernel(x: Float64Array, h: number): Float64Array | null {
  const n = x.length;
  if (n < 2) return null;
  const room = sampleKernels.room(16 * n);
  if (room === null) return null;
  room.f64.set(x, 0);
  room.exports.derivative(0, n, h, 8 * n);
  return room.f64.slice(n, 2 * n);
}

/** {@link derivative} in plain JavaScript (the reference of the kernel and its fallback; exported for the tests). */
export function derivativePlain(x: Float64Array, h: number): Float64Array {
  const n = x.length;
  const d = new Float64Array(n);
  for (let k = 1; k + 1 < n; k++) d[k] = (x[k + 1]! - x[k - 1]!) / (2 * h);
  d[0] = (x[1]! - x[0]!) / h;
  d[n - 1] = (x[n - 1]! - x[n - 2]!) / h;
  return d;
}

/** Ordinary least squares y ≈ Σ cols[j]·β_j by the normal equations. */
function linearFit(cols: ArrayLike<number>[], y: ArrayLike<number>): Float64Array | null {
  const { A, b } = (y.length >= KERNEL_MIN_LENGTH ? crossSumsKernel(cols, y) : null) ?? crossSums(cols, y);
  return solveSymmetricSystem(A, b, cols.length);
}

/**
 * The normal equations' sums A = XᵀX (both triangles) and b = Xᵀy, each a plain sum over the rows in
 * order. Plain JavaScript: the reference of {@link crossSumsKernel} and its fallback (exported for the tests).
 */
export function crossSums(cols: ArrayLike<number>[], y: ArrayLike<number>): { A: Float64Array; b: Float64Array } {
  const p = cols.length;
  const n = y.length;
  const A = new Float64Array(p * p);
  const b = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    const ci = cols[i]!;
    let s = 0;
    for (let k = 0; k < n; k++) s += ci[k]! * y[k]!;
    b[i] = s;
    for (let j = i; j < p; j++) {
      const cj = cols[j]!;
      let q = 0;
      for (let k = 0; k < n; k++) q += ci[k]! * cj[k]!;
      A[i * p + j] = q;
      A[j * p + i] = q;
    }
  }
  return { A, b };
}

/** {@link crossSums} through the WebAssembly kernel (sampleKernels.wat): the same bits; null where it cannot run or a column is shorter than y. */
export function crossSumsKernel(cols: ArrayLike<number>[], y: ArrayLike<number>): { A: Float64Array; b: Float64Array } | null {
  const p = cols.length;
  const n = y.length;
  if (cols.some((c) => c.length < n)) return null;
  const yAt = p * n, outAt = yAt + n;
  const room = sampleKernels.room(8 * (outAt + p * p + p));
  if (room === null) return null;
  const { f64, exports: k } = room;
  for (let j = 0; j < p; j++) {
    const c = cols[j]!;
    if (c instanceof Float64Array) f64.set(c.length === n ? c : c.subarray(0, n), j * n);
    else for (let r = 0; r < n; r++) f64[j * n + r] = c[r]!;
  }
  if (y instanceof Float64Array) f64.set(y, yAt);
  else for (let r = 0; r < n; r++) f64[yAt + r] = y[r]!;
  k.crossSums(0, p, n, 8 * yAt, 8 * outAt);
  return { A: f64.slice(outAt, outAt + p * p), b: f64.slice(outAt + p * p, outAt + p * p + p) };
}
