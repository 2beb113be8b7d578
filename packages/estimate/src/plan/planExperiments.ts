import { checkMotorParams, lockedRotorHoldTime } from '@motorprint/model';
import type { MotorParams } from '@motorprint/model';
import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import { fitMotor } from '../motor/fitMotor.js';
import type { MotorFit } from '../motor/types.js';
import { resolveRun, timeConstantsOf } from './resolveRun.js';
import { simulateResolved } from './simulatePlannedRun.js';
import type {
  ExperimentPlan, LockedRotorBudget, PlannedConstant, PlannedRun, PlanOptions, PlanSuggestion, ResolvedRun,
} from './types.js';

/**
 * Relative SE above which a constant is set aside as barely informed: the estimator's own rule
 * for "not identified" (50 %, `fitDetailed`; common practice, no source).
 */
const SET_ASIDE = 0.5;
const UNITS: Record<string, string> = { R: 'Ω', L: 'H', K: 'N·m/A', Kt: 'N·m/A', Ke: 'V·s/rad', J: 'kg·m²', b: 'N·m·s/rad' };
/** Factors tried on duration and sample rate by the suggestions (powers of two; common practice, no source). */
const FACTORS = [2, 4, 8, 16, 32, 64];
/** Sample budget of a suggested run: beyond it a suggestion is not tried. */
const MAX_SAMPLES = 2e6;

/** The information of a set of runs: the fit's normal matrix at the draft, by θ name. */
interface Information { names: string[]; JtJ: Float64Array; fit: MotorFit }

/**
 * The fit's Fisher information of planned runs at the draft: each run is simulated without
 * output noise (the voltage keeps its noise so that the fit rebuilds the command as it would),
 * and `fitMotor` — the lumped model, viscous friction only, the planned noise SDs as its weights,
 * no re-weighting — starts at the draft and stays there; its JᵀJ of the whitened residuals is the
 * information.
 */
function informationOf(draft: MotorParams, runs: ResolvedRun[], seed: number): Information {
  const items = runs.map((r, i) => {
    const s = simulateResolved(draft, r, seed + i, 'voltage');
    return { recording: s.recording, kind: s.kind, name: s.name };
  });
  const fit = fitMotor(items, {
    initial: { ...draft },
    noise: runs.map((r) => ({
      ...(r.voltage ? { current: r.sigma.current } : {}),
      speed: r.sigma.speed, ...(r.sigma.angle !== null ? { angle: r.sigma.angle } : {}),
    })),
    reweight: false, coulomb: false, extensions: {}, keepResiduals: false,
  });
  return { names: fit.fittedNames, JtJ: fit.normalMatrix, fit };
}

/** Covariance of the θ entries kept (the others pinned), with the SDs of the constants' logs. */
function logSdOf(info: Information, constants: string[], pinned: Set<string>): Map<string, number> {
  const keep = info.names.map((nm, j) => [nm, j] as const).filter(([nm]) => !pinned.has(nm.replace(/^ln /, '')));
  const p = info.names.length;
  const q = keep.length;
  const out = new Map<string, number>();
  if (q === 0) return out;
  const sub = new Float64Array(q * q);
  keep.forEach(([, a], i) => keep.forEach(([, b], j) => { sub[i * q + j] = info.JtJ[a * p + b]!; }));
  // σ² = 1: the residuals are whitened by the planned noise, so (JᵀJ)⁻¹ is the Cramér–Rao bound.
  const cov = covarianceFromNormalMatrix(sub, q, 1e6, 1e6 + q);
  keep.forEach(([nm], i) => {
    const c = nm.replace(/^ln /, '');
    if (!constants.includes(c)) return;
    const v = cov.covariance[i * q + i]!;
    out.set(c, cov.identifiable[i] && v >= 0 && Number.isFinite(v) ? Math.sqrt(v) : Infinity);
  });
  return out;
}

/** Predicted relative SEs with the set-aside rule applied (repeatedly, worst first). */
function predict(info: Information): { rel: Map<string, number>; aside: Map<string, number>; constants: string[] } {
  const constants = info.names.filter((n) => n.startsWith('ln ')).map((n) => n.slice(3));
  const pinned = new Set<string>();
  const aside = new Map<string, number>();
  for (;;) {
    const rel = logSdOf(info, constants, pinned);
    let worst: string | null = null, wv = SET_ASIDE;
    for (const [c, v] of rel) if (v > wv) { worst = c; wv = v; }
    if (worst === null) return { rel, aside, constants };
    aside.set(worst, wv);
    pinned.add(worst);
  }
}

