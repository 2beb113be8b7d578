import { simulateHybridInto, steadyStateInto } from '@motorprint/model';
import type { DetailedParams, HybridPlan, HybridTrace } from '@motorprint/model';
import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import type { LeastSquaresProblem, NormalEquations } from '../solver/types.js';
import type { PreparedRecording } from '../motor/prepareRecording.js';
import type { ModelExtensions, ThetaEntry } from './types.js';

/** Names of the shared constants the detailed model uses. */
export const DETAILED_CONSTANTS = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rth', 'Cth'] as const;
export type DetailedConstant = (typeof DETAILED_CONSTANTS)[number];
export type DetailedValues = Record<DetailedConstant, number>;

/** Where each nuisance of one recording sits in θ (−1: absent). */
export interface DetailedSlots {
  /** Input level classes (errors in variables). */
  level: number[];
  /** Sine-fit input coefficients (errors in variables). */
  sine: number[];
  /** Current-sensor offset [A]. */
  offset: number;
  /** Initial speed of a speed-only coast-down, or of a coast-down with its driven part [rad/s]. */
  w0: number;
  /** Initial current of a coast-down with its driven part [A]. */
  i0: number;
  /** Angle offset of an encoder record [rad]. */
  angle: number;
  /** Instant the circuit opens in a coast-down [s]. */
  cut: number;
}

/** Everything the detailed problem needs besides θ. */
export interface DetailedSetup {
  recs: PreparedRecording[];
  entries: ThetaEntry[];
  /** θ index of each shared constant, −1 when it is not fitted (`values` then holds it). */
  index: Record<DetailedConstant, number>;
  /** Values of the constants that are not fitted (and defaults for the others). */
  values: DetailedValues;
  /** Kt = Ke (one θ entry `K`). */
  tied: boolean;
  /** Ts is fitted as ln(Ts − Tc) (stiction above Coulomb). */
  extensions: ModelExtensions;
  /** Ambient (and initial winding) temperature for the heating model [°C]. */
  ambient: number;
  slots: DetailedSlots[];
  /** Noise SDs per recording used to whiten the rows. */
  sigma: { current: number; speed: number; terminal: number; voltage: number }[];
}

/** Residual series of one recording (model − measured, channel units; NaN where not fitted). */
export interface DetailedResiduals {
  current: Float64Array | null;
  speed: Float64Array | null;
  /** Angle residuals of an encoder record [rad] (instead of speed). */
  angle: Float64Array | null;
  /** Terminal-voltage residuals after a coast-down's cut [V]. */
  terminal: Float64Array | null;
}

/** The detailed problem for `solveLeastSquares`, plus views for the caller. */
export interface DetailedProblem extends LeastSquaresProblem {
  /** Constants at θ. */
  valuesAt(theta: ArrayLike<number>): DetailedValues;
  /** Residual series at θ, and the whitened sum of squares per recording and channel. */
  residualsAt(theta: ArrayLike<number>): { series: DetailedResiduals[]; ssr: { current: number; speed: number; terminal: number; rows: { current: number; speed: number; terminal: number } }[] };
  /** Number of residual rows. */
  rows: number;
  /** Simulations run so far (for the record). */
  simulations(): number;
  /** `forward` differences while iterating (p + 1 simulations per Jacobian), `central` for the final covariance. */
  differences: 'forward' | 'central';
  /**
   * The score's covariance by batch means, B = Σ_b G_b·G_bᵀ with G_b = Σ_{k∈b} J_kᵀ·r_k over
   * contiguous batches of about √n rows within each channel of each recording (whitened rows);
   * summary rows (levels, sines) are batches of one. With white residuals B ≈ s²·JᵀJ; residuals
   * that are correlated in time (quantisation of a slow signal, an unmodelled ripple) make it
   * larger, and the sandwich (JᵀJ)⁻¹·B·(JᵀJ)⁻¹ says so. Uses the Jacobian and residuals of the
   * last `evaluate` with `wantJacobian` (call it at θ first). Returns the p×p matrix and the
   * number of batches, or null when there is no Jacobian.
   */
  scoreCovariance(): { meat: Float64Array; batches: number } | null;
}

