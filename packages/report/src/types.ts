/**
 * Plain data shapes of `@motorprint/report`: the parameter set document, derived figures, the
 * inputs of the writers and of the SVG plot. Everything here is JSON-able except the
 * `Float64Array` series of plots and recordings.
 */
import type { MotorFit, RecordingData } from '@motorprint/estimate';

/** Schema identifier written into every parameter set (major version after the slash). */
export type ParameterSetSchemaId = 'motorprint.parameter-set/1';

/** Names of the motor constants a parameter set carries. */
export type ConstantName = 'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b' | 'Tc';

/** Copper law constant k [°C]: 234.5 (IEEE Std 113 form) or 235 (IEC 60034-1 form), FACTS.md §3. */
export type CopperLawConstant = 234.5 | 235;

/** One motor constant of a parameter set. */
export interface ParameterEntry {
  /** Value in SI [unit]; null when no recording informs it (see `note`). */
  value: number | null;
  /** SI unit text, e.g. `Ω`, `N·m/A`. */
  unit: string;
  /** 95 % confidence interval [unit], or null when there is none (fixed, not identifiable, not informed). */
  ci95: [number, number] | null;
  /** Whether the recordings pin the constant down (false when fixed by the caller, not informed, or on a dropped direction). */
  identifiable: boolean;
  /** Standard error [unit], or null. */
  standardError: number | null;
  /** True when the caller pinned the value (it was not fitted). */
  fixed: boolean;
  /** Names of the recordings that inform it. */
  informedBy: string[];
  /** Plain-words note: why there is no interval, or empty. */
  note: string;
}

/** Winding resistance carried to a reference temperature by the copper law. */
export interface ResistanceAtReference {
  /** R at the reference temperature [Ω], or null when the winding temperature is unknown. */
  value: number | null;
  /** Always `Ω`. */
  unit: 'Ω';
  /** The fitted interval carried by the same factor [Ω] (temperature taken as exact), or null. */
  ci95: [number, number] | null;
  /** Reference temperature [°C]. */
  referenceTemperature: number;
  /** Winding temperature during the fit [°C], or null when unknown. */
  windingTemperature: number | null;
  /** Where the winding temperature came from. */
  windingTemperatureSource: 'temperature channel' | 'option' | 'unknown';
  /** Copper law constant k [°C]. */
  copperConstant: CopperLawConstant;
  /** Which published form k belongs to. */
  form: 'IEEE Std 113 form' | 'IEC 60034-1 form';
  /** Factor (k + T_ref)/(k + T_winding), or null. */
  factor: number | null;
  /** Plain-words statement of what was done. */
  note: string;
}

/** One derived datasheet figure. */
export interface DerivedFigure {
  /** Short label for tables, e.g. `stall torque`. */
  label: string;
  /** Value [unit], or null when a constant it needs is missing (see `note`). */
  value: number | null;
  /** Unit text. */
  unit: string;
  /** 95 % interval propagated by the delta method [unit], or null. */
  ci95: [number, number] | null;
  /** False when a constant it needs is missing or not identifiable. */
  identifiable: boolean;
  /** The formula in plain text, e.g. `Kt·V/R`. */
  formula: string;
  /** Plain-words note (why no value or interval, what voltage), or empty. */
  note: string;
}

/** One recording as summarised in the parameter set. */
export interface RecordingSummary {
  /** Name used in the fit. */
  name: string;
  /** Experiment kind used. */
  kind: string;
  /** Number of samples. */
  samples: number;
  /**
   * Per fitted channel: noise σ, RMS of the residual and NRMSE, and the residuals' whiteness
   * (Ljung–Box test) when the diagnosis judged it (absent in sets written before it was kept).
   */
  channels: { channel: string; sigma: number | null; rms: number | null; nrmse: number | null; whiteness?: ResidualWhiteness | null }[];
}

/** Ljung–Box test of a channel's residuals (the diagnosis's): are they white, as the noise model says? */
export interface ResidualWhiteness {
  /** Lags m summed. */
  lags: number;
  /** The statistic Q. */
  statistic: number | null;
  /** Upper-tail χ² p-value (small: the residuals are correlated; the model leaves something out). */
  pValue: number | null;
}

/** A finding about what the lumped linear model leaves out (same shape as `@motorprint/diagnose`). */
export interface ReportFinding {
  /** Kebab-case code. */
  code: string;
  /** How much it matters. */
  severity: 'info' | 'warning' | 'problem';
  /** One-line title. */
  title: string;
  /** The numbers behind it. */
  evidence: Record<string, number | string>;
  /** Plain-words advice. */
  advice: string;
}

