import { tQuantile } from '../distributions.js';
import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import { solveLeastSquares } from '../solver/solveLeastSquares.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { gaussNewtonStep } from '../solver/gaussNewtonStep.js';
import { logCovarianceOfConstants } from '../motor/logCovarianceOfConstants.js';
import type { ConstantMap } from '../motor/logCovarianceOfConstants.js';
import type { SolverOptions, SolverResult } from '../solver/types.js';
import type { PreparedRecording } from '../motor/prepareRecording.js';
import type { ChannelFit, MotorFit, NoiseLevel, ParameterEstimate, RecordingReport, StartAttempt, UninformedConstant } from '../motor/types.js';
import { createDetailedProblem, DETAILED_CONSTANTS } from './createDetailedProblem.js';
import type { DetailedConstant, DetailedSetup, DetailedSlots, DetailedValues } from './createDetailedProblem.js';
import type { ModelExtensions, ThetaEntry } from './types.js';

/** Options of `fitDetailed` (resolved by the caller). */
export interface DetailedFitOptions {
  extensions: ModelExtensions;
  /** Constants pinned [SI]. */
  fix: Partial<Record<DetailedConstant, number>>;
  /** Starting values [SI] (from closed forms or a previous fit). */
  start: Partial<Record<DetailedConstant, number>>;
  /** Where each start came from. */
  startSource: Partial<Record<DetailedConstant, string>>;
  /** Ambient temperature of the heating model [°C]. */
  ambient: number;
  solver: SolverOptions;
  keepResiduals: boolean;
  /** Widen the covariance by the batch-means sandwich where residuals are correlated (default true). */
  sandwich?: boolean;
  /** Re-estimate the noise SDs from the residuals (off when the caller fixed the weights). */
  reweight: boolean;
  /** θ entries of a previous fit to start from, by name (same transform and scale). */
  warm: Map<string, number> | null;
  /** Starts from the data alone (closed forms), tried too when `start` came from the caller. */
  autoStart?: Partial<Record<DetailedConstant, number>>;
}

export const UNITS: Record<string, string> = {
  R: 'Ω', L: 'H', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad', Tc: 'N·m', Ts: 'N·m', c: 'N·m·s²/rad²',
  Vmax: 'V', Imax: 'A', Rth: 'K/W', Cth: 'J/K', R20: 'Ω', 'b/J': '1/s', 'Tc/J': 'rad/s²', 'c/J': '1/rad',
  'speed gain': 'rad/(s·V)', 'mechanical time constant': 's', 'b/Kt': 'A·s/rad', 'V/ω slope': 'V·s/rad',
};

const WOULD_INFORM: Record<string, string> = {
  R: 'a locked-rotor step, or any driven run that logs current',
  L: 'a locked-rotor step with current sampled several times faster than L/R',
  Kt: 'a driven run that logs current and speed (or a coast-down with the open-circuit voltage)',
  J: 'a driven run with current and speed, or a coast-down together with a run that gives b',
  b: 'a driven run with current and speed, or a steady-state sweep',
  Tc: 'a coast-down, a steady-state sweep, or slow reversals with current and speed',
};

/** Relative standard error above which a constant counts as not identified (Cramér–Rao-style rule: common practice, no source). */
const UNIDENTIFIED_RSE = 0.5;

/**
 * Fits the detailed motor model — the lumped constants plus the chosen extensions (Coulomb
 * friction and stiction, drag, drive voltage and current limits, winding heating) — jointly to
 * prepared recordings by weighted least squares, with the central-difference Jacobian of the
 * hybrid simulator (`createDetailedProblem`). Also the path for recordings the streamed linear
 * kernel does not cover: coast-downs with the driven plateau and the open-circuit voltage,
 * speed-only coast-downs (ratios to J), encoder angles, jittered clocks, tables of steady points.
 *
 * ## Method
 * θ = ln p for every positive constant (Ts as ln(Ts − Tc)); nuisances linear and scaled. The
 * solver is the project's Levenberg–Marquardt (`solveLeastSquares`); a stall is retried from three
 * other starts (J and b ×½ and ×2, then the caller's start with the effects halved). After
 * convergence each channel's noise SD is re-estimated from its residuals (RMS; the second-
 * difference estimate of a fast-moving or quantised signal can be far off) and the fit repeated
 * when one moved by more than 20 %. Covariance s²(JᵀJ)⁺, Student-t intervals on the fitted scale.
 * A constant whose relative standard error exceeds 50 % is reported as not identified.
 *
 * @param recs - prepared recordings
 * @param opts - extensions, pinned constants, starts, ambient temperature, solver options
 * @returns a `MotorFit`
 */
