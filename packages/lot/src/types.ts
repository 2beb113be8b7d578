/**
 * Plain data shapes of `@motorprint/lot`: the acceptance spec, the plan of a lot folder, what the
 * fit of one motor hands back, verdicts, lot statistics and what the store records. Everything here
 * is JSON-able (no typed arrays), so it crosses worker threads and goes into the store as it is.
 */
import type { RecordingData } from '@motorprint/estimate';
import type { ParameterSet } from '@motorprint/report';

/** Experiment kinds a `runs.csv` may declare (the estimator's vocabulary). */
export type RunKind = 'locked-rotor' | 'step' | 'coast-down' | 'steady-state' | 'prbs' | 'multisine' | 'loaded';

/** One checked key of a spec, resolved to its lower and upper specification limits. */
export interface SpecLimit {
  /** Constant (`R`, `L`, `Kt`, `Ke`, `J`, `b`, `Tc`) or derived-figure key (see docs/derived-figures.md). */
  key: string;
  /** SI unit (constants) or the figure's unit. */
  unit: string;
  /** Plain-words label, e.g. `armature resistance`. */
  label: string;
  /** Lower specification limit LSL [unit], or null for a limit with only a maximum. */
  lower: number | null;
  /** Upper specification limit USL [unit], or null for a limit with only a minimum. */
  upper: number | null;
  /** Nominal value [unit] when the spec gave `nominal` and `tolerancePercent`, else null. */
  nominal: number | null;
  /** Tolerance [%] of the nominal when given that way, else null. */
  tolerancePercent: number | null;
  /** Where it sits in the spec file, e.g. `limits.R` (for messages). */
  path: string;
}

/** An acceptance spec (`docs/lot-spec.schema.json`), checked and resolved. */
export interface LotSpec {
  /** Name of the spec, printed with every result. */
  name: string;
  /** Optional free text (drawing number, revision). */
  description: string;
  /** Voltage the derived figures are stated at [V]; required when a voltage-dependent figure is checked. */
  ratedVoltage: number | null;
  /** Checked keys in the order the file gives them. */
  limits: SpecLimit[];
}

/** One recording of a motor as planned from its folder. */
export interface PlannedRun {
  /** Path the reader opens (absolute, or relative to the process). */
  path: string;
  /** Name shown in messages and stored, e.g. `T24-0003/step.csv`. */
  file: string;
  /** Kind declared in `runs.csv`, or null to let the estimator guess it. */
  kind: RunKind | null;
}

/** What will be fitted for one motor (one folder of the lot). */
export interface MotorPlan {
  /** Serial: the folder name. */
  serial: string;
  /** The motor's folder as shown in messages. */
  folder: string;
  /** Recordings to fit, in name order (or `runs.csv` order). */
  runs: PlannedRun[];
  /** Files of the folder that are not fitted, each with the reason (listed, never dropped silently). */
  ignored: { file: string; reason: string }[];
  /** A problem that stops this motor before any fit (no recordings, a bad `runs.csv`), or null. */
  problem: string | null;
}

/** One recording of a motor, read and in SI, ready to fit (plain data: crosses to a worker thread). */
export interface MotorRecording {
  /** Name as shown (see {@link PlannedRun.file}). */
  file: string;
  /** Declared kind, or null to have it guessed. */
  kind: RunKind | null;
  /** Time and SI channels. */
  recording: RecordingData;
}

/** A constant or derived figure of one fitted motor. */
export interface MotorValue {
  /** Estimate [unit], or null when the fit gives none (see `note`). */
  value: number | null;
  /** 95 % interval [unit], or null when there is none. */
  ci95: [number, number] | null;
  /** Unit text. */
  unit: string;
  /** Why there is no value or interval, or empty. */
  note: string;
}

/** One input file of a motor as read. */
export interface MotorInput {
  /** Name as shown (see {@link PlannedRun.file}). */
  file: string;
  /** Kind used by the fit. */
  kind: string;
  /** Whether the kind was declared in `runs.csv` or guessed from the data. */
  kindSource: 'declared' | 'guessed';
  /** SHA-256 of the file bytes. */
  sha256: string;
  /** Data rows kept. */
  rows: number;
  /** Rows the reader dropped (each is listed by `motorprint inspect`). */
  rowsDropped: number;
}

/** What fitting one motor gives back (from a worker thread, so plain data only). */
export interface MotorOutcome {
  /** Serial (folder name). */
  serial: string;
  /** `fitted` when a converged fit gave a parameter set; `error` otherwise (see `reason`). */
  status: 'fitted' | 'error';
  /** Why the motor could not be fitted (names the file and line where it applies), or empty. */
  reason: string;
  /** Constants and derived figures keyed as in a spec; empty on error. */
  values: Record<string, MotorValue>;
  /** Files read (on error: those read before the problem). */
  inputs: MotorInput[];
  /** The model the values come from, in plain words (empty on error). */
  model: string;
  /** Finding codes of the diagnosis with their severities, e.g. `coulomb-friction (warning)`. */
  findings: string[];
  /** Files of the motor folder that were not fitted, each with the reason (from the plan). */
  ignoredFiles: { file: string; reason: string }[];
  /** The full parameter set, or null on error. */
  parameterSet: ParameterSet | null;
  /** Worker thread that fitted it (0 when not fitted on a worker). */
  threadId: number;
}

