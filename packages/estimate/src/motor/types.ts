/**
 * Plain data shapes of the motor estimator. Everything is JSON-able except `Float64Array` series.
 */
import type { ExperimentKind } from '@motorprint/model';
import type { SolverOptions, StopReason } from '../solver/types.js';
import type { ModelExtensions } from '../detailed/types.js';

/** Names of the measured channels a recording may carry (SI: V, A, rad/s, rad, N·m, °C). */
export type MotorChannel =
  | 'voltage' | 'supplyVoltage' | 'commandVoltage' | 'current' | 'speed' | 'position' | 'torque' | 'temperature';

/**
 * The part of an ingested recording the estimator reads. `Recording` from `@motorprint/ingest`
 * fits this shape, and so does any object built by hand in a lab script.
 */
export interface RecordingData {
  /** Sample times [s], strictly increasing. */
  time: Float64Array;
  /**
   * Channels in SI: voltage [V] (at the motor terminals), supplyVoltage [V] (bus or battery, before
   * any source resistance), commandVoltage [V] (what the drive was told to apply), current [A],
   * speed [rad/s], position [rad], torque [N·m], temperature [°C].
   */
  channels: Partial<Record<MotorChannel, Float64Array>>;
  /** `table`: one row per steady operating point, `time` is only the row number. @default 'series' */
  layout?: 'series' | 'table';
  /** Per-row standard deviations of a table's channels [SI], when the file gives them. */
  spread?: Partial<Record<MotorChannel, Float64Array>>;
}

/**
 * Experiment kinds the estimator understands (trade terms): locked-rotor step, free-run voltage
 * step, coast-down, steady-state sweep, PRBS, multisine, and a loaded run with a torque transducer.
 */
export type MotorExperimentKind = ExperimentKind;

/** One recording handed to `fitMotor`. */
export interface MotorRecordingInput {
  /** The data. */
  recording: RecordingData;
  /** What experiment it is; guessed from the data when absent (the guess and its reason are reported). */
  kind?: MotorExperimentKind;
  /** A label for reports. @default `recording <index>` */
  name?: string;
}

/** Names of the physical constants the estimator can fit. */
export type MotorConstantName = 'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b' | 'Tc' | 'Ts' | 'c' | 'Vmax' | 'Imax' | 'Rth' | 'Cth';

/** A noise level estimated from the data (see `estimateNoiseLevel`). */
export interface NoiseLevel {
  /** Standard deviation of the white measurement noise, in the channel's unit. */
  sigma: number;
  /** Which estimator gave it. */
  method: 'second-difference' | 'quantisation' | 'settled-segment' | 'constant' | 'exact' | 'residuals' | 'given';
  /** Quantisation step seen in the data when the quantisation fallback was used, else null. */
  quantum: number | null;
}

/** One constant-level stretch of a piecewise-constant command. */
export interface VoltageSegment {
  /** First sample of the segment (inclusive). */
  start: number;
  /** One past the last sample. */
  end: number;
  /** Mean of the measured voltage over the segment [V]. */
  level: number;
}

/** How the measured (noisy) voltage was turned into the model input, and why. */
export interface InputHandling {
  /**
   * `segment-means`: piecewise-constant command found, each segment replaced by its mean;
   * `exact`: a piecewise-constant command with no noise at all (logged by the controller), used as it is;
   * `sine-fit`: smooth periodic input rebuilt by linear least squares on sines at the spectral
   * peaks or at the harmonics of the record length (the coefficients are then fitted as nuisances); `low-pass`: smooth input that the sines do not explain, passed through a zero-phase
   * low-pass at three times its highest spectral peak; `measured`: the raw voltage is used (either asked for, or nothing better was found —
   * then the constants may be biased and `reason` says so); `not-used`: the model of this kind
   * does not take the voltage sample by sample (coast-down, steady-state plateaus).
   */
  method: 'segment-means' | 'exact' | 'sine-fit' | 'low-pass' | 'measured' | 'not-used';
  /** Plain-words reason for the choice. */
  reason: string;
  /** Number of constant segments (segment-means only). */
  segments?: number;
  /** Frequencies of the fitted sines [Hz] (sine-fit only). */
  frequencies?: number[];
  /** Detected time of the (first) voltage step [s], or null. The fit may refine it. */
  stepTime: number | null;
  /** RMS of (measured − rebuilt) voltage divided by the voltage noise σ (≈ 1 when the rebuild explains the data). */
  residualRatio: number;
  /** Voltage noise σ from the data [V]. */
  voltageSigma: number;
  /** Which logged voltage drove the model (see `PreparedRecording.source`). */
  source?: 'terminal' | 'supply' | 'command' | 'none';
  /** What that means for the constants, in plain words (empty for the terminal voltage). */
  sourceNote?: string;
}