/** An input file of the fit. */
export interface InputFile {
  /** File name or path as the caller gives it. */
  file: string;
  /** SHA-256 of the file bytes, 64 lowercase hex digits. */
  sha256: string;
}

/** A JSON value (what `options` in the provenance may hold). */
export type JsonValue = null | boolean | number | string | JsonValue[] | { [key: string]: JsonValue };

/** Where a parameter set came from. */
export interface Provenance {
  /** Tool name and version. */
  tool: { name: string; version: string };
  /** Date and time of the fit as the caller states it (ISO 8601 text); the library reads no clock. */
  date: string;
  /** Input files with their hashes. */
  inputs: InputFile[];
  /** Every option used (fit and report), as the caller resolved them. */
  options: { [key: string]: JsonValue };
}

/** The versioned parameter set document (`docs/parameter-set.schema.json`). */
export interface ParameterSet {
  /** Schema identifier. */
  schema: ParameterSetSchemaId;
  /** Motor and test identification fields (free text, e.g. `motor`, `serial`, `bench`, `operator`). */
  identification: Record<string, string>;
  /** Model variant used by the fit (`extensions`: the detailed model's terms it includes). */
  variant: { torqueConstant: 'equal' | 'separate'; coulomb: boolean; extensions: string[]; description: string };
  /**
   * The constants in SI: R, L, Kt, Ke, J, b always; the effect constants of the chosen model (Tc,
   * Ts, c, Vmax, Imax, Rth, Cth, R20 — R20 the copper-law resistance at 20 °C of the heating model),
   * Rs where supply and terminal voltage were both logged, and the ratios a recording informs on
   * their own (b/J and Tc/J of a speed-only coast-down; `speed gain` and `mechanical time constant`
   * of voltage-to-speed runs without current). An effect the data do not support has a null value
   * and a note "not distinguishable from 0 (< X at 95 %)".
   */
  parameters: Record<'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b', ParameterEntry> & Partial<Record<string, ParameterEntry>>;
  /** How the model was chosen, when the caller passed it: the chosen extensions, every candidate and its comparison. */
  model?: ModelChoiceRecord;
  /** Held-out recordings predicted with the constants, when the caller passed them. */
  checks?: HeldOutRecord[];
  /** R carried to the reference temperature. */
  resistanceAtReference: ResistanceAtReference;
  /** The voltage the voltage-dependent figures are stated at. */
  ratedVoltage: { value: number | null; unit: 'V'; source: string };
  /** How the derived-figure intervals were obtained. */
  intervals: { level: number; method: string; degreesOfFreedom: number | null; tQuantile: number | null };
  /** Derived datasheet figures, keyed by our own names (see docs/derived-figures.md). */
  derived: Record<string, DerivedFigure>;
  /** Fit summary. */
  fit: {
    converged: boolean;
    stopReason: string;
    rows: number;
    residualVariance: number | null;
    recordings: RecordingSummary[];
  };
  /** Constants no recording informs, with what would inform them. */
  notInformed: { name: string; reason: string; wouldInform: string }[];
  /** Findings with evidence and advice. */
  findings: ReportFinding[];
  /** Loop-tuning figures (current- and speed-loop PI gains with intervals), when asked for. */
  tuning?: TuningSection;
  /** Where it came from. */
  provenance: Provenance;
}

/** The model choice, as `identifyMotor` of `@motorprint/diagnose` states it (structural). */
export interface ModelChoiceRecord {
  /** Chosen extensions of the lumped model. */
  extensions: string[];
  /** Whether the caller forced the model. */
  forced: boolean;
  /** One sentence on why. */
  summary: string;
  /** Every model tried. */
  candidates: {
    extensions: string[]; added: string | null; converged: boolean; accepted: boolean; reason: string;
    comparison: { fPValue: number; aic: [number, number]; bic: [number, number] } | null;
    /** Rao's score test at the model it extends (F form, p-value), where it was run. */
    scoreTest?: { statistic: number; pValue: number };
  }[];
}

/** A held-out check (structural: `HeldOutCheck` of `@motorprint/diagnose`). */
export interface HeldOutRecord {
  name: string;
  kind: string;
  converged: boolean;
  channels: { channel: string; rms: number; nrmse: number; samples: number }[];
}

/** An extension the data do not support (structural: `UnsupportedConstant` of `@motorprint/diagnose`). */
export interface UnsupportedRecord {
  extension: string;
  constants: string[];
  bounds: Record<string, { upper95: number | null; unit: string }>;
  reason: string;
}

/** Per-constant verdict a diagnosis may carry (structural: `@motorprint/diagnose`'s `ParameterDiagnosis` fits it). */
export interface DiagnosisParameterLike {
  /** Whether the recordings identify it. */
  identifiable: boolean;
  /** Plain-words reason when not. */
  reason?: string;
}