/** Relative step of the central differences on θ (log entries: relative to the constant). */
const FD_STEP = 1e-6;
/** Forward-difference step (√ε ≈ 1.5e-8, relative for the log-scaled constants). */
const FD_FORWARD = 1.5e-8;

/**
 * Builds the weighted least-squares problem of the detailed motor model over prepared recordings:
 * each recording is simulated with `simulateHybridInto` of `@motorprint/model` (exact between
 * located friction and limit events) and compared with its current, speed (or, for an encoder, the
 * angle), and after a coast-down's cut the open-circuit terminal voltage; the input levels or sine
 * coefficients of an errors-in-variables input add their voltage rows. A table of steady operating
 * points is compared with the model's steady state at each row's voltage.
 *
 * ## Method
 * Residual rows (model − measured)/σ, stacked recording by recording. The Jacobian is taken by
 * finite differences on θ — forward (step 1.5e-8) while the solver iterates, central (step 1e-6,
 * error ~1e-8) for the covariance at the end (`differences`); steps are relative for the
 * log-scaled constants. The simulator is a smooth function of the constants between events and
 * locates events to 1e-13 of a sample. A column re-simulates only the recordings it can move (a
 * nuisance its own recording; L not a coast-down; the mechanical constants not a held rotor). JᵀJ and Jᵀr are accumulated with
 * `accumulateNormalEquations`.
 *
 * @param setup - recordings, layout, fixed values, extensions, noise levels
 * @returns the problem
 */