/** An estimate of one constant or nuisance parameter. */
export interface ParameterEstimate {
  /** Value in SI. */
  value: number;
  /** SI unit text. */
  unit: string;
  /** True when the value was pinned by `options.fix` (then there is no standard error). */
  fixed?: boolean;
  /** Standard error [unit] from the covariance at the optimum (delta method from the log scale), when computed. */
  standardError?: number;
  /** 95 % confidence interval [unit]: Student-t on the fitted scale (log scale for positive constants). */
  interval95?: [number, number];
  /** Names of the recordings that inform it. */
  informedBy?: string[];
  /**
   * False when the information at the optimum does not pin the constant down (relative standard
   * error above 50 %, or a direction the covariance drops): the value is then not a measurement.
   * Absent means identified.
   */
  identified?: boolean;
  /** Why the estimator does not count it as identified, when it knows better than the numbers (absent otherwise). */
  unidentifiedReason?: string;
}

/** The information at a fit's optimum (see `MotorFit.information`). */
export interface FitInformation {
  /** θ index of each fitted constant (Kt and Ke share one index when Kt = Ke is imposed; Ts's is that of ln(Ts − Tc)). */
  constantIndex: Record<string, number>;
  /** Singular values of the column-scaled Jacobian, largest first. */
  singularValues: Float64Array;
  /** Largest over smallest singular value (Infinity when one is 0). */
  conditionNumber: number;
  /** Per θ entry: false when it loads on a direction whose singular value was dropped. */
  identifiable: boolean[];
  /** Number of singular values kept. */
  rank: number;
}

/** A constant that the given recordings do not inform. */
export interface UninformedConstant {
  /** Constant name. */
  name: MotorConstantName;
  /** Why it is not informed. */
  reason: string;
  /** Which recording kind would inform it. */
  wouldInform: string;
}

/** Per channel fit quality of one recording. */
export interface ChannelFit {
  /** Channel name (`angle`: an encoder speed compared as the angle it integrates to; `voltage`: open-circuit terminal voltage). */
  channel: 'current' | 'speed' | 'angle' | 'voltage';
  /** Noise σ used for whitening, in the channel's unit (NaN for an encoder speed, which is fitted as its angle). */
  sigma: number;
  /** How σ was obtained (`residuals`: re-estimated from the fit's residuals). */
  sigmaMethod: NoiseLevel['method'] | 'encoder';
  /** Number of samples entering the fit. */
  samples: number;
  /** RMS of (model − measured) [channel unit]. */
  rms: number;
  /** RMS residual over the SD of the measured channel (0 = perfect; 1 = no better than the mean). */
  nrmse: number;
  /** Residual series model − measured (NaN where the sample is not fitted), or null when not kept. */
  residuals: Float64Array | null;
}

/** What the fit made of one recording. */
export interface RecordingReport {
  /** Name given or made up. */
  name: string;
  /** Experiment kind used. */
  kind: MotorExperimentKind;
  /** Whether the kind was declared by the caller or guessed. */
  kindSource: 'declared' | 'guessed';
  /** Why the kind was guessed (or `declared by the caller`). */
  kindReason: string;
  /** Number of samples. */
  samples: number;
  /** Input handling used. */
  input: InputHandling;
  /** Fit quality per fitted channel. */
  channels: ChannelFit[];
  /** Nuisance parameters of this recording at the optimum (current offset [A], step time [s], initial speed [rad/s]). */
  nuisance: Record<string, number>;
}

/** Result of `fitMotor`. */
export interface MotorFit {
  /** Constants in SI; Kt and Ke are both listed (equal when the model imposes Kt = Ke). */
  parameters: Record<string, ParameterEstimate>;
  /** Constants no given recording informs and nobody pinned. */
  notInformed: UninformedConstant[];
  /** Model variant used. */
  variant: {
    /** `equal`: Kt = Ke imposed (SI); `separate`: Kt and Ke fitted apart (a torque channel was present). */
    torqueConstant: 'equal' | 'separate';
    /** Whether Coulomb friction Tc is part of the model. */
    coulomb: boolean;
    /** Extensions of the lumped model in the fit (see `ModelExtensions`); absent or empty for the lumped model. */
    extensions?: string[];
    /** Plain-words description. */
    description: string;
  };
  /** Per recording reports. */
  recordings: RecordingReport[];
  /** Names of the fitted parameters in solver order (constants on the log scale as `ln R` etc.). */
  fittedNames: string[];
  /** Fitted parameter vector at the optimum (log scale for positive constants). */
  theta: number[];
  /**
   * JᵀJ of the whitened residuals w.r.t. `theta`, p×p row-major: at the optimum, or — after the
   * joint Gauss–Newton polish — at the start of its last step, which landed within about 0.1
   * standard error of the optimum (see the README, "Motor estimator").
   */
  normalMatrix: Float64Array;
  /** Covariance of θ at the optimum, s²(JᵀJ)⁺ (p×p row-major), or null when it could not be formed. */
  covariance?: Float64Array | null;
  /**
   * The constants' joint statistics, stated once here for every reader (diagnosis, parameter set,
   * derived figures): the covariance of their logarithms, ln p, at the optimum.
   */
  constantCovariance?: ConstantCovariance;
  /**
   * The information at the optimum as the estimator saw it (one analysis of JᵀJ, read by the
   * diagnosis): where each constant sits in θ, the singular values and which θ entries the
   * covariance could resolve. Absent when no covariance could be formed.
   */
  information?: FitInformation;
  /** Degrees of freedom rows − p of the intervals. */
  degreesOfFreedom?: number;
  /** Sum of squared whitened residuals at the optimum. */
  ssr: number;
  /** Number of residual rows. */
  rows: number;
  /** SSR/(rows − p): ≈ 1 when the noise levels and the model are right. */
  residualVariance: number;
  /** Starting values of the constants and where each came from. */
  start: Record<string, { value: number; source: string }>;
  /**
   * The solver runs, in the order tried: the start with the lower sum of squares goes first (the
   * caller's `options.initial` or the automatic guesses from the data alone); the other is tried
   * only when the first does not converge. `chosen` marks the run whose optimum is reported. On
   * records of more than 65536 samples in total the runs use a window of each recording (a
   * quarter of it, at least 16384 samples) and the whole record is reached by the joint polish; a run on the whole record
   * (or a joint run with all input coefficients free, after a held-coefficient run that did not
   * converge) is appended under the same start label.
   */
  starts: StartAttempt[];
  /** Solver trial steps (all runs). */
  iterations: number;
  /** Evaluations that accumulated JᵀJ. */
  jacobianEvaluations: number;
  /** All evaluations of the residuals. */
  functionEvaluations: number;
  /** True only when a relative convergence test stopped the solver. Never trust the numbers otherwise. */
  converged: boolean;
  /** Which test stopped the solver. */
  stopReason: StopReason | 'nothing-to-fit';
}