const pct = (x: number): string => `${x >= 0.1 ? (100 * x).toPrecision(2) : (100 * x).toPrecision(2)} %`;
/** A duration or rate with a readable unit. */
function show(knob: 'duration' | 'sampleRate' | 'bitTime' | 'levels', v: number): string {
  if (knob === 'levels') return `${+v.toPrecision(3)} V`;
  if (knob === 'sampleRate') return v >= 1e3 ? `${+(v / 1e3).toPrecision(3)} kHz` : `${+v.toPrecision(3)} Hz`;
  return v >= 1 ? `${+v.toPrecision(3)} s` : v >= 1e-3 ? `${+(v * 1e3).toPrecision(3)} ms` : `${+(v * 1e6).toPrecision(3)} µs`;
}
const KNOB_WORDS = { duration: 'duration', sampleRate: 'sample rate', bitTime: 'bit time', levels: 'top level' } as const;

/**
 * Predicts, before a bench session, how well planned runs will pin each motor constant down:
 * standard errors from the Fisher information (Cramér–Rao bound) of the same model and
 * sensitivities `fitMotor` uses, the share of each run in every constant's information, changes of
 * the runs that reach a target relative SE, and the locked-rotor time budget.
 *
 * ## Method
 * Each planned run is simulated at the draft with the model package's simulator
 * ({@link simulatePlannedRun}'s inputs). The outputs are left noise-free and the voltage gets its
 * planned noise (a fixed seed, `options.seed`), so the estimator rebuilds the command exactly as
 * it would from a real log; `fitMotor` (lumped model, viscous friction only, whitened by the
 * planned noise SDs, which quantisation q adds to as q/√12) then starts at the draft and stays
 * there. Its JᵀJ is the Fisher information I of θ (ln of the constants, plus the nuisances: input
 * levels, offsets, initial speeds), and I⁻¹ the Cramér–Rao bound; the relative SE of a constant
 * is √(I⁻¹)ᵢᵢ on the log scale. A constant above 50 % relative SE (the estimator's rule for "not
 * identified") is set aside: the others are predicted with it pinned, and the result says so.
 * A run's share of a constant's information is its diagonal entry from a fit of that run alone
 * over the sum of those entries. Suggestions, for each constant that misses the target: the
 * smallest power-of-two increase of one run's duration or sample rate (or a shorter or longer
 * PRBS bit time, or levels raised towards `options.volts` when it was given and is above them)
 * that meets it, else the cheapest pair of duration and sample rate, each change evaluated anew.
 *
 * ## References
 * C. R. Rao (1945), "Information and the accuracy attainable in the estimation of statistical
 * parameters", Bull. Calcutta Math. Soc. 37, 81–91; H. Cramér (1946), Mathematical Methods of
 * Statistics, Princeton (the bound). L. Ljung (1999), System Identification: Theory for the User,
 * 2nd ed., Prentice Hall, ch. 13 (experiment design from the information matrix).
 *
 * The locked-rotor budget is arithmetic on assumed thermal data (`lockedRotorHoldTime`); the
 * motor maker's rating and local codes decide how long a winding may be held.
 *
 * @param draft - draft constants (a previous fit or nominal guesses) [SI]
 * @param runs - planned runs
 * @param options - volts and noise for defaults, target, suggestions, thermal data, allowed rise
 * @returns the {@link ExperimentPlan}
 * @throws TypeError / RangeError naming the bad argument
 * @example
 * const plan = planExperiments(draft, [{ kind: 'locked-rotor', levels: [0, 6], sampleRate: 50000 }, { kind: 'step' }], { noise: { voltage: 0.05, current: 0.02, speed: 0.3 } });
 * plan.constants.map((c) => [c.name, c.relativeError]);
 */