/** The θ layout, fixed values, nuisance slots and noise levels of a detailed fit (see `fitDetailed`). */
export function layoutDetailed(recs: PreparedRecording[], opts: DetailedFitOptions) {
  const ext = opts.extensions;
  const hasCurrent = recs.some((r) => r.current !== null && r.kind !== 'coast-down') || recs.some((r) => r.drivenBeforeCut && r.current !== null);
  const hasTorque = false;
  const tied = !hasTorque;
  // Which constants the recordings use.
  const used = new Set<DetailedConstant>();
  for (const r of recs) {
    const add = (...cs: DetailedConstant[]): void => { for (const c of cs) used.add(c); };
    if (r.kind === 'locked-rotor') add('R', 'L');
    else if (r.kind === 'coast-down') { add('J', 'b'); if (r.drivenBeforeCut) add('R', 'Kt', 'Ke'); }
    else if (r.table) add('R', 'Kt', 'Ke', 'b');
    else add('R', 'L', 'Kt', 'Ke', 'J', 'b');
    if (ext.coulomb && r.kind !== 'locked-rotor') add('Tc');
    if (ext.stiction && r.kind !== 'locked-rotor') add('Ts');
    if (ext.drag && r.kind !== 'locked-rotor') add('c');
    if (r.source === 'command' && ext.voltageLimit) add('Vmax');
    if (r.source === 'command' && ext.currentLimit) add('Imax');
    if (ext.heating) add('Rth', 'Cth');
  }
  const notInformed: UninformedConstant[] = [];
  const fix: Partial<Record<DetailedConstant, number>> = { ...opts.fix };
  if (tied && (fix.Kt !== undefined || fix.Ke !== undefined)) { const k = fix.Kt ?? fix.Ke!; fix.Kt = k; fix.Ke = k; }
  // Speed-only coast-downs alone: only ratios to J are seen; J is held at its start as a unit.
  const onlyRatios = recs.every((r) => r.kind === 'coast-down' && !r.drivenBeforeCut) && fix.J === undefined;
  const ratioJ = onlyRatios ? (opts.start.J ?? 1e-4) : NaN;
  if (onlyRatios) {
    fix.J = ratioJ;
    notInformed.push({ name: 'J', reason: 'a coast-down from speed alone shows only the deceleration: b/J (and Tc/J) — not J, b or Tc on their own', wouldInform: 'a driven run with current, or J pinned to a known value' });
  }
  // No current anywhere and R not pinned: the speed sees R only with J and b.
  // Driven runs with voltage and speed but no current. The speed alone shows K/(R·J),
  // (K²/R + b)/J and Tc/J: with R unknown it enters with J and b; with R known, K and b still
  // trade along K²/R + b (unless the electrical pole shows, which it rarely does at logging rates).
  const speedOnlyDriven = !hasCurrent && recs.some((r) => r.kind !== 'coast-down' && !r.table);
  const noCurrent = speedOnlyDriven && fix.R === undefined;
  // Coast-downs with their driven plateau but no current: K shows in the open-terminal voltage,
  // but the model is unchanged under R → R/s, L → L/s, J → s·J, b → s·b, Tc → s·Tc (the current,
  // not logged, scales by 1/s). Only K, b/J and Tc/J are reported (the plateau adds R·b, which
  // the open-terminal fit of the decay does not pin down well enough to state).
  const coastNoCurrent = !hasCurrent && !speedOnlyDriven && recs.some((r) => r.kind === 'coast-down' && r.drivenBeforeCut)
    && fix.R === undefined && fix.J === undefined && fix.b === undefined && fix.L === undefined;
  // Tables of steady points alone, R not pinned: V = (K + R·b/K)·ω and i = (b/K)·ω — R and K do
  // not part (friction or drag can part them, weakly; the information then says so).
  // Steady points of the linear model: R and K do not part (with drag or Coulomb friction the
  // current is no longer proportional to speed and they may: the information decides).
  const tableOnly = recs.every((r) => r.table) && fix.R === undefined && !ext.drag && !ext.coulomb;
  const values: DetailedValues = {
    R: 1, L: 1e-3, Kt: 0.05, Ke: 0.05, J: 1e-5, b: 1e-6, Tc: 0, Ts: 0, c: 0, Vmax: Infinity, Imax: Infinity, Rth: 1, Cth: 1,
  };
  for (const c of DETAILED_CONSTANTS) {
    const v = fix[c] ?? opts.start[c];
    if (v !== undefined && Number.isFinite(v)) values[c] = v;
  }
  if (tied) values.Ke = values.Kt;
  if (!ext.stiction) values.Ts = values.Tc;
  // θ layout.
  const entries: ThetaEntry[] = [];
  const theta0: number[] = [];
  const index = Object.fromEntries(DETAILED_CONSTANTS.map((c) => [c, -1])) as Record<DetailedConstant, number>;
  const push = (name: string, transform: 'log' | 'linear', scale: number, recording: number, value: number): number => {
    entries.push({ name, transform, scale, recording });
    theta0.push(value);
    return entries.length - 1;
  };
  for (const c of DETAILED_CONSTANTS) {
    if (!used.has(c) || fix[c] !== undefined) continue;
    if (c === 'Ke' && tied) continue;
    if (c === 'Ts') {
      const excess = Math.max(values.Ts - values.Tc, 0.1 * Math.max(values.Tc, 1e-9));
      index.Ts = push('ln (Ts − Tc)', 'log', 1, -1, Math.log(excess));
      continue;
    }
    const v = values[c];
    const safe = v > 0 && Number.isFinite(v) ? v : c === 'Tc' ? 1e-3 * values.Kt : c === 'c' ? 1e-9 : 1;
    index[c] = push(`ln ${c === 'Kt' && tied ? 'K' : c}`, 'log', 1, -1, Math.log(safe));
  }
  if (tied) index.Ke = index.Kt;
  // Nuisances.
  const slots: DetailedSlots[] = recs.map((r, ri) => {
    const sl: DetailedSlots = { level: [], sine: [], offset: -1, w0: -1, i0: -1, angle: -1, cut: -1 };
    if (r.levels !== null) {
      const scale = Math.max(1e-6, ...r.levels.classes.map((q) => Math.abs(q.mean)));
      r.levels.classes.forEach((q, j) => sl.level.push(push(`level ${j} ${r.name}`, 'linear', scale, ri, q.mean / scale)));
    }
    if (r.sines !== null) {
      const co = r.sines.coefficients;
      const scale = Math.max(1e-6, ...Array.from(co, Math.abs));
      co.forEach((v, j) => sl.sine.push(push(`input coefficient ${j} ${r.name}`, 'linear', scale, ri, v / scale)));
    }
    if (r.baseline && r.current !== null && r.kind !== 'coast-down' && !r.table) {
      let m = 0;
      for (let k = 0; k < r.current.length; k++) m = Math.max(m, Math.abs(r.current[k]!));
      sl.offset = push(`current offset ${r.name}`, 'linear', Math.max(m, 1e-12), ri, 0);
    }
    if (r.kind === 'coast-down' && !r.drivenBeforeCut && r.speed !== null) {
      const w0 = r.speed[r.first]!;
      sl.w0 = push(`ω0 ${r.name}`, 'linear', Math.max(Math.abs(w0), 1e-9), ri, Math.sign(w0) || 1);
    }
    if (r.kind === 'coast-down' && r.drivenBeforeCut && r.speed !== null) {
      const w0 = r.speed[0]!;
      const wScale = Math.max(...Array.from(r.speed.subarray(0, r.first), Math.abs), 1e-9);
      sl.w0 = push(`initial speed ${r.name}`, 'linear', wScale, ri, w0 / wScale);
      if (r.current !== null) {
        const i0 = r.current[0]!;
        const iScale = Math.max(...Array.from(r.current.subarray(0, r.first), Math.abs), 1e-12);
        sl.i0 = push(`initial current ${r.name}`, 'linear', iScale, ri, i0 / iScale);
      }
    }
    if (r.kind === 'coast-down' && r.drivenBeforeCut) {
      // The circuit opens between the last driven sample and the first open one.
      const tc = 0.5 * (r.time[r.first - 1]! + r.time[r.first]!);
      sl.cut = push(`cut instant ${r.name}`, 'linear', r.h, ri, tc / r.h);
    }
    if (r.encoder !== null && r.speed !== null && r.kind !== 'locked-rotor') {
      sl.angle = push(`angle offset ${r.name}`, 'linear', r.encoder, ri, 0);
    }
    return sl;
  });
  if (opts.warm !== null) {
    // An input level the previous model pulled far from its own samples (a lumped model bending
    // the command to mimic a drive's limit) starts again from its samples' mean: from there the
    // new model's effect has a gradient to follow.
    const farLevel = new Set<number>();
    recs.forEach((r, ri) => {
      if (r.levels === null) return;
      r.levels.classes.forEach((q, j) => {
        const k = slots[ri]!.level[j]!;
        const v = opts.warm!.get(entries[k]!.name);
        const se = Math.max(r.handling.voltageSigma, 1e-12) / Math.sqrt(Math.max(q.count, 1));
        if (v !== undefined && Math.abs(v * entries[k]!.scale - q.mean) > 6 * se + 1e-9 * Math.abs(q.mean)) farLevel.add(k);
      });
    });
    entries.forEach((e, j) => {
      const v = opts.warm!.get(e.name);
      if (v !== undefined && Number.isFinite(v) && !farLevel.has(j)) theta0[j] = v;
    });
  }
  const sigma = recs.map((r) => ({
    current: r.currentNoise?.sigma ?? 0,
    speed: r.speedNoise?.sigma ?? 1,
    terminal: r.terminalNoise?.sigma ?? 1,
    voltage: Math.max(r.handling.voltageSigma, 1e-12 * Math.max(1, ...(r.levels?.classes.map((q) => Math.abs(q.mean)) ?? [1]))),
  }));
  // Tables: the per-row SD columns where the file gives them (used row by row), else the prepared
  // start (0.2 % of the channel's RMS), re-estimated from the residuals.
  const setup: DetailedSetup = { recs, entries, index, values, tied, extensions: ext, ambient: opts.ambient, slots, sigma };
  if (noCurrent || coastNoCurrent) {
    // R (and L) cannot be told from J and b without current: hold them at their starts and say so.
    for (const c of ['R', 'L'] as const) {
      if (index[c] >= 0) {
        const j = index[c];
        values[c] = Math.exp(theta0[j]!);
        removeEntry(setup, theta0, j);
      }
    }
    notInformed.push({ name: 'R', reason: 'no recording logs current: from voltage and speed alone R enters only together with J and b', wouldInform: WOULD_INFORM.R! + ' (or R pinned to a known value)' });
  }
  if (speedOnlyDriven && index.b >= 0) {
    // b is held at its start (it trades against K along K²/R + b); the informed combinations are
    // reported below, and K, J, b, Tc apart are said to be unidentified.
    values.b = Math.exp(theta0[index.b]!);
    removeEntry(setup, theta0, index.b);
    notInformed.push({ name: 'b', reason: 'no recording logs current: from voltage and speed alone b trades against K along K²/R + b', wouldInform: 'a recording with current, or b from a coast-down with J known' });
  }
  if (tableOnly && index.R >= 0) {
    values.R = Math.exp(theta0[index.R]!);
    removeEntry(setup, theta0, index.R);
    notInformed.push({ name: 'R', reason: 'steady points alone give V = (K + R·b/K)·ω and i = (b/K)·ω: R and K do not part', wouldInform: 'a locked-rotor step, or R pinned to a known value' });
  }
  return { ext, used, fix, notInformed, onlyRatios, speedOnlyDriven, noCurrent, coastNoCurrent, tableOnly, values, entries, theta0, index, setup, tied };
}