/** One solver run of `fitMotor` from one starting point. */
export interface StartAttempt {
  /** Where the starting constants came from. */
  start: 'options.initial' | 'automatic';
  /** Sum of squared whitened residuals at the start. */
  startSsr: number;
  /** ... and at the end of the run. */
  ssr: number;
  /** Trial steps of this run. */
  iterations: number;
  /** Whether this run converged. */
  converged: boolean;
  /** Why it stopped. */
  stopReason: StopReason;
  /** Whether its optimum is the reported one. */
  chosen: boolean;
}

/** Options of `fitMotor`. */
export interface FitMotorOptions {
  /** Constants pinned to a value [SI]; they are not fitted and carry `fixed: true`. @default {} */
  fix?: Partial<Record<MotorConstantName, number>>;
  /** Starting values [SI] that replace the automatic guesses. @default {} */
  initial?: Partial<Record<MotorConstantName, number>>;
  /**
   * How to use the measured voltage: `auto` rebuilds the command (segment means or sine fit)
   * to avoid the errors-in-variables bias; `measured` feeds the raw samples (biased, for contrast).
   * @default 'auto'
   */
  voltage?: 'auto' | 'measured';
  /**
   * Fit Coulomb friction Tc: true, false, or `auto` (when a coast-down or steady-state recording is
   * given). @default false — `identifyMotor` (in `@motorprint/diagnose`) chooses the model the data support.
   */
  coulomb?: 'auto' | boolean;
  /** Keep residual series in the result. @default true */
  keepResiduals?: boolean;
  /** Solver limits and tolerances. @default the solver's defaults, with maxIterations 100 */
  solver?: SolverOptions;
  /** Extensions of the lumped model to fit (friction, drag, drive limits, heating). @default none (Coulomb per `coulomb`) */
  extensions?: ModelExtensions;
  /**
   * Noise SDs to whiten with, per recording (in the order given) and channel [A, rad/s, rad for an
   * encoder angle, V]; they replace the estimates from the data. Model comparisons pass the SDs of
   * the model they compare against, so that both sums of squares use the same weights.
   */
  noise?: ({ current?: number; speed?: number; angle?: number; voltage?: number } | null)[];
  /** Re-estimate each channel's noise SD from the residuals and fit again when one moved by more than 20 %. @default true */
  reweight?: boolean;
  /**
   * A previous fit of the same recordings to start from: its constants and nuisances (input
   * levels, offsets, initial speeds, cut instants, by name) replace the automatic starts, so a
   * model that extends it starts at its optimum. `initial` still wins for the constants it names.
   */
  warmStart?: MotorFit;
  /** Ambient temperature for the heating model [°C]; the winding starts at it. @default 25 */
  ambientTemperature?: number;
}

/**
 * Covariance of the logarithms of a fit's constants (all positive): C_ij = cov(ln p_i, ln p_j),
 * m×m row-major. A constant pinned by the caller has a zero row; one with no usable variance (not
 * informed, on a dropped direction of the covariance, or not positive) has NaN in its row and
 * `usable` false.
 */
export interface ConstantCovariance {
  /** Constant names (R, L, Kt, Ke, J, b, then the effect constants the model has). */
  names: string[];
  /** Values [SI]. */
  values: number[];
  /** Whether each row is usable (pinned constants are, with zero variance). */
  usable: boolean[];
  /** The covariance, m×m row-major. */
  logCovariance: Float64Array;
  /** Degrees of freedom of the fit (rows − p). */
  degreesOfFreedom: number;
  /** Student-t quantile t(0.975, dof). */
  tQuantile: number;
}
