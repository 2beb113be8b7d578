/**
 * Plain data shapes of `@motorprint/diagnose`: confidence reports, identifiability verdicts,
 * residual statistics, model comparisons and findings. Everything is JSON-able except
 * `Float64Array` series.
 */
import type { ExperimentKind } from '@motorprint/model';
import type { CovarianceSummary, MotorFit } from '@motorprint/estimate';

/** Names of the measured channels a recording may carry (SI: V, A, rad/s, rad, N·m, °C). */
export type ChannelName = 'voltage' | 'current' | 'speed' | 'position' | 'torque' | 'temperature';

/**
 * The part of a recording the detectors read: `Recording` from `@motorprint/ingest` fits it,
 * and so does a hand-made object in a lab script.
 */
export interface RecordingLike {
  /** Sample times [s], strictly increasing. */
  time: Float64Array;
  /** Channels in SI units. */
  channels: Partial<Record<ChannelName, Float64Array>>;
}

/** One parameter of a confidence report. */
export interface ParameterConfidence {
  /** Parameter name as given by the caller. */
  name: string;
  /** Estimate [parameter unit]. */
  value: number;
  /** Standard error [parameter unit]; NaN when not identifiable. */
  standardError: number;
  /** Two-sided Student-t interval at the requested level [parameter unit]; null when not identifiable. */
  interval: [number, number] | null;
  /** False when the covariance summary marks the parameter as lying on a dropped direction. */
  identifiable: boolean;
}

/** Confidence intervals, correlations and conditioning of a least-squares estimate. */
export interface ConfidenceReport {
  /** Confidence level of the intervals (0.95 by default). */
  level: number;
  /** Degrees of freedom n − p of the Student-t quantile. */
  degreesOfFreedom: number;
  /** The two-sided Student-t quantile t_{(1+level)/2, n−p} used. */
  tQuantile: number;
  /** Per parameter, in the given order. */
  parameters: ParameterConfidence[];
  /** Correlation matrix, p×p row-major; NaN rows/columns for parameters without a standard error. */
  correlation: Float64Array;
  /** Singular values of the column-scaled Jacobian, largest first. */
  singularValues: Float64Array;
  /** Largest over smallest singular value (Infinity when one is 0). */
  conditionNumber: number;
}

/** Experiment kinds (trade terms) a recording description may name: the model's kinds, or `unknown`. */
export type RecordingKind = ExperimentKind | 'unknown';

/** A plain description of one recording for the identifiability verdict. */
export interface RecordingDescription {
  /** Label used in reasons. */
  name: string;
  /** Experiment kind. */
  kind: RecordingKind;
  /** Channels present. */
  channels: ChannelName[];
  /** Sample interval [s]. */
  sampleInterval: number;
}

/** Identifiability verdict for one parameter. */
export interface IdentifiabilityVerdict {
  /** Parameter name (R, L, Kt, Ke, J, b, Tc or a caller name). */
  name: string;
  /** False when the recordings cannot inform the parameter, or the covariance says so. */
  identifiable: boolean;
  /** Plain-words reason (empty when identifiable). */
  reason: string;
  /** Which recording would inform it (empty when identifiable). */
  wouldInform: string;
}

/** Ljung–Box portmanteau test of residual whiteness. */
export interface LjungBoxResult {
  /** Q = n(n+2)·Σ_{k=1}^{m} r_k²/(n − k). */
  statistic: number;
  /** Number of lags m. */
  lags: number;
  /** Degrees of freedom m − fittedParameters of the χ² reference. */
  degreesOfFreedom: number;
  /** Upper-tail χ² p-value; NaN when it cannot be computed. */
  pValue: number;
}

/** Wald–Wolfowitz runs test on the signs of a series about a centre. */
export interface RunsTestResult {
  /** Observed number of runs. */
  runs: number;
  /** Count of values above the centre. */
  above: number;
  /** Count of values below the centre (values equal to it are left out). */
  below: number;
  /** Expected runs under independence, 2·n₁n₂/n + 1. */
  expectedRuns: number;
  /** Standardised statistic z = (runs − expected)/sd. */
  z: number;
  /** Two-sided normal p-value; NaN when fewer than 2 values lie on either side. */
  pValue: number;
}