/** A verdict of one key, or of a motor when it is not an error. */
export type Verdict = 'pass' | 'fail' | 'undecided';

/** A motor's verdict: `error` when it could not be fitted. */
export type MotorVerdict = Verdict | 'error';

/** The verdict of one checked key of one motor. */
export interface KeyJudgement {
  /** Spec key. */
  key: string;
  /** Unit. */
  unit: string;
  /** Estimate, or null. */
  value: number | null;
  /** 95 % interval, or null. */
  ci95: [number, number] | null;
  /** LSL, or null. */
  lower: number | null;
  /** USL, or null. */
  upper: number | null;
  /** Guard bands [unit] below and above the estimate (its distance to each end of the interval), or null. */
  guardBand: { below: number; above: number } | null;
  /** The verdict under the decision rule. */
  verdict: Verdict;
  /** Plain words: which end of the interval lies where, or why there is no interval. */
  reason: string;
}

/** Everything decided about one motor. */
export interface MotorJudgement {
  /** Serial. */
  serial: string;
  /** `pass` only when every key passes; `fail` when any key fails; `error` when not fitted. */
  verdict: MotorVerdict;
  /** One line: which keys failed or could not be decided, or the error. */
  reason: string;
  /** One entry per spec limit (empty on error). */
  keys: KeyJudgement[];
  /** What the fit gave. */
  outcome: MotorOutcome;
}

/** A motor whose value of one key lies far from the lot's median. */
export interface KeyOutlier {
  /** Serial. */
  serial: string;
  /** Estimate [unit]. */
  value: number;
  /** Robust z-score 0.6745·(x − median)/MAD. */
  robustZ: number;
}

/** Lot statistics of one checked key over the motors that have a value. */
export interface KeyStatistics {
  /** Spec key. */
  key: string;
  /** Unit. */
  unit: string;
  /** LSL and USL, as in the spec. */
  lower: number | null;
  /** USL. */
  upper: number | null;
  /** Number of motors with a value. */
  n: number;
  /** Mean [unit] (null when n = 0). */
  mean: number | null;
  /** Sample standard deviation (n − 1 divisor) [unit] (null when n < 2). */
  sd: number | null;
  /** Smallest value. */
  min: number | null;
  /** Largest value. */
  max: number | null;
  /** Median. */
  median: number | null;
  /** Median absolute deviation (unscaled). */
  mad: number | null;
  /** Cp = (USL − LSL)/(6s), or null (one-sided limit, n < 2, s = 0). */
  cp: number | null;
  /** Cpk = min(USL − x̄, x̄ − LSL)/(3s) (the side given, for a one-sided limit), or null. */
  cpk: number | null;
  /** Motors with |robust z| > 3.5. */
  outliers: KeyOutlier[];
  /** Why an index is missing, or other remarks; empty when none. */
  notes: string[];
}

/** Counts of motor verdicts. */
export interface VerdictCounts {
  /** Motors that pass. */
  pass: number;
  /** Motors that fail. */
  fail: number;
  /** Motors that could not be decided. */
  undecided: number;
  /** Motors that could not be fitted. */
  error: number;
}

/** The judged lot. */
export interface LotJudgement {
  /** One entry per motor, in plan order. */
  motors: MotorJudgement[];
  /** One entry per spec limit. */
  statistics: KeyStatistics[];
  /** Motor verdict counts. */
  counts: VerdictCounts;
  /** `pass` only when every motor passes. */
  verdict: 'pass' | 'not accepted';
}

/** The stated decision rule (JCGM 106:2012 guarded acceptance at the 95 % level). */
export interface DecisionRule {
  /** Short identifier stored with every lot run. */
  id: string;
  /** The rule in plain words. */
  text: string;
  /** What the guard band is, in plain words. */
  guardBand: string;
  /** The published documents the rule follows. */
  references: string[];
}

/** What one lot run puts in the store. */
export interface LotRunRecord {
  /** When the run started (ISO 8601, as the caller states it). */
  startedAt: string;
  /** When it finished (ISO 8601). */
  finishedAt: string;
  /** Tool name and version. */
  tool: { name: string; version: string };
  /** The lot folder as given. */
  lotFolder: string;
  /** Worker threads used. */
  jobs: number;
  /** Spec file name as given. */
  specFile: string;
  /** Spec file text exactly as read. */
  specText: string;
  /** The resolved spec. */
  spec: LotSpec;
  /** The decision rule. */
  rule: DecisionRule;
  /** The judged lot. */
  judgement: LotJudgement;
}