export function planExperiments(draft: MotorParams, runs: PlannedRun[], options: PlanOptions = {}): ExperimentPlan {
  const fn = 'planExperiments';
  checkMotorParams(fn, draft);
  if (!Array.isArray(runs) || runs.length === 0) throw new TypeError(`${fn}: runs must be a non-empty array of planned runs`);
  if (options === null || typeof options !== 'object') throw new TypeError(`${fn}: options must be an object`);
  const target = options.target ?? 0.01;
  if (typeof target !== 'number' || !(target > 0 && target < 1)) throw new RangeError(`${fn}: options.target must be a number between 0 and 1 (got ${String(target)})`);
  const seed = options.seed ?? 1;
  if (!Number.isInteger(seed)) throw new RangeError(`${fn}: options.seed must be an integer (got ${String(seed)})`);
  const resolved = runs.map((r, i) => resolveRun(fn, draft, r, i, options));
  const names = new Set<string>();
  for (const r of resolved) {
    if (names.has(r.name)) throw new RangeError(`${fn}: two runs are named "${r.name}"; names must differ`);
    names.add(r.name);
  }

  const info = informationOf(draft, resolved, seed);
  const { rel, aside } = predict(info);
  // Per-run information (diagonal) for the shares.
  const perRun = resolved.map((r) => {
    try {
      const one = informationOf(draft, [r], seed);
      const p = one.names.length;
      const m = new Map<string, number>();
      one.names.forEach((nm, j) => { if (nm.startsWith('ln ')) m.set(nm.slice(3), one.JtJ[j * p + j]!); });
      return m;
    } catch { return new Map<string, number>(); }
  });
  // Kt = Ke unless a loaded run separates them (as in the fit).
  const tied = !resolved.some((r) => r.kind === 'loaded');
  const valueOf = (c: string): number => (c === 'K' ? draft.Kt : (draft as unknown as Record<string, number>)[c]!);
  const allNames = tied ? ['R', 'L', 'K', 'J', 'b'] : ['R', 'L', 'Kt', 'Ke', 'J', 'b'];
  const planned: PlannedConstant[] = allNames.map((c) => {
    const value = valueOf(c);
    const total = perRun.reduce((s, m) => s + (m.get(c) ?? 0), 0);
    const shares: Record<string, number> = {};
    resolved.forEach((r, i) => { const v = perRun[i]!.get(c) ?? 0; if (total > 0 && v > 0) shares[r.name] = v / total; });
    const base = { name: c, value, unit: UNITS[c]!, shares };
    if (aside.has(c)) return { ...base, standardError: null, relativeError: null, status: 'set-aside' as const, met: false, relativeErrorFree: aside.get(c)! };
    const s = rel.get(c);
    // The fit itself says when no run informs a constant (e.g. L from steady points): so does the plan.
    const reported = info.fit.parameters[c === 'K' ? 'Kt' : c];
    if (reported === undefined || info.fit.notInformed.some((u) => u.name === c || (c === 'K' && u.name === 'Kt'))) {
      return { ...base, standardError: null, relativeError: null, status: 'not-informed' as const, met: false };
    }
    if (s === undefined || !Number.isFinite(s)) return { ...base, standardError: null, relativeError: null, status: 'not-informed' as const, met: false };
    return { ...base, standardError: value * s, relativeError: s, status: 'identified' as const, met: s <= target };
  });

  const tc = timeConstantsOf(draft);
  const notes: string[] = [];
  for (const r of resolved) {
    const h = 1 / r.sampleRate;
    if ((r.kind === 'locked-rotor' || r.kind === 'step' || r.kind === 'prbs' || r.kind === 'multisine' || r.kind === 'loaded') && h > tc.electrical / 2) {
      // The same line as the fit's slow-sampling finding: τe shorter than two sample intervals.
      notes.push(`${r.name}: the sample interval ${show('duration', h)} is ${(h / tc.electrical).toPrecision(2)} τe (τe = L/R = ${show('duration', tc.electrical)}); L is seen in few samples per transient`);
    }
    if (r.kind === 'prbs' && r.bitTime !== null && (r.bitTime < tc.mechanical / 10 || r.bitTime > 3 * tc.mechanical)) {
      notes.push(`${r.name}: the bit time ${show('duration', r.bitTime)} is ${(r.bitTime / tc.mechanical).toPrecision(2)} τm (τm = ${show('duration', tc.mechanical)}); about τm/2 excites J and b together`);
    }
    if ((r.kind === 'step' || r.kind === 'loaded') && r.duration * 0.9 < 3 * tc.mechanical) {
      notes.push(`${r.name}: the step is held ${show('duration', 0.9 * r.duration)}, under 3 τm (${show('duration', 3 * tc.mechanical)}); the running steady state, which pins b, is not reached`);
    }
  }

  const suggestions: PlanSuggestion[] = [];
  if (options.suggest !== false) {
    for (const pc of planned) {
      if (pc.met || pc.status === 'not-informed') continue;
      const c = pc.name;
      const fromRel = pc.relativeError ?? pc.relativeErrorFree ?? Infinity;
      // Runs in the order of their share (the run that informs the constant most first).
      const order = resolved.map((_, i) => i).sort((a, b) => (pc.shares[resolved[b]!.name] ?? 0) - (pc.shares[resolved[a]!.name] ?? 0));
      const tryChange = (i: number, changes: PlanSuggestion['changes']): number => {
        const r = { ...resolved[i]! };
        for (const ch of changes) {
          if (ch.knob === 'levels') r.levels = r.levels.map((v) => (v * ch.to) / ch.from);
          else (r as unknown as Record<string, number>)[ch.knob] = ch.to;
        }
        if (r.duration * r.sampleRate > MAX_SAMPLES) return Infinity;
        try {
          const next = predict(informationOf(draft, resolved.map((x, j) => (j === i ? r : x)), seed));
          return next.aside.has(c) ? Infinity : next.rel.get(c) ?? Infinity;
        } catch { return Infinity; }
      };
      let found: PlanSuggestion | null = null;
      for (const i of order.slice(0, 2)) {
        const r = resolved[i]!;
        const single: PlanSuggestion['changes'][] = [];
        for (const f of FACTORS) single.push([{ knob: 'duration', from: r.duration, to: r.duration * f }]);
        for (const f of FACTORS.slice(0, 4)) single.push([{ knob: 'sampleRate', from: r.sampleRate, to: r.sampleRate * f }]);
        if (r.bitTime !== null) for (const f of [0.25, 0.5, 2, 4]) single.push([{ knob: 'bitTime', from: r.bitTime, to: r.bitTime * f }]);
        // Levels: only up to the supply the caller stated (options.volts), never beyond it.
        const top = Math.max(...r.levels.map(Math.abs));
        if (options.volts !== undefined && top > 0 && options.volts > top) {
          for (const v of [...new Set([Math.min(1.5 * top, options.volts), options.volts])]) single.push([{ knob: 'levels', from: top, to: v }]);
        }
        const pairs: PlanSuggestion['changes'][] = [];
        for (const fd of FACTORS) for (const fr of FACTORS.slice(0, 4)) pairs.push([{ knob: 'duration', from: r.duration, to: r.duration * fd }, { knob: 'sampleRate', from: r.sampleRate, to: r.sampleRate * fr }]);
        pairs.sort((a, b) => a[0]!.to * a[1]!.to - b[0]!.to * b[1]!.to);
        let best: { changes: PlanSuggestion['changes']; to: number } | null = null;
        // Singles by knob, smallest factor first: stop a knob at the first change that meets the target.
        for (const knob of ['duration', 'sampleRate', 'bitTime', 'levels'] as const) {
          for (const ch of single.filter((s) => s[0]!.knob === knob)) {
            if ((knob === 'duration' || knob === 'sampleRate') && ch[0]!.to * (knob === 'sampleRate' ? r.duration : r.sampleRate) > MAX_SAMPLES) break;
            const v = tryChange(i, ch);
            if (v <= target) { if (best === null || ch[0]!.to / ch[0]!.from < best.changes[0]!.to / best.changes[0]!.from) best = { changes: ch, to: v }; break; }
          }
        }
        if (best === null) {
          for (const ch of pairs.slice(0, 8)) {
            const v = tryChange(i, ch);
            if (v <= target) { best = { changes: ch, to: v }; break; }
          }
        }
        if (best !== null) {
          const text = best.changes.map((ch) => `${KNOB_WORDS[ch.knob]} ${show(ch.knob, ch.from)} → ${show(ch.knob, ch.to)}`).join(', and ') +
            ` (${r.name}): ${c} ${Number.isFinite(fromRel) ? pct(fromRel) : 'unbounded'} → ${pct(best.to)}`;
          found = { constant: c, run: r.name, changes: best.changes, from: fromRel, to: best.to, met: true, text };
          break;
        }
      }
      if (found !== null) suggestions.push(found);
    }
  }

  const lockedRotor: LockedRotorBudget[] = [];
  for (const r of resolved) {
    if (r.kind !== 'locked-rotor') continue;
    const top = Math.max(...r.levels.map(Math.abs));
    const current = top / draft.R;
    const holdSeconds = r.duration - Math.round(0.1 * r.duration * r.sampleRate) / r.sampleRate;
    const h = lockedRotorHoldTime({ R: draft.R, current, riseK: options.riseK ?? 20, ...(options.thermal ?? {}) });
    lockedRotor.push({ run: r.name, holdSeconds, current, budgetSeconds: h.holdSeconds, riseK: h.riseK, note: h.note, over: holdSeconds > h.holdSeconds });
  }

  return {
    draft: { ...draft }, runs: resolved, target, constants: planned,
    setAside: { names: [...aside.keys()], rule: 'relative SE above 50 % (the estimator\'s "not identified" rule): predicted as if pinned, the others computed without it' },
    timeConstants: tc, notes, suggestions, lockedRotor,
    method: 'Cramér–Rao bound from the Fisher information JᵀJ of fitMotor\'s own model and sensitivities (lumped model, viscous friction) at the draft, on noise-free simulations of the planned runs, whitened by the planned noise',
  };
}