/** Residual statistics of one recording channel a diagnosis may carry. */
export interface DiagnosisResidualLike {
  /** Recording name. */
  recording: string;
  /** Channel name. */
  channel: string;
  /** The statistics (only these fields are read). */
  stats: {
    /** Autocorrelation r_0…r_m. */
    autocorrelation: Float64Array | readonly number[];
    /** Half-width of the approximate 95 % whiteness band. */
    whitenessBand: number;
    /** Count of lags outside the band. */
    lagsOutsideBand?: number;
    /** Ljung–Box test. */
    ljungBox?: { statistic: number; lags: number; pValue: number };
  };
}

/** A model comparison a diagnosis may carry (only these fields are read). */
export interface DiagnosisComparisonLike {
  /** What is compared. */
  question: string;
  /** Which model the evidence prefers. */
  preferred: 'restricted' | 'full';
  /** F-test p-value. */
  fPValue: number;
  /** Recording it was computed on, or null for the whole fit. */
  recording?: string | null;
}

/**
 * What the report reads from a fit diagnosis. Structural, so that `FitDiagnosis` from
 * `diagnoseFit` fits it, and so does a hand-made object.
 */
export interface DiagnosisLike {
  /** Per constant identifiability verdicts, keyed by constant name. */
  parameters?: Readonly<Record<string, DiagnosisParameterLike>>;
  /** Residual statistics per recording and channel. */
  residuals?: readonly DiagnosisResidualLike[];
  /** Findings. */
  findings?: readonly ReportFinding[];
  /** Model comparisons. */
  comparisons?: readonly DiagnosisComparisonLike[];
}

/** Options of `buildParameterSet`. */
export interface BuildParameterSetOptions {
  /** Recordings in the order given to the fit (for the winding temperature and the rated-voltage fallback). @default [] */
  recordings?: readonly RecordingData[];
  /** Diagnosis of the fit (identifiability verdicts, findings). @default none */
  diagnosis?: DiagnosisLike;
  /** Extra findings to list (after the diagnosis's). @default [] */
  findings?: readonly ReportFinding[];
  /** Motor and test identification fields. @default {} */
  identification?: Record<string, string>;
  /** Voltage for the voltage-dependent figures [V]. @default the largest step voltage seen */
  ratedVoltage?: number;
  /** Winding temperature during the fit [°C]; overrides a temperature channel. @default mean of the temperature channels */
  windingTemperature?: number;
  /** Reference temperature for R [°C]. @default 25 */
  referenceTemperature?: number;
  /** Copper law constant k [°C]. @default 234.5 */
  copperConstant?: CopperLawConstant;
  /** Add the loop-tuning section with these settings (`{}`: the defaults, stated as such). @default none */
  tuning?: LoopTuningOptions;
  /** Provenance: tool, date, inputs, options. Required: the library reads no clock and no files. */
  provenance: Provenance;
  /** The model choice to record (from `identifyMotor`). @default none */
  model?: ModelChoiceRecord;
  /** Extensions the data do not support, to state as "not distinguishable from 0". @default [] */
  unsupported?: readonly UnsupportedRecord[];
  /** Held-out checks to record. @default [] */
  checks?: readonly HeldOutRecord[];
}

/**
 * The constants and their covariance in propagation coordinates u (ln c for R, L, Kt, Ke, J, b;
 * Tc itself), marginalised over the nuisance parameters of the fit.
 */
export interface ConstantCovariance {
  /** Constant names, in the order of the matrix. */
  names: ConstantName[];
  /** Constant values [SI]; NaN when the fit has none. */
  values: Float64Array;
  /** Whether each constant was fitted (false: fixed, missing or not identifiable → no variance). */
  fitted: boolean[];
  /** Whether each constant has a usable variance. */
  identifiable: boolean[];
  /** 7×7 covariance of u = (ln R, ln L, ln Kt, ln Ke, ln J, ln b, ln Tc), row-major (0 rows for fixed constants; NaN rows for unusable ones). */
  covariance: Float64Array;
  /** Degrees of freedom n − p of the fit, or NaN. */
  degreesOfFreedom: number;
  /** Student-t quantile t(0.975, n − p), or NaN. */
  tQuantile: number;
}

/** Motor constants as plain numbers [SI] (NaN for a missing one). */
export interface ConstantValues {
  /** [Ω] */ R: number;
  /** [H] */ L: number;
  /** [N·m/A] */ Kt: number;
  /** [V·s/rad] */ Ke: number;
  /** [kg·m²] */ J: number;
  /** [N·m·s/rad] */ b: number;
  /** Coulomb friction [N·m]; 0 when the model has none. */ Tc: number;
}

