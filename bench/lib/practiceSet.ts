/**
 * Scores motorprint on the practice set of invented recordings from an independent simulator
 * (`../shared/reference/bench-practice/`, see its README): every case is read and fitted the way
 * `motorprint fit` does it, and the result is compared with the case's `truth.json`.
 *
 * Invented data: none of the practice set is a measurement.
 */
import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readRecording } from '@motorprint/ingest';
import type { MotorFit } from '@motorprint/estimate';
import { identifyMotor, type FitDiagnosis, type Identification } from '@motorprint/diagnose';

/** Where the practice set lives, or null when it is not beside the project. */
export function practiceSetDir(): string | null {
  const candidates = [process.env.MOTORPRINT_PRACTICE_DIR, join(import.meta.dirname, '../../../shared/reference/bench-practice')];
  for (const c of candidates) if (c && existsSync(join(c, 'cases'))) return c;
  return null;
}

/** truth.json keys → motorprint constant names. */
const KEY_OF: Record<string, string> = {
  R_ohm: 'R', L_H: 'L', Kt_Nm_per_A: 'Kt', Ke_V_s_per_rad: 'Ke', J_kg_m2: 'J', b_Nm_s_per_rad: 'b',
  Tc_Nm: 'Tc', Ts_Nm: 'Ts', c_Nm_s2: 'c', Vmax_V: 'Vmax', Imax_A: 'Imax', Rs_ohm: 'Rs', R_plus_Rs_ohm: 'R+Rs',
  R20_ohm: 'R20', Rth_K_per_W: 'Rth', Cth_J_per_K: 'Cth', b_over_J_per_s: 'b/J',
};

/** Finding code that names each effect of the simulator. */
export const EFFECT_FINDING: Record<string, string[]> = {
  coulomb: ['coulomb-friction'], stiction: ['stiction'], drag: ['speed-squared-drag'], vsat: ['drive-saturation', 'voltage-limit'],
  ilim: ['drive-saturation', 'current-limit'], thermal: ['winding-heating'], rs: ['source-resistance'],
};
/** Findings that are not about an effect of the motor (advice about the experiment itself). */
const ADVISORY = new Set(['weak-excitation', 'slow-sampling']);

export interface ConstantScore {
  key: string;
  truth: number;
  /** Estimate, or null when motorprint gave none. */
  value: number | null;
  ci: [number, number] | null;
  tolerance: number;
  /** |estimate − truth| / tolerance (null without an estimate). */
  errorInTolerances: number | null;
  covered: boolean | null;
  strength: 'identifiable' | 'weak';
}

export interface CaseScore {
  id: string;
  experiment: string;
  effects: string[];
  /** `ok`, or why there is no result. */
  status: string;
  constants: ConstantScore[];
  findings: string[];
  /** Effect findings on a clean recording (false alarms). */
  falseFindings: string[];
  /** Effects that are on and that a finding or the chosen model names. */
  effectsNamed: string[];
  /** Extensions of the chosen model, in the simulator's effect names (coulomb, stiction, drag, vsat, ilim, thermal). */
  chosen: string[];
  seconds: number;
}

interface Truth {
  experiment: string;
  true_parameters: Record<string, number>;
  effects: Record<string, boolean>;
  identifiable: string[];
  weakly_identifiable: string[];
  tolerance: { abs: Record<string, number> };
  fixed_in_fit?: string[];
}

/** What one `motorprint fit` run gives, as the practice harness reads it. */
export interface PipelineResult {
  fit: MotorFit;
  diagnosis: FitDiagnosis;
  identification?: Identification;
}

/**
 * The `motorprint fit` pipeline on one file (`identifyMotor`, the call the command line makes).
 * Constants the case's truth lists as `fixed_in_fit` (known from another run of the same motor,
 * e.g. R of a table from the locked-rotor case) are pinned at their true values, as a user would
 * pin them with `--fix`.
 */
export async function fitLikeTheCli(file: string, fix: Record<string, number> = {}): Promise<PipelineResult> {
  const { recording } = await readRecording(file);
  const id = identifyMotor([{ recording, name: file }], { fit: Object.keys(fix).length > 0 ? { fix } : {} });
  if (!id.fit.converged) throw new Error(`fit did not converge (${id.fit.stopReason})`);
  return { fit: id.fit, diagnosis: id.diagnosis, identification: id };
}

function lookup(d: FitDiagnosis, fit: MotorFit, key: string): { value: number | null; ci: [number, number] | null } {
  const p = d.parameters[key] as { value: number | null; interval95: [number, number] | null; identifiable?: boolean } | undefined;
  if (p !== undefined && p.value !== null && p.identifiable !== false) return { value: p.value, ci: p.interval95 };
  void fit;
  return { value: null, ci: null };
}