/** Residual statistics of one channel of one recording. */
export interface ResidualStats {
  /** Number of finite residuals used. */
  samples: number;
  /** Mean residual [channel unit]. */
  mean: number;
  /** Root mean square of the residuals [channel unit]. */
  rms: number;
  /** RMS residual / standard deviation of the measurement (0 perfect, 1 = no better than the mean). */
  nrmse: number;
  /** Autocorrelation r_0…r_m of the residuals (r_0 = 1). */
  autocorrelation: Float64Array;
  /** Half-width z_{0.975}/√n of the approximate 95 % band for r_k under whiteness. */
  whitenessBand: number;
  /** Count of lags 1…m whose |r_k| exceeds the band. */
  lagsOutsideBand: number;
  /** Ljung–Box test at lag m. */
  ljungBox: LjungBoxResult;
  /** Runs test on the residual signs about zero. */
  runs: RunsTestResult;
}

/** Severity of a finding. */
export type FindingSeverity = 'info' | 'warning' | 'problem';

/** A statement about what the lumped linear model leaves out, with the numbers behind it. */
export interface Finding {
  /** Our own kebab-case code, e.g. `coulomb-friction`. */
  code: string;
  /** How much it matters. */
  severity: FindingSeverity;
  /** One-line title. */
  title: string;
  /** The numbers behind it. */
  evidence: Record<string, number | string>;
  /** Plain-words advice. */
  advice: string;
}

/** A fitted linear-in-parameters model for comparison. */
export interface ModelSummary {
  /** Label. */
  name: string;
  /** Residual sum of squares. */
  ssr: number;
  /** Number of fitted parameters. */
  parameters: number;
}

/** Comparison of a restricted model with a fuller model that nests it. */
export interface ModelComparison {
  /** What is compared, e.g. `viscous vs viscous + Coulomb`. */
  question: string;
  /** The restricted model. */
  restricted: ModelSummary;
  /** The fuller model. */
  full: ModelSummary;
  /** Number of observations. */
  samples: number;
  /** Nested-model F statistic. */
  fStatistic: number;
  /** Upper-tail F p-value. */
  fPValue: number;
  /** Likelihood-ratio statistic n·ln(SSR_r/SSR_f). */
  lrStatistic: number;
  /** Upper-tail χ² p-value of the likelihood ratio. */
  lrPValue: number;
  /** AIC of restricted and full (Gaussian, up to a common constant). */
  aic: [number, number];
  /** BIC of restricted and full. */
  bic: [number, number];
  /** Which model the evidence prefers: `full` when F rejects at the level and AIC agrees. */
  preferred: 'restricted' | 'full';
}

/** An ordinary least-squares fit y = Xβ. */
export interface LinearFit {
  /** Coefficients β, one per column. */
  coefficients: Float64Array;
  /** Standard errors s·√diag((XᵀX)⁻¹); NaN when X is rank deficient. */
  standardErrors: Float64Array;
  /** Residual sum of squares. */
  ssr: number;
  /** Rows used. */
  samples: number;
  /** Residual variance s² = SSR/(n − p). */
  residualVariance: number;
  /** Covariance s²(XᵀX)⁻¹, p×p row-major. */
  covariance: Float64Array;
}

/** Re-exported for convenience: the covariance summary from `@motorprint/estimate`. */
export type { CovarianceSummary };

/** One constant in a {@link FitDiagnosis}. JSON-able: missing numbers are null, never NaN. */
export interface ParameterDiagnosis {
  /** Estimate [unit]; null when no recording informs the constant (see `reason`). */
  value: number | null;
  /** SI unit text. */
  unit: string;
  /** True when the value was pinned by the caller (no error, no interval). */
  fixed: boolean;
  /** Standard error [unit] by the delta method from the fitted scale; null when not identifiable or fixed. */
  standardError: number | null;
  /**
   * 95 % interval [unit]: the estimator's own (`interval95` of estimate's `ParameterEstimate`,
   * Student-t on the fitted scale, transformed back); null when not identifiable or fixed. The
   * parameter-set file writes it as `ci95`.
   */
  interval95: [number, number] | null;
  /** False when the recordings cannot inform the constant, or the covariance has no direction for it. */
  identifiable: boolean;
  /** Why it is not identifiable (absent when it is). */
  reason?: string;
  /** Which recording would inform it (absent when identifiable). */
  wouldInform?: string;
}

/** Residual statistics of one fitted channel of one recording. */
export interface ChannelResidualDiagnosis {
  /** Recording name from the fit. */
  recording: string;
  /** Experiment kind the fit used. */
  kind: string;
  /** Channel. */
  channel: 'current' | 'speed' | 'angle' | 'voltage';
  /** RMS, NRMSE, autocorrelation with its band, Ljung–Box, runs test. */
  stats: ResidualStats;
}

/** Where a finding of a {@link FitDiagnosis} comes from. */
export type FindingOrigin = 'recording-scan' | 'fit-residuals' | 'fit-covariance';