export function fitDetailed(recs: PreparedRecording[], opts: DetailedFitOptions): MotorFit {
  const { ext, used, fix, notInformed, onlyRatios, speedOnlyDriven, noCurrent, coastNoCurrent, tableOnly, entries, theta0, index, setup, tied } = layoutDetailed(recs, opts);
  const { sigma, slots } = setup;
  const p = entries.length;
  const names = entries.map((e) => e.name);
  const attempts: StartAttempt[] = [];
  let iterations = 0, jacobianEvaluations = 0, functionEvaluations = 0;
  if (p === 0) {
    return emptyFit(recs, notInformed, ext, tied, names);
  }
  // Solve, retrying from other starts on a stall; then re-weight by the residual noise.
  let problem = createDetailedProblem(setup);
  const solve = (from: ArrayLike<number>, label: StartAttempt['start']): SolverResult => {
    // Stationary enough when a Gauss–Newton step could remove at most 0.05 of the whitened SSR
    // (cos² · SSR ≤ 0.05 with SSR ≈ rows): within about 0.2 standard errors of the optimum.
    const tol = Math.max(1e-3, Math.sqrt(0.05 / Math.max(problem.rows, 1)));
    const res = solveLeastSquares(problem, from, { maxIterations: 200, stationarityTolerance: tol, ...opts.solver });
    iterations += res.iterations; jacobianEvaluations += res.jacobianEvaluations; functionEvaluations += res.functionEvaluations;
    if (!res.converged && res.stopReason === 'stalled' && Number.isFinite(res.ssr)) {
      // A stall a hair from the optimum (the forward differences are least accurate across
      // friction events): the central-difference Gauss–Newton step says whether anything is left.
      problem.differences = 'central';
      const acc = createNormalEquations(p);
      const ssr = problem.evaluate(Float64Array.from(res.theta), true, acc);
      problem.differences = 'forward';
      jacobianEvaluations++;
      const step = Number.isFinite(ssr) ? gaussNewtonStep(acc.JtJ, acc.Jtr, p)?.step ?? null : null;
      let predicted = Infinity;
      if (step !== null) { predicted = 0; for (let j = 0; j < p; j++) predicted -= step[j]! * acc.Jtr[j]!; }
      if (predicted <= 0.05) { res.converged = true; res.stopReason = 'relative-reduction'; }
    }
    attempts.push({ start: label, startSsr: NaN, ssr: res.ssr, iterations: res.iterations, converged: res.converged, stopReason: res.stopReason, chosen: false });
    return res;
  };
  const starts: Float64Array[] = [Float64Array.from(theta0)];
  const scaled = (fJ: number, fB: number, effects: number): Float64Array => {
    const t = Float64Array.from(theta0);
    if (index.J >= 0) t[index.J] = t[index.J]! + Math.log(fJ);
    if (index.b >= 0) t[index.b] = t[index.b]! + Math.log(fB);
    for (const c of ['Tc', 'c'] as const) if (index[c] >= 0) t[index[c]] = t[index[c]]! + Math.log(effects);
    return t;
  };
  // A warm start (a model this one extends) is tried alone: its optimum is the place to start.
  if (opts.warm === null) {
    if (opts.autoStart !== undefined) {
      // The caller's start first, then the automatic one from the data alone.
      const t = Float64Array.from(theta0);
      for (const c of DETAILED_CONSTANTS) {
        const v = opts.autoStart[c];
        if (index[c] >= 0 && c !== 'Ts' && v !== undefined && v > 0 && Number.isFinite(v)) t[index[c]] = Math.log(v);
      }
      starts.push(t);
    }
    starts.push(scaled(0.5, 0.5, 1), scaled(2, 2, 1), scaled(1, 1, 0.3));
  }
  // A run in which a lumped constant ran off by more than six decades (b → 0 while Coulomb
  // friction takes the whole load, say) sits on a boundary, not at an optimum: the other starts
  // are tried too, and the lowest sum of squares among the runs that converged wins.
  const ranOff = (res: SolverResult, from: Float64Array): boolean =>
    (['R', 'L', 'Kt', 'J', 'b'] as const).some((c) => index[c] >= 0 && Math.abs(res.theta[index[c]]! - from[index[c]]!) > Math.log(1e6));
  let best: SolverResult | null = null;
  let bestStart = starts[0]!;
  for (const s of starts) {
    const res = solve(s, 'automatic');
    const stuck = ranOff(res, s);
    const better = best === null || (res.converged && !stuck && (!best.converged || res.ssr < best.ssr)) || (!best.converged && res.ssr < best.ssr);
    if (better) { best = res; bestStart = s; }
    if (res.converged && !stuck) break;
  }
  let sol = best!;
  for (let round = 0; round < 3 && opts.reweight && Number.isFinite(sol.ssr); round++) {
    const { ssr } = problem.residualsAt(sol.theta);
    let moved = false;
    recs.forEach((r, i) => {
      const s = sigma[i]!;
      const upd = (key: 'current' | 'speed' | 'terminal', sum: number, m: number): void => {
        if (m < 8 || !(s[key] > 0)) return;
        const next = s[key] * Math.sqrt(sum / m);
        if (Math.abs(next / s[key] - 1) > 0.2) moved = true;
        s[key] = next;
      };
      const q = ssr[i]!;
      if (!(r.table && r.spread?.current)) upd('current', q.current, q.rows.current);
      if (!(r.table && r.spread?.speed)) upd('speed', q.speed, q.rows.speed);
      upd('terminal', q.terminal, q.rows.terminal);
    });
    if (!moved && round > 0) break;
    problem = createDetailedProblem(setup);
    const again = solve(sol.theta, 'automatic');
    if (again.converged || !sol.converged) sol = again;
    if (!moved) break;
  }
  attempts.forEach((a) => { a.chosen = false; });
  if (attempts.length > 0) attempts[attempts.length - 1]!.chosen = true;
  // Central differences at the end: Gauss–Newton steps with them while they still reduce the SSR
  // (the forward-difference Jacobian the solver iterated with can stall a hair from the optimum,
  // most of all across friction events), then the covariance. A point from which a full
  // Gauss–Newton step could remove less than 0.05 of the whitened SSR is within about 0.2 standard
  // errors of the optimum in every direction: converged, whatever the iteration's own test said.
  {
    problem.differences = 'central';
    let theta = Float64Array.from(sol.theta);
    let acc = createNormalEquations(p);
    let ssr = problem.evaluate(theta, true, acc);
    jacobianEvaluations++;
    let predicted = Infinity;
    for (let it = 0; it < 4 && Number.isFinite(ssr); it++) {
      const step = gaussNewtonStep(acc.JtJ, acc.Jtr, p)?.step ?? null;
      if (step === null) break;
      predicted = 0;
      for (let j = 0; j < p; j++) predicted -= step[j]! * acc.Jtr[j]!;
      if (!(predicted > 0.05)) break;
      const trial = Float64Array.from(theta, (t, j) => t + step[j]!);
      const acc2 = createNormalEquations(p);
      const ssr2 = problem.evaluate(trial, true, acc2);
      jacobianEvaluations++;
      if (!(ssr2 < ssr)) break;
      theta = trial; acc = acc2; ssr = ssr2;
    }
    if (Number.isFinite(ssr)) {
      sol = { ...sol, theta, JtJ: Float64Array.from(acc.JtJ), ssr, rows: acc.rows };
      if (!sol.converged && predicted <= 0.05 && (sol.stopReason === 'stalled' || sol.stopReason === 'max-iterations' || sol.stopReason === 'small-step')) {
        sol = { ...sol, converged: true, stopReason: 'relative-reduction' };
      }
    }
  }
  if (sol.converged && ranOff(sol, bestStart)) {
    // Every start ran off to a boundary: the model does not describe these data (a rotor that
    // sticks, fitted without friction, drives b to zero). Said so, not called converged.
    sol = { ...sol, converged: false, stopReason: 'ran-off' };
  }
  const theta = sol.theta;
  const v = problem.valuesAt(theta);
  const rows = sol.rows;
  const dof = rows - p;
  let cov: ReturnType<typeof covarianceFromNormalMatrix> | null = null;
  if (dof > 0 && Number.isFinite(sol.ssr)) {
    try { cov = covarianceFromNormalMatrix(sol.JtJ, p, sol.ssr, rows); } catch { cov = null; }
  }
  // Residuals correlated in time carry less information than their count: the sandwich with a
  // batch-means score covariance (see `scoreCovariance`) widens the covariance where they are.
  // It never narrows it below s²(JᵀJ)⁺ (white residuals give the two alike, up to the batch
  // estimate's own noise), and its intervals use the batches' degrees of freedom.
  let intervalDof = dof;
  if (cov !== null && opts.sandwich !== false) {
    const accS = createNormalEquations(p);
    const ssrS = problem.evaluate(Float64Array.from(theta), true, accS);
    jacobianEvaluations++;
    const sc = Number.isFinite(ssrS) ? problem.scoreCovariance() : null;
    if (sc !== null && sc.batches > 2 * p + 2) {
      const s2 = cov.residualVariance;
      const C = cov.covariance;
      const Ap = Float64Array.from(C, (x) => x / s2);
      const T = new Float64Array(p * p);
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) { let q = 0; for (let k = 0; k < p; k++) q += Ap[a * p + k]! * sc.meat[k * p + b]!; T[a * p + b] = q; }
      const H = new Float64Array(p * p);
      for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) { let q = 0; for (let k = 0; k < p; k++) q += T[a * p + k]! * Ap[k * p + b]!; H[a * p + b] = q; }
      const d = Float64Array.from({ length: p }, (_, j) => {
        const h = H[j * p + j]!, c = C[j * p + j]!;
        return h > 0 && c > 0 ? Math.max(1, Math.sqrt(c / h)) : 1;
      });
      let widened = false;
      for (let a = 0; a < p; a++) {
        for (let b = 0; b < p; b++) {
          const x = cov.identifiable[a] && cov.identifiable[b] ? H[a * p + b]! * d[a]! * d[b]! : C[a * p + b]!;
          if (a === b && x > C[a * p + b]! * 1.0001) widened = true;
          C[a * p + b] = x;
        }
      }
      for (let j = 0; j < p; j++) cov.standardErrors[j] = cov.identifiable[j] ? Math.sqrt(C[j * p + j]!) : NaN;
      if (widened) intervalDof = Math.min(dof, sc.batches - p);
    }
  }
  const tq = tQuantile(0.975, Math.max(intervalDof, 1));
  const parameters: Record<string, ParameterEstimate> = {};
  const informedBy = recs.map((r) => r.name);
  const report = (name: string, value: number, j: number, derivative: number[] | null = null): void => {
    const est: ParameterEstimate = { value, unit: UNITS[name] ?? '', informedBy };
    if (cov !== null) {
      let varLog = NaN;
      if (derivative !== null) {
        varLog = 0;
        for (let a = 0; a < p; a++) {
          if (derivative[a] === 0) continue;
          for (let b2 = 0; b2 < p; b2++) if (derivative[b2] !== 0) varLog += derivative[a]! * derivative[b2]! * cov.covariance[a * p + b2]!;
        }
      } else if (j >= 0 && cov.identifiable[j]) varLog = cov.covariance[j * p + j]!;
      if (varLog >= 0 && Number.isFinite(varLog)) {
        const s = Math.sqrt(varLog);
        est.standardError = value * s;
        est.interval95 = [value * Math.exp(-tq * s), value * Math.exp(tq * s)];
        if (s > UNIDENTIFIED_RSE) est.identified = false;
      } else est.identified = false;
    }
    parameters[name] = est;
  };
  const logGrad = (terms: [DetailedConstant, number][]): number[] => {
    const g = new Array<number>(p).fill(0);
    for (const [c, w] of terms) if (index[c] >= 0) g[index[c]] = g[index[c]]! + w;
    return g;
  };
  const shown: DetailedConstant[] = ['R', 'L', 'Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c', 'Vmax', 'Imax', 'Rth', 'Cth'];
  for (const c of shown) {
    if (!used.has(c)) continue;
    if (c === 'Ts' && !ext.stiction) continue;
    if (fix[c] !== undefined && !(onlyRatios && c === 'J')) { parameters[c] = { value: fix[c]!, unit: UNITS[c]!, fixed: true }; continue; }
    if (onlyRatios && (c === 'J' || c === 'b' || c === 'Tc' || c === 'c')) continue;
    if ((noCurrent || coastNoCurrent || tableOnly) && (c === 'R' || c === 'L')) continue;
    if (c === 'Ts') {
      // Ts = Tc + e^θ: d ln Ts = (Tc/Ts)·d ln Tc + ((Ts − Tc)/Ts)·dθ.
      const g = logGrad([['Tc', v.Tc / v.Ts]]);
      g[index.Ts] = (v.Ts - v.Tc) / v.Ts;
      report('Ts', v.Ts, -1, g);
      continue;
    }
    report(c, v[c], index[c]);
  }
  if (ext.heating && parameters.R !== undefined) {
    // R is the resistance at 20 °C in the heating model.
    parameters.R20 = { ...parameters.R };
  }
  const weak = (c: string): boolean => { const e = parameters[c]; return e === undefined || e.identified === false || !(e.standardError! < 0.05 * e.value); };
  if (!onlyRatios && recs.some((r) => r.kind === 'coast-down') && index.b >= 0 && index.J >= 0 && (weak('b') || weak('J'))) {
    // A coast-down sees the deceleration b/J directly, even where b and J apart are weakly pinned.
    report('b/J', v.b / v.J, -1, logGrad([['b', 1], ['J', -1]]));
  }
  const speedOnly = recs.every((r) => r.kind === 'coast-down' && !r.drivenBeforeCut);
  if (speedOnly && !onlyRatios && index.b >= 0) {
    // J was given: b follows from it, but the deceleration b/J is what the data show on their own.
    report('b/J', v.b / v.J, -1, logGrad([['b', 1]]));
    if (ext.coulomb && index.Tc >= 0) report('Tc/J', v.Tc / v.J, -1, logGrad([['Tc', 1]]));
  }
  if (onlyRatios) {
    report('b/J', v.b / v.J, -1, logGrad([['b', 1]]));
    if (ext.coulomb) report('Tc/J', v.Tc / v.J, -1, logGrad([['Tc', 1]]));
    if (ext.drag) report('c/J', v.c / v.J, -1, logGrad([['c', 1]]));
  }
  if (tableOnly) {
    // What steady points inform without R: the slopes i/ω = b/K and V/ω = K + R·b/K.
    const slopeV = v.Kt + (v.R * v.b) / v.Kt;
    const wR = (v.R * v.b) / v.Kt / slopeV;
    report('b/Kt', v.b / v.Kt, -1, logGrad([['b', 1], ['Kt', -1]]));
    report('V/ω slope', slopeV, -1, logGrad([['Kt', (v.Kt - (v.R * v.b) / v.Kt) / slopeV], ['b', wR]]));
    for (const c of ['Kt', 'Ke', 'b'] as const) {
      const e = parameters[c];
      if (e !== undefined && e.fixed !== true) { e.identified = false; e.unidentifiedReason = 'with R unknown, steady points pin only b/Kt and V/ω = Kt + R·b/Kt (R pinned to a known value, e.g. from a locked-rotor run, parts them)'; }
    }
  }
  if (coastNoCurrent) {
    report('b/J', v.b / v.J, -1, logGrad([['b', 1], ['J', -1]]));
    if (ext.coulomb && index.Tc >= 0) report('Tc/J', v.Tc / v.J, -1, logGrad([['Tc', 1], ['J', -1]]));
    for (const c of ['J', 'b', 'Tc', 'Ts', 'c'] as const) {
      const e = parameters[c];
      if (e !== undefined && e.fixed !== true) {
        e.identified = false;
        e.unidentifiedReason = 'without current, a coast-down and its driven plateau show K (open-terminal voltage) and b/J: R, J and b scale together (log current, or pin one of them)';
      }
    }
  }
  if (speedOnlyDriven) {
    // What voltage-to-speed runs do inform: the steady gain ω/V = K/(R·b + K²) and τm′ = R·J/(R·b + K²)
    // (and the friction's speed drop R·Tc/(R·b + K²) with Coulomb friction).
    const D = v.R * v.b + v.Kt * v.Ke;
    const wb = (v.R * v.b) / D, wk = (v.Kt * v.Ke) / D;
    report('speed gain', v.Kt / D, -1, logGrad([['Kt', 1 - 2 * wk], ['b', -wb]]));
    report('mechanical time constant', (v.R * v.J) / D, -1, logGrad([['J', 1], ['Kt', -2 * wk], ['b', -wb]]));
    if (ext.coulomb && index.Tc >= 0) report('friction speed drop', (v.R * v.Tc) / D, -1, logGrad([['Tc', 1], ['Kt', -2 * wk], ['b', -wb]]));
    const why = noCurrent
      ? 'without current, voltage and speed pin only the speed gain and the mechanical time constant (R pinned to a known value parts the rest)'
      : 'without current, voltage and speed pin only the speed gain, the mechanical time constant and the friction\'s speed drop: K and b trade along K²/R + b';
    for (const c of ['Kt', 'Ke', 'J', 'b', 'Tc', 'Ts', 'c'] as const) {
      const e = parameters[c];
      if (e !== undefined && e.fixed !== true) { e.identified = false; e.unidentifiedReason = why; }
    }
  }
  // The constants' joint statistics (ln p), for every reader.
  const maps: ConstantMap[] = [];
  for (const c of shown) {
    const est = parameters[c];
    if (est === undefined) continue;
    if (est.fixed === true) { maps.push({ name: c, value: est.value, status: 'pinned', gradient: [] }); continue; }
    if (c === 'Ts') {
      maps.push({ name: c, value: v.Ts, status: 'fitted', gradient: [...(index.Tc >= 0 ? [[index.Tc, v.Tc / v.Ts]] : []), [index.Ts, (v.Ts - v.Tc) / v.Ts]] as [number, number][] });
      continue;
    }
    const j = index[c];
    maps.push(j >= 0 ? { name: c, value: est.value, status: 'fitted', gradient: [[j, 1]] } : { name: c, value: est.value, status: 'absent', gradient: [] });
  }
  const constantCovariance = logCovarianceOfConstants(maps, cov === null ? null : cov.covariance, cov === null ? [] : cov.identifiable, p, intervalDof);
  // Residual series and per-channel fit quality.
  const { series } = problem.residualsAt(theta);
  const reports: RecordingReport[] = recs.map((r, i) => {
    const s = series[i]!;
    const channels: ChannelFit[] = [];
    const add = (channel: ChannelFit['channel'], meas: Float64Array | null, res: Float64Array | null, sig: number, method: ChannelFit['sigmaMethod']): void => {
      if (meas === null || res === null) return;
      let m = 0, cnt = 0;
      for (let k = 0; k < res.length; k++) if (Number.isFinite(res[k]!)) { m += meas[k]!; cnt++; }
      m /= Math.max(cnt, 1);
      let vv = 0, ss = 0;
      for (let k = 0; k < res.length; k++) if (Number.isFinite(res[k]!)) { vv += (meas[k]! - m) ** 2; ss += res[k]! ** 2; }
      const rms = Math.sqrt(ss / Math.max(cnt, 1)), sd = Math.sqrt(vv / Math.max(cnt, 1));
      channels.push({ channel, sigma: sig, sigmaMethod: method, samples: cnt, rms, nrmse: sd > 0 ? rms / sd : NaN, residuals: opts.keepResiduals ? res : null });
    };
    const how = (n: NoiseLevel | null): ChannelFit['sigmaMethod'] => (opts.reweight ? 'residuals' : n?.method ?? 'given');
    add('current', r.current, s.current, sigma[i]!.current, how(r.currentNoise));
    add('speed', r.speed, s.speed, r.encoder !== null ? NaN : sigma[i]!.speed, r.encoder !== null ? 'encoder' : how(r.speedNoise));
    if (s.angle !== null && r.speed !== null) {
      const ang = new Float64Array(r.time.length);
      for (let k = r.first + 1; k < ang.length; k++) ang[k] = ang[k - 1]! + r.speed[k]! * (r.time[k]! - r.time[k - 1]!);
      add('angle', ang, s.angle, sigma[i]!.speed, 'quantisation');
    }
    add('voltage', r.terminal, s.terminal, sigma[i]!.terminal, how(r.terminalNoise));
    const nuisance: Record<string, number> = {};
    const sl = slots[i]!;
    if (r.handling.stepTime !== null) nuisance.stepTime = r.handling.stepTime;
    sl.level.forEach((j, q) => { nuisance[`level${q}`] = theta[j]! * entries[j]!.scale; });
    if (sl.offset >= 0) nuisance.currentOffset = theta[sl.offset]! * entries[sl.offset]!.scale;
    if (sl.w0 >= 0) nuisance.initialSpeed = theta[sl.w0]! * entries[sl.w0]!.scale;
    if (sl.cut >= 0) nuisance.cutInstant = theta[sl.cut]! * entries[sl.cut]!.scale;
    if (sl.angle >= 0) nuisance.angleOffset = theta[sl.angle]! * entries[sl.angle]!.scale;
    return { name: r.name, kind: r.kind, kindSource: r.kindSource, kindReason: r.kindReason, samples: r.time.length, input: r.handling, channels, nuisance };
  });
  const start: Record<string, { value: number; source: string }> = {};
  for (const c of DETAILED_CONSTANTS) if (index[c] >= 0 && !(c === 'Ke' && tied)) start[c] = { value: c === 'Ts' ? v.Ts : Math.exp(theta0[index[c]]!), source: opts.startSource[c] ?? 'default' };
  const extNames = (Object.keys(ext) as (keyof ModelExtensions)[]).filter((k) => ext[k]);
  return {
    parameters, notInformed, recordings: reports,
    variant: {
      torqueConstant: 'equal', coulomb: ext.coulomb === true, extensions: extNames,
      description: `DC motor, Kt = Ke imposed (SI)${extNames.length ? `, with ${extNames.map(describeExtension).join(', ')}` : ', lumped linear model, viscous friction only'}`,
    },
    fittedNames: names, theta: Array.from(theta), normalMatrix: Float64Array.from(sol.JtJ), covariance: cov === null ? null : Float64Array.from(cov.covariance), constantCovariance,
    ...(cov === null ? {} : { information: {
      constantIndex: Object.fromEntries(Object.entries(index).filter(([, j]) => j >= 0)),
      singularValues: cov.singularValues, conditionNumber: cov.conditionNumber, identifiable: cov.identifiable, rank: cov.rank,
    } }),
    ssr: sol.ssr, rows, residualVariance: dof > 0 ? sol.ssr / dof : NaN, degreesOfFreedom: dof, start, starts: attempts,
    iterations, jacobianEvaluations, functionEvaluations, converged: sol.converged, stopReason: sol.stopReason,
  };
}