export function createDetailedProblem(setup: DetailedSetup): DetailedProblem {
  const { recs, entries, index, slots, sigma } = setup;
  const p = entries.length;
  // Row layout.
  const rowStart: number[] = [];
  let rows = 0;
  const counts = recs.map((rec, r) => {
    const n = rec.time.length;
    const c = { current: 0, speed: 0, terminal: 0, levels: 0, sines: 0 };
    if (rec.current !== null && sigma[r]!.current > 0) c.current = n - (rec.kind === 'coast-down' ? 0 : rec.first);
    // A coast-down with its driven plateau is fitted whole (the plateau pins the running state).
    if (rec.speed !== null && rec.kind !== 'locked-rotor') c.speed = n - (rec.drivenBeforeCut ? 0 : rec.first);
    if (rec.terminal !== null && rec.drivenBeforeCut) c.terminal = n - rec.first;
    if (rec.levels !== null) c.levels = 2 * rec.levels.classes.length;
    if (rec.sines !== null) c.sines = rec.sines.coefficients.length + 1;
    rowStart.push(rows);
    rows += c.current + c.speed + c.terminal + c.levels + c.sines;
    return c;
  });
  // The voltage samples behind the closed-form level and sine rows count as rows too (their sum
  // of squares is in those rows): as many as the linear kernel counts, so fits compare.
  let summaryRows = 0;
  for (const rec of recs) {
    if (rec.levels !== null) for (const c of rec.levels.classes) summaryRows += Math.max(c.count - 2, 0);
    if (rec.sines !== null) summaryRows += Math.max(rec.sines.count - (rec.sines.coefficients.length + 1), 0);
  }
  // Buffers per recording.
  const traces: HybridTrace[] = recs.map((rec) => {
    const n = rec.time.length;
    return { current: new Float64Array(n), speed: new Float64Array(n), position: new Float64Array(n), terminalVoltage: new Float64Array(n), temperature: new Float64Array(n), events: 0 };
  });
  const inputs = recs.map((rec) => new Float64Array(rec.grid !== null ? rec.time.length + 1 : rec.time.length));
  const inputTimes = recs.map((rec) => (rec.grid !== null ? Float64Array.from({ length: rec.time.length + 1 }, (_, j) => rec.grid!.start + (j - 1) * rec.grid!.interval) : null));
  // Slot of each sample on the command's clock (the command value the sample saw).
  const slotOf = recs.map((rec) => {
    if (rec.grid === null) return null;
    const g = rec.grid;
    return Int32Array.from(rec.time, (t) => Math.max(0, Math.min(rec.time.length, 1 + Math.floor((t - g.start) / g.interval + 1e-9))));
  });
  // Measured angle of encoder records: θ_k = Σ ω_j·(t_j − t_{j−1}) from the first fitted sample.
  const angles = recs.map((rec) => {
    if (rec.encoder === null || rec.speed === null) return null;
    const a = new Float64Array(rec.time.length);
    const from = rec.kind === 'coast-down' && !rec.drivenBeforeCut ? rec.first : 0;
    for (let k = from + 1; k < a.length; k++) a[k] = a[k - 1]! + rec.speed[k]! * (rec.time[k]! - rec.time[k - 1]!);
    return a;
  });
  let sims = 0;
  // Which shared θ entries move each recording (a coast-down does not see L, a held rotor not J):
  // a Jacobian column skips the recordings it cannot move.
  const moves = recs.map((rec) => {
    const skip = new Set<string>();
    if (rec.kind === 'locked-rotor') for (const c of ['Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax'] as const) skip.add(c);
    if (rec.kind === 'coast-down') skip.add('L');
    if (rec.source !== 'command') { skip.add('Vmax'); skip.add('Imax'); }
    const m = new Uint8Array(p);
    for (let j = 0; j < p; j++) m[j] = 1;
    for (const c of skip) { const j = index[c as DetailedConstant]; if (j >= 0 && !(setup.tied && (c === 'Kt' || c === 'Ke') && rec.kind !== 'locked-rotor')) m[j] = 0; }
    return m;
  });

  const valuesAt = (theta: ArrayLike<number>): DetailedValues => {
    const v = { ...setup.values };
    for (const c of Object.keys(index) as DetailedConstant[]) {
      const j = index[c];
      if (j < 0) continue;
      const e = entries[j]!;
      v[c] = e.transform === 'log' ? Math.exp(theta[j]!) : theta[j]! * e.scale;
    }
    if (setup.tied) v.Ke = v.Kt;
    // Stiction is fitted as ln(Ts − Tc).
    if (index.Ts >= 0) v.Ts = v.Tc + Math.exp(theta[index.Ts]!);
    else if (!setup.extensions.stiction) v.Ts = v.Tc;
    return v;
  };
  const nuisance = (theta: ArrayLike<number>, j: number): number => (j < 0 ? NaN : theta[j]! * entries[j]!.scale);

  const paramsFor = (rec: PreparedRecording, v: DetailedValues): DetailedParams => {
    const ext = setup.extensions;
    const p: DetailedParams = { R: v.R, L: v.L, Kt: v.Kt, Ke: v.Ke, J: v.J, b: v.b };
    if (ext.coulomb) { p.Tc = v.Tc; p.Ts = Math.max(v.Ts, v.Tc); }
    if (ext.drag) p.cd = v.c;
    if (rec.source === 'command') {
      if (ext.voltageLimit) p.Vmax = v.Vmax;
      if (ext.currentLimit) p.Imax = v.Imax;
    }
    if (ext.heating) {
      p.Rth = v.Rth; p.Cth = v.Cth; p.referenceTemperature = 20; p.ambientTemperature = setup.ambient; p.initialTemperature = setup.ambient;
    }
    return p;
  };

  /** Simulates recording r at θ and writes its rows into out (offset rowStart[r]). Returns false on a non-finite state. */
  const rowsOf = (r: number, theta: ArrayLike<number>, v: DetailedValues, out: Float64Array, keep: DetailedResiduals | null): boolean => {
    const rec = recs[r]!;
    const sl = slots[r]!;
    const sg = sigma[r]!;
    const n = rec.time.length;
    const tr = traces[r]!;
    const cnt = counts[r]!;
    const off = sl.offset >= 0 ? nuisance(theta, sl.offset) : 0;
    let o = rowStart[r]!;
    const params = paramsFor(rec, v);
    // Input values per sample (or per slot of the command's clock).
    const U = sl.level.map((j) => nuisance(theta, j));
    const beta = sl.sine.map((j) => nuisance(theta, j));
    const input = inputs[r]!;
    const valueOfSample = (k: number): number => {
      if (rec.levels !== null) return U[rec.levels.classOf[k]!]!;
      if (rec.sines !== null && beta.length > 0) {
        const om = rec.sines.omega;
        let s = beta[0]!;
        for (let q = 0; q < om.length; q++) s += beta[1 + 2 * q]! * Math.cos(om[q]! * k) + beta[2 + 2 * q]! * Math.sin(om[q]! * k);
        return s;
      }
      return rec.input[k]!;
    };
    if (rec.table) {
      // Steady state at each row's voltage.
      const ss = new Float64Array(3);
      for (let k = 0; k < n; k++) {
        steadyStateInto(ss, params, rec.input[k]!);
        const iRes = ss[0]! + off - (rec.current?.[k] ?? NaN);
        const wRes = ss[1]! - (rec.speed?.[k] ?? NaN);
        // A row's own SD where the table gives one (blank cells fall back to the channel's).
        const si = rec.spread?.current?.[k], sw = rec.spread?.speed?.[k];
        if (cnt.current > 0) { out[o++] = iRes / (si !== undefined && si > 0 ? si : sg.current); if (keep?.current) keep.current[k] = iRes; }
        if (cnt.speed > 0) { out[o++] = wRes / (sw !== undefined && sw > 0 ? sw : sg.speed); if (keep?.speed) keep.speed[k] = wRes; }
      }
      return Number.isFinite(out[o - 1]!);
    }
    const so = slotOf[r] ?? null;
    if (so === null) {
      for (let k = 0; k < n; k++) input[k] = valueOfSample(k);
    } else if (rec.sines !== null && beta.length > 0) {
      // A sine-fit command on its own clock: slot j starts at the clock's instant j − 1.
      const om = rec.sines.omega;
      for (let j = 0; j < input.length; j++) {
        let v = beta[0]!;
        for (let q = 0; q < om.length; q++) v += beta[1 + 2 * q]! * Math.cos(om[q]! * (j - 1)) + beta[2 + 2 * q]! * Math.sin(om[q]! * (j - 1));
        input[j] = v;
      }
    } else {
      // Slot j holds the value seen by the samples that fall in it; empty slots repeat the previous one.
      input.fill(NaN);
      for (let k = 0; k < n; k++) input[so[k]!] = valueOfSample(k);
      if (!Number.isFinite(input[0]!)) input[0] = valueOfSample(0);
      for (let j = 1; j < input.length; j++) if (!Number.isFinite(input[j]!)) input[j] = input[j - 1]!;
    }
    const plan: HybridPlan = { time: rec.time, input };
    const it = inputTimes[r];
    if (it !== null) plan.inputTime = it;
    if (rec.kind === 'locked-rotor') plan.rotor = 'held';
    if (rec.kind === 'coast-down') {
      if (rec.drivenBeforeCut) {
        // The state at the first sample is fitted (the run may start at rest, spin up, or already
        // run steadily): the driven part before the cut shows it.
        plan.initial = { current: sl.i0 >= 0 ? nuisance(theta, sl.i0) : 0, speed: sl.w0 >= 0 ? nuisance(theta, sl.w0) : 0 };
        plan.openFrom = sl.cut >= 0 ? nuisance(theta, sl.cut) : rec.time[rec.first]!;
      } else {
        plan.time = rec.time.subarray(rec.first);
        plan.input = input.subarray(rec.first);
        if (plan.inputTime !== undefined) delete plan.inputTime;
        plan.openFrom = rec.time[rec.first]!;
        plan.initial = { current: 0, speed: nuisance(theta, sl.w0) };
      }
    }
    const view: HybridTrace = plan.time === rec.time ? tr : {
      current: tr.current.subarray(rec.first), speed: tr.speed.subarray(rec.first), position: tr.position.subarray(rec.first),
      terminalVoltage: tr.terminalVoltage.subarray(rec.first), temperature: tr.temperature.subarray(rec.first), events: 0,
    };
    simulateHybridInto(view, params, plan);
    sims++;
    if (cnt.current > 0) {
      const mi = rec.current!, s = sg.current;
      const from = n - cnt.current;
      for (let k = from; k < n; k++) {
        const res = tr.current[k]! + off - mi[k]!;
        out[o++] = res / s;
        if (keep?.current) keep.current[k] = res;
      }
    }
    if (cnt.speed > 0) {
      const from = n - cnt.speed;
      const ang = angles[r] ?? null;
      if (ang !== null) {
        const s = sg.speed, c0 = sl.angle >= 0 ? nuisance(theta, sl.angle) : 0;
        const base = tr.position[from]!;
        for (let k = from; k < n; k++) {
          const res = tr.position[k]! - base + c0 - ang[k]!;
          out[o++] = res / s;
          if (keep?.angle) keep.angle[k] = res;
          if (keep?.speed && k > from) keep.speed[k] = (tr.position[k]! - tr.position[k - 1]!) / (rec.time[k]! - rec.time[k - 1]!) - rec.speed![k]!;
        }
      } else {
        const mw = rec.speed!, s = sg.speed;
        for (let k = from; k < n; k++) {
          const res = tr.speed[k]! - mw[k]!;
          out[o++] = res / s;
          if (keep?.speed) keep.speed[k] = res;
        }
      }
    }
    if (cnt.terminal > 0) {
      const mv = rec.terminal!, s = sg.terminal;
      for (let k = n - cnt.terminal; k < n; k++) {
        const res = tr.terminalVoltage[k]! - mv[k]!;
        out[o++] = res / s;
        if (keep?.terminal) keep.terminal[k] = res;
      }
    }
    if (cnt.levels > 0) {
      const cl = rec.levels!.classes, s = sg.voltage;
      for (let q = 0; q < cl.length; q++) {
        const c = cl[q]!;
        out[o++] = (Math.sqrt(c.count) * (U[q]! - c.mean)) / s;
        out[o++] = Math.sqrt(c.sumSq) / s;
      }
    }
    if (cnt.sines > 0) {
      const sm = rec.sines!, q = sm.coefficients.length, s = sg.voltage;
      for (let a = 0; a < q; a++) {
        let acc = 0;
        for (let c = a; c < q; c++) acc += sm.cholesky[c * q + a]! * (beta[c]! - sm.coefficients[c]!);
        out[o++] = acc / s;
      }
      out[o++] = Math.sqrt(sm.rss) / s;
    }
    return true;
  };

  const r0 = new Float64Array(rows);
  const rp = new Float64Array(rows);
  const rm = new Float64Array(rows);
  let jac = new Float64Array(0);
  // Residuals at the point of the last Jacobian (for the score covariance).
  let jr = new Float64Array(0);
  const work = new Float64Array(p);
  const evalAll = (theta: ArrayLike<number>, out: Float64Array): boolean => {
    const v = valuesAt(theta);
    if (!validValues(v)) return false;
    for (let r = 0; r < recs.length; r++) if (!rowsOf(r, theta, v, out, null)) return false;
    return true;
  };
  const recordRange = (r: number): [number, number] => [rowStart[r]!, r + 1 < recs.length ? rowStart[r + 1]! : rows];

  const problem: DetailedProblem = {
    parameterCount: p,
    rows,
    valuesAt,
    simulations: () => sims,
    differences: 'forward',
    evaluate(theta: Float64Array, wantJacobian: boolean, acc: NormalEquations): number {
      if (!evalAll(theta, r0)) return NaN;
      let ssr = 0;
      for (let k = 0; k < rows; k++) ssr += r0[k]! * r0[k]!;
      if (!Number.isFinite(ssr)) return NaN;
      if (!wantJacobian) {
        accumulateNormalEquations(acc, r0, null, rows);
        acc.rows += summaryRows;
        return ssr;
      }
      if (jac.length !== p * rows) jac = new Float64Array(p * rows);
      else jac.fill(0);
      const central = problem.differences === 'central';
      for (let j = 0; j < p; j++) {
        const e = entries[j]!;
        // Forward steps √ε-sized (error ~1e-8 relative), central steps ε^⅓-sized; both relative for log entries.
        const base = central ? FD_STEP : FD_FORWARD;
        const step = e.step !== undefined && !central ? e.step : e.transform === 'log' ? base : base * Math.max(1, Math.abs(theta[j]!));
        const col = j * rows;
        for (let r = 0; r < recs.length; r++) {
          if (e.recording >= 0 ? e.recording !== r : moves[r]![j] === 0) continue;
          work.set(theta);
          work[j] = theta[j]! + step;
          if (!rowsOf(r, work, valuesAt(work), rp, null)) return NaN;
          const [a, b] = recordRange(r);
          if (central) {
            work[j] = theta[j]! - step;
            if (!rowsOf(r, work, valuesAt(work), rm, null)) return NaN;
            for (let k = a; k < b; k++) jac[col + k] = (rp[k]! - rm[k]!) / (2 * step);
          } else {
            for (let k = a; k < b; k++) jac[col + k] = (rp[k]! - r0[k]!) / step;
          }
        }
      }
      // Leave the base state in the trace buffers (the last call must be the unperturbed one).
      if (jr.length !== rows) jr = new Float64Array(rows);
      jr.set(r0);
      accumulateNormalEquations(acc, r0, jac, rows, rows);
      acc.rows += summaryRows;
      return ssr;
    },
    scoreCovariance() {
      if (jac.length !== p * rows) return null;
      const meat = new Float64Array(p * p);
      const G = new Float64Array(p);
      let batches = 0;
      const flush = (): void => {
        for (let a = 0; a < p; a++) { const ga = G[a]!; if (ga === 0) continue; for (let b = 0; b < p; b++) meat[a * p + b] = meat[a * p + b]! + ga * G[b]!; }
        G.fill(0);
        batches++;
      };
      const add = (k: number): void => { const rk = jr[k]!; for (let j = 0; j < p; j++) G[j] = G[j]! + jac[j * rows + k]! * rk; };
      const series = (from: number, count: number): void => {
        if (count <= 0) return;
        const m = Math.max(1, Math.round(Math.sqrt(count)));
        const nb = Math.max(1, Math.floor(count / m));
        for (let b = 0; b < nb; b++) {
          const end = b === nb - 1 ? from + count : from + (b + 1) * m;
          for (let k = from + b * m; k < end; k++) add(k);
          flush();
        }
      };
      for (let r = 0; r < recs.length; r++) {
        const c = counts[r]!;
        let o = rowStart[r]!;
        if (recs[r]!.table) {
          // One row per steady point (current and speed interleaved): independent points.
          const m = c.current + c.speed + c.terminal;
          for (let k = o; k < o + m; k++) { add(k); flush(); }
          o += m;
        } else {
          series(o, c.current); o += c.current;
          series(o, c.speed); o += c.speed;
          series(o, c.terminal); o += c.terminal;
        }
        for (let k = o; k < o + c.levels + c.sines; k++) { add(k); flush(); }
      }
      return { meat, batches };
    },
    residualsAt(theta) {
      const v = valuesAt(theta);
      const series: DetailedResiduals[] = recs.map((rec) => {
        const n = rec.time.length;
        const mk = (on: boolean): Float64Array | null => (on ? new Float64Array(n).fill(NaN) : null);
        const enc = rec.encoder !== null;
        const cnt = counts[recs.indexOf(rec)]!;
        return { current: mk(cnt.current > 0), speed: mk(cnt.speed > 0), angle: mk(cnt.speed > 0 && enc), terminal: mk(cnt.terminal > 0) };
      });
      const out = new Float64Array(rows);
      const ssr = recs.map((_, r) => {
        rowsOf(r, theta, v, out, series[r]!);
        const cnt = counts[r]!;
        let o = rowStart[r]!;
        const sum = (m: number): number => { let s = 0; for (let k = 0; k < m; k++) { s += out[o]! * out[o]!; o++; } return s; };
        const current = sum(cnt.current), speed = sum(cnt.speed), terminal = sum(cnt.terminal);
        return { current, speed, terminal, rows: { current: cnt.current, speed: cnt.speed, terminal: cnt.terminal } };
      });
      return { series, ssr };
    },
  };
  return problem;
}

function validValues(v: DetailedValues): boolean {
  for (const k of DETAILED_CONSTANTS) if (!Number.isFinite(v[k]) && !(k === 'Vmax' || k === 'Imax' || k === 'Rth' || k === 'Cth')) return false;
  return v.R > 0 && v.L > 0 && v.Kt > 0 && v.Ke > 0 && v.J > 0 && v.b > 0;
}