/** Steady-state operating curve at one voltage, sampled from stall to no load. */
export interface OperatingCurve {
  /** Supply voltage [V]. */
  voltage: number;
  /** Load (shaft) torque [N·m]. */
  torque: Float64Array;
  /** Speed [rad/s]. */
  speed: Float64Array;
  /** Current [A]. */
  current: Float64Array;
  /** Output power T·ω [W]. */
  outputPower: Float64Array;
  /** Efficiency T·ω/(V·i) [1]. */
  efficiency: Float64Array;
}

/** One series of `svgLinePlot`. */
export interface PlotSeries {
  /** Legend text. */
  name: string;
  /** x values (finite or NaN for a gap). */
  x: Float64Array | readonly number[];
  /** y values (finite or NaN for a gap). */
  y: Float64Array | readonly number[];
  /** Line style: black solid, grey dashed, accent solid, grey dotted. @default 'solid' */
  style?: 'solid' | 'dashed' | 'accent' | 'dotted';
  /** `line` joins points; `stem` draws a vertical line from y = 0 to each point. @default 'line' */
  kind?: 'line' | 'stem';
}

/** Options of `svgLinePlot`. */
export interface PlotOptions {
  /** Series to draw (at least one). */
  series: readonly PlotSeries[];
  /** x axis label including the unit, e.g. `time [s]`. */
  xLabel: string;
  /** y axis label including the unit, e.g. `current [A]`. */
  yLabel: string;
  /** Title above the plot. @default '' */
  title?: string;
  /** Width [px]. @default 640 */
  width?: number;
  /** Height [px]. @default 240 */
  height?: number;
  /** Horizontal reference lines (e.g. a whiteness band), drawn grey dotted. @default [] */
  referenceLines?: readonly { y: number; label?: string }[];
  /** Force y = 0 into the range. @default false */
  includeZero?: boolean;
}

/** Result of `svgLinePlot`. */
export interface PlotResult {
  /** The `<svg>` element text. */
  svg: string;
  /** True when some series had more points than two per pixel column and were reduced to min/max per column. */
  downsampled: boolean;
}

/** Input of `renderHtmlReport`. */
export interface HtmlReportInput {
  /** The parameter set (from `buildParameterSet`). */
  parameterSet: ParameterSet;
  /** The fit (residual series per recording and channel). */
  fit: Pick<MotorFit, 'recordings'>;
  /** The recordings in the fit's order (measured traces); without them no trace plots are drawn. @default [] */
  recordings?: readonly RecordingData[];
  /** Diagnosis (residual autocorrelation); computed here from the residuals when absent. */
  diagnosis?: DiagnosisLike;
  /** Report title. @default 'DC motor parameter report' */
  title?: string;
}

/** Options of `loopTuning` (and the `tuning` option of `buildParameterSet`). */
export interface LoopTuningOptions {
  /** Current-loop bandwidth [Hz]. @default 1000 */
  currentBandwidthHz?: number;
  /** Speed-loop bandwidth (crossover) [Hz]. @default 100 */
  speedBandwidthHz?: number;
  /** Speed-loop phase margin [°], between 0 and 90. @default 60 */
  phaseMarginDeg?: number;
  /** Controller sample rate [Hz], for the bandwidth check; absent: not checked. */
  controllerRateHz?: number;
}

/** One controller gain with its propagated interval. */
export interface TuningGain {
  /** Gain [unit], or null when the constants it needs are missing or the design has no solution. */
  value: number | null;
  /** Unit text. */
  unit: string;
  /** 95 % interval (delta method on ln of the gain), or null. */
  ci95: [number, number] | null;
  /** Formula in words. */
  formula: string;
}

/** The loop-tuning section of a parameter set. */
export interface TuningSection {
  /** The design inputs, each marked `default` or `given`. */
  settings: {
    currentBandwidthHz: { value: number; source: 'default' | 'given' };
    speedBandwidthHz: { value: number; source: 'default' | 'given' };
    phaseMarginDeg: { value: number; source: 'default' | 'given' };
    controllerRateHz: { value: number | null; source: 'given' | 'none' };
    /** Largest bandwidth as a fraction of the controller rate before a warning. */
    maxBandwidthFraction: number;
  };
  /** Current-loop PI: V = Kp·e + Ki·∫e, e = i* − i. */
  currentLoop: { Kp: TuningGain; Ki: TuningGain };
  /** Speed-loop PI: i* = Kp·e + Ki·∫e, e = ω* − ω. */
  speedLoop: { Kp: TuningGain; Ki: TuningGain };
  /** Assumptions of the design, in words. */
  assumptions: string[];
  /** Method and its source. */
  method: string;
  /** Warnings (bandwidths against the controller rate and each other, an unreachable phase margin). */
  warnings: string[];
}