/** Scores one case. */
export async function scoreCase(dir: string, id: string, run: (file: string, fix: Record<string, number>) => Promise<PipelineResult> = fitLikeTheCli): Promise<CaseScore> {
  const truth = JSON.parse(readFileSync(join(dir, 'cases', id, 'truth.json'), 'utf8')) as Truth;
  const fix: Record<string, number> = {};
  for (const entry of truth.fixed_in_fit ?? []) {
    const tk = entry.split(' ')[0]!;
    const key = KEY_OF[tk];
    const v = truth.true_parameters[tk];
    if (key !== undefined && v !== undefined && ['R', 'L', 'Kt', 'Ke', 'J', 'b'].includes(key)) fix[key] = v;
  }
  const effects = Object.entries(truth.effects).filter(([, on]) => on).map(([e]) => e);
  const score: CaseScore = { id, experiment: truth.experiment, effects, status: 'ok', constants: [], findings: [], falseFindings: [], effectsNamed: [], chosen: [], seconds: 0 };
  const t0 = performance.now();
  let result: PipelineResult | null = null;
  try {
    result = await run(join(dir, 'cases', id, 'data.csv'), fix);
  } catch (err) {
    score.status = (err instanceof Error ? `${err.constructor.name}: ${err.message}` : String(err)).slice(0, 160);
  }
  score.seconds = (performance.now() - t0) / 1000;
  const wanted = [...truth.identifiable.map((k) => [k, 'identifiable'] as const), ...truth.weakly_identifiable.map((k) => [k, 'weak'] as const)];
  for (const [tk, strength] of wanted) {
    const key = KEY_OF[tk] ?? tk;
    const t = truth.true_parameters[tk] ?? (tk === 'R_plus_Rs_ohm' ? (truth.true_parameters.R_ohm ?? NaN) + (truth.true_parameters.Rs_ohm ?? NaN)
      : tk === 'b_over_J_per_s' ? (truth.true_parameters.b_Nm_s_per_rad ?? NaN) / (truth.true_parameters.J_kg_m2 ?? NaN) : NaN);
    const tol = truth.tolerance.abs[tk] ?? Math.abs(t) * 0.005;
    // With the heating model the simulator's R is the resistance at 20 °C.
    const got = result === null ? { value: null, ci: null } : lookup(result.diagnosis, result.fit, key === 'R' && effects.includes('thermal') && result.diagnosis.parameters.R20 ? 'R20' : key);
    score.constants.push({
      key, truth: t, value: got.value, ci: got.ci, tolerance: tol, strength,
      errorInTolerances: got.value === null ? null : Math.abs(got.value - t) / tol,
      covered: got.ci === null ? null : got.ci[0] <= t && t <= got.ci[1],
    });
  }
  if (result !== null) {
    const codes = result.diagnosis.findings.filter((f) => f.severity !== 'info').map((f) => f.code);
    score.findings = [...new Set(codes)];
    {
      const v = result.fit.variant as { coulomb?: boolean; extensions?: string[] };
      const EFFECT_OF: Record<string, string> = { voltageLimit: 'vsat', currentLimit: 'ilim', heating: 'thermal' };
      score.chosen = [...new Set([...(v.coulomb ? ['coulomb'] : []), ...(v.extensions ?? []).map((e) => EFFECT_OF[e] ?? e)])].sort();
    }
    const effectCodes = score.findings.filter((c) => !ADVISORY.has(c));
    if (effects.length === 0) score.falseFindings = effectCodes;
    else {
      const variant = result.fit.variant as { coulomb?: boolean; extensions?: string[] };
      // An effect is named by a finding of any severity (a chosen model's effect is stated as an
      // info finding) or by the extension in the fitted model.
      const allCodes = new Set(result.diagnosis.findings.map((f) => f.code));
      const EXTENSION_OF: Record<string, string> = { vsat: 'voltageLimit', ilim: 'currentLimit', thermal: 'heating' };
      for (const e of effects) {
        const named = (EFFECT_FINDING[e] ?? []).some((c) => allCodes.has(c)) ||
          (e === 'coulomb' && variant.coulomb === true) || (variant.extensions ?? []).includes(EXTENSION_OF[e] ?? e);
        if (named) score.effectsNamed.push(e);
      }
    }
  }
  return score;
}

/** Every case id of the practice set. */
export function practiceCases(dir: string): string[] {
  return readdirSync(join(dir, 'cases')).filter((d) => existsSync(join(dir, 'cases', d, 'truth.json'))).sort();
}