/** A finding tagged with the recording it concerns and the evidence it rests on. */
export interface DiagnosisFinding extends Finding {
  /** Recording name, or null for a finding about the whole fit. */
  recording: string | null;
  /** Data-only detector on the recording, the fit's residual series, or its covariance. */
  origin: FindingOrigin;
}

/** A model comparison tagged with the recording it was computed on (null: the whole fit). */
export interface DiagnosisComparison extends ModelComparison {
  /** Recording name, or null for a comparison of two fits. */
  recording: string | null;
}

/** Options of `diagnoseFit`. */
export interface DiagnoseFitOptions {
  /** Run `scanRecording` on each recording. @default true */
  scanRecordings?: boolean;
  /** Significance level of the model comparisons. @default 0.01 */
  alpha?: number;
  /** Lags of the residual autocorrelation and Ljung–Box test. @default min(50, samples/4) */
  maxLag?: number;
}

/** Everything `diagnoseFit` says about a `MotorFit`. JSON-able except the `Float64Array` series (autocorrelations). */
export interface FitDiagnosis {
  /** Constants (R, L, Kt, Ke, J, b, Tc, Kt/Ke as present), with value, error, interval and identifiability. */
  parameters: Record<string, ParameterDiagnosis>;
  /** Degrees of freedom rows − p of the Student-t intervals. */
  degreesOfFreedom: number;
  /** Correlation of the fitted constants (on the fitted, log scale); null entries where undefined. */
  correlation: { names: string[]; matrix: (number | null)[][] };
  /** Singular values of the column-scaled Jacobian (all fitted parameters, nuisances included), largest first. */
  singularValues: number[];
  /** Largest over smallest kept singular value (null when infinite). */
  conditionNumber: number | null;
  /** Residual statistics per recording and fitted channel. */
  residuals: ChannelResidualDiagnosis[];
  /** Findings from the recordings and from the fit. */
  findings: DiagnosisFinding[];
  /** Model comparisons computed by the detectors. */
  comparisons: DiagnosisComparison[];
}

/** One model tried by `identifyMotor`. */
export interface ModelCandidate {
  /** The model's extensions of the lumped linear model. */
  extensions: string[];
  /** The extension this candidate adds to the model it was compared with (null for the start). */
  added: string | null;
  converged: boolean;
  /** Whitened sum of squares (with the weights of the model it is compared with). */
  ssr: number;
  /** Fitted parameters (constants and nuisances). */
  parameters: number;
  /** Residual rows. */
  rows: number;
  /** Nested comparison with the model it extends: F-test, likelihood ratio, AIC, BIC. */
  comparison: ModelComparison | null;
  /** Whether it joined the chosen model. */
  accepted: boolean;
  /** Why, in plain words with the numbers. */
  reason: string;
  /**
   * The constants it adds, as its fit gave them — or, for a candidate the score test turned down
   * without a fit, one Gauss–Newton step from the current model with the linearised 95 % interval
   * (floored at zero).
   */
  effects: Record<string, { value: number; unit: string; interval95: [number, number] | null }>;
  /**
   * Rao's score test at the model it extends (F form and p-value), where it applies (Coulomb
   * friction, drag, heating): a candidate with p ≥ alpha is not fitted (`converged` false, no
   * comparison).
   */
  scoreTest?: { statistic: number; pValue: number };
}

/** An extension the data do not support, with the bound its candidate fit set on each constant. */
export interface UnsupportedConstant {
  extension: string;
  constants: string[];
  /** Per constant: the upper end of the candidate's 95 % interval [unit], or null. */
  bounds: Record<string, { upper95: number | null; unit: string }>;
  reason: string;
}

/** A held-out recording predicted with the fitted constants pinned. */
export interface HeldOutCheck {
  /** Recording name. */
  name: string;
  /** Experiment kind used. */
  kind: string;
  /** Whether the prediction (only the recording's own nuisances free) converged. */
  converged: boolean;
  /** NRMSE and RMS per channel. */
  channels: { channel: string; rms: number; nrmse: number; samples: number }[];
}

/** What `identifyMotor` returns. */
export interface Identification {
  /** The chosen model's fit. */
  fit: MotorFit;
  /** Its diagnosis: intervals, identifiability, residual statistics, findings. */
  diagnosis: FitDiagnosis;
  /** The chosen model and every candidate tried. */
  model: { extensions: string[]; forced: boolean; candidates: ModelCandidate[]; summary: string };
  /** Effect constants the data do not support (left out of the chosen model). */
  unsupported: UnsupportedConstant[];
  /** Held-out checks. */
  checks: HeldOutCheck[];
}