function describeExtension(e: keyof ModelExtensions): string {
  return {
    coulomb: 'Coulomb friction Tc·sgn(ω)', stiction: 'stiction Ts', drag: 'drag c·ω|ω|', voltageLimit: 'drive voltage limit Vmax',
    currentLimit: 'drive current limit Imax', heating: 'winding heating (copper law, Rth, Cth)',
  }[e];
}

/** Drops θ entry j (a constant held at its start), re-indexing the layout. */
function removeEntry(setup: DetailedSetup, theta0: number[], j: number): void {
  setup.entries.splice(j, 1);
  theta0.splice(j, 1);
  for (const c of Object.keys(setup.index) as DetailedConstant[]) {
    if (setup.index[c] === j) setup.index[c] = -1;
    else if (setup.index[c] > j) setup.index[c]--;
  }
  for (const sl of setup.slots) {
    sl.level = sl.level.map((x) => (x > j ? x - 1 : x));
    sl.sine = sl.sine.map((x) => (x > j ? x - 1 : x));
    for (const k of ['offset', 'w0', 'i0', 'angle', 'cut'] as const) if (sl[k] > j) sl[k]--;
  }
}

function emptyFit(recs: PreparedRecording[], notInformed: UninformedConstant[], ext: ModelExtensions, tied: boolean, names: string[]): MotorFit {
  return {
    parameters: {}, notInformed, recordings: recs.map((r) => ({ name: r.name, kind: r.kind, kindSource: r.kindSource, kindReason: r.kindReason, samples: r.time.length, input: r.handling, channels: [], nuisance: {} })),
    variant: { torqueConstant: tied ? 'equal' : 'separate', coulomb: ext.coulomb === true, extensions: [], description: 'nothing to fit' },
    fittedNames: names, theta: [], normalMatrix: new Float64Array(0), covariance: null, ssr: NaN, rows: 0, residualVariance: NaN, degreesOfFreedom: 0,
    start: {}, starts: [], iterations: 0, jacobianEvaluations: 0, functionEvaluations: 0, converged: false, stopReason: 'nothing-to-fit',
  };
}

/** The Gauss–Newton step −(JᵀJ)⁻¹Jᵀr with unit-norm column scaling; null when the system is singular. */