export interface PracticeSummary {
  cases: number;
  noResult: number;
  /** Identifiable constants of the linear (no-effect) recordings within tolerance. */
  linearWithin: [number, number];
  /** Identifiable constants of the effect recordings within tolerance. */
  effectWithin: [number, number];
  /** 95 % intervals covering the truth, over all scored constants with an interval. */
  coverage: [number, number];
  /** Clean recordings with no effect finding. */
  cleanQuiet: [number, number];
  /** Effects named, over all effects that are on. */
  effectsNamed: [number, number];
  /** Recordings whose chosen model holds exactly the effects that are on (rs, a supply term, aside). */
  chosenRight: [number, number];
}

export function summarise(scores: CaseScore[]): PracticeSummary {
  const s: PracticeSummary = { cases: scores.length, noResult: 0, linearWithin: [0, 0], effectWithin: [0, 0], coverage: [0, 0], cleanQuiet: [0, 0], effectsNamed: [0, 0], chosenRight: [0, 0] };
  for (const c of scores) {
    if (c.status !== 'ok') s.noResult++;
    const bucket = c.effects.length === 0 ? s.linearWithin : s.effectWithin;
    for (const k of c.constants) {
      if (k.strength === 'identifiable') { bucket[1]++; if (k.errorInTolerances !== null && k.errorInTolerances <= 1) bucket[0]++; }
      if (k.covered !== null) { s.coverage[1]++; if (k.covered) s.coverage[0]++; }
    }
    if (c.effects.length === 0) { s.cleanQuiet[1]++; if (c.falseFindings.length === 0 && c.status === 'ok') s.cleanQuiet[0]++; }
    if (c.status === 'ok') {
      // Stiction in the simulator rides on a Coulomb level (Tc > 0), as in our model: it implies coulomb.
      const on = c.effects.filter((e) => e !== 'rs');
      const want = [...new Set([...on, ...(on.includes('stiction') ? ['coulomb'] : [])])].sort().join(',');
      s.chosenRight[1]++;
      if (c.chosen.join(',') === want) s.chosenRight[0]++;
    }
    s.effectsNamed[0] += c.effectsNamed.length;
    s.effectsNamed[1] += c.effects.length;
  }
  return s;
}

const pct = ([a, b]: [number, number]): string => `${a}/${b} (${b > 0 ? ((100 * a) / b).toFixed(0) : '—'} %)`;

/** The table `pnpm bench practice` prints. */
export function formatPractice(scores: CaseScore[]): string {
  const lines: string[] = [];
  lines.push('case                              kind       effects          chosen           status  in tol  worst×tol  covered  findings');
  for (const c of scores) {
    const ident = c.constants.filter((k) => k.strength === 'identifiable');
    const within = ident.filter((k) => k.errorInTolerances !== null && k.errorInTolerances <= 1).length;
    const worst = c.constants.reduce((m, k) => Math.max(m, k.errorInTolerances ?? Infinity), 0);
    const cov = c.constants.filter((k) => k.covered !== null);
    const missing = c.constants.filter((k) => k.value === null).map((k) => k.key);
    lines.push(
      `${c.id.padEnd(33)} ${c.experiment.padEnd(10)} ${(c.effects.join(',') || '—').padEnd(16)} ${(c.chosen.join(',') || '—').padEnd(16)} ${(c.status === 'ok' ? 'ok' : 'FAIL').padEnd(7)} ` +
      `${`${within}/${ident.length}`.padEnd(7)} ${(Number.isFinite(worst) ? worst.toFixed(2) : '∞').padStart(9)}  ${`${cov.filter((k) => k.covered).length}/${cov.length}`.padEnd(8)} ` +
      `${c.findings.join(',') || '—'}${missing.length ? `  [no value: ${missing.join(',')}]` : ''}${c.status !== 'ok' ? `  [${c.status}]` : ''}`,
    );
  }
  const s = summarise(scores);
  lines.push('');
  lines.push(`no result                      ${s.noResult}/${s.cases}`);
  lines.push(`linear recordings: identifiable constants within tolerance.abs  ${pct(s.linearWithin)}`);
  lines.push(`effect recordings: identifiable constants within tolerance.abs  ${pct(s.effectWithin)}`);
  lines.push(`95 % intervals covering the truth                                ${pct(s.coverage)}`);
  lines.push(`clean recordings without an effect finding                       ${pct(s.cleanQuiet)}`);
  lines.push(`effects named (finding or chosen model)                          ${pct(s.effectsNamed)}`);
  lines.push(`chosen model holds exactly the effects that are on               ${pct(s.chosenRight)}`);
  return lines.join('\n');
}
