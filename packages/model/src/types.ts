/**
 * Plain data types of the motor models. All quantities are SI; temperatures are in °C.
 */

/**
 * The lumped linear DC-motor constants.
 *
 * V = R·i + L·di/dt + Ke·ω ;  J·dω/dt = Kt·i − b·ω − τ_load
 */
export interface MotorParams {
  /** Armature resistance [Ω]. */
  R: number;
  /** Armature inductance [H]. */
  L: number;
  /** Torque constant [N·m/A]. */
  Kt: number;
  /** Back-EMF constant [V·s/rad]. */
  Ke: number;
  /** Rotor inertia [kg·m²]. */
  J: number;
  /** Viscous friction coefficient [N·m·s/rad]. */
  b: number;
}

/**
 * Copper law constant k in R(T) = R_ref·(k + T)/(k + T_ref): 234.5 (IEEE Std 113 form) or
 * 235 (IEC 60034-1 form), see FACTS.md §3.
 */
export type CopperConstant = 234.5 | 235;

/**
 * Motor constants plus the optional effect terms of the detailed model. An absent (undefined)
 * term switches its effect off.
 *
 * Rotor:  (J + loadInertia)·dω/dt = Kt·i − b·ω − Tc·sgn(ω) − cd·ω·|ω| − loadTorque − loadDamping·ω,
 * with stick–slip: at ω = 0 the rotor stays at rest while |Kt·i − loadTorque| ≤ Ts (breakaway
 * torque, Ts ≥ Tc; Ts defaults to Tc).
 *
 * Armature: L·di/dt = v_t − R(T)·i − Ke·ω with terminal voltage v_t = clip(v_cmd, ±Vmax) − Rs·i;
 * current limit: while |i| ≥ Imax and the voltage would drive |i| further up, the drive lowers v_t
 * so that di/dt = 0 (ideal current regulator).
 *
 * Thermal: R(T) = R·(k + T)/(k + referenceTemperature), Cth·dT/dt = i²·R(T) − (T − ambient)/Rth.
 */
export interface DetailedParams extends MotorParams {
  /** Coulomb friction torque Tc [N·m], ≥ 0. */
  Tc?: number;
  /** Stiction (breakaway) torque Ts [N·m], ≥ Tc. Defaults to Tc when Tc is set. */
  Ts?: number;
  /** Aerodynamic/fluid drag coefficient cd [N·m·s²/rad²] of the term cd·ω·|ω|. */
  cd?: number;
  /** Drive voltage limit Vmax [V]: the commanded terminal voltage is clipped to ±Vmax. */
  Vmax?: number;
  /** Drive current limit Imax [A] (see the limiting law above). */
  Imax?: number;
  /** Thermal resistance winding → ambient Rth [K/W]. Thermal model on when Rth and Cth are set. */
  Rth?: number;
  /** Thermal capacitance of the winding Cth [J/K]. */
  Cth?: number;
  /** Temperature at which R is given [°C]. @default 20 */
  referenceTemperature?: number;
  /** Copper law constant k [°C]. @default 234.5 */
  copperConstant?: CopperConstant;
  /** Ambient temperature [°C]. @default referenceTemperature */
  ambientTemperature?: number;
  /** Winding temperature at t = 0 [°C]. @default ambientTemperature */
  initialTemperature?: number;
  /** Supply internal resistance Rs [Ω]: terminal voltage sags by Rs·i. */
  Rs?: number;
  /** Inertia of the coupled load [kg·m²]. */
  loadInertia?: number;
  /** Constant load torque [N·m] (a direction-independent torque such as a hanging weight). */
  loadTorque?: number;
  /** Speed-proportional load torque coefficient [N·m·s/rad]. */
  loadDamping?: number;
}

/** Time base of a sampled series: a uniform sample interval [s] or the sample times [s]. */
export type TimeBase = number | Float64Array;

/** Options of the linear simulation. */
export interface LinearOptions {
  /** Armature current at the first sample [A]. @default 0 */
  initialCurrent?: number;
  /** Rotor speed at the first sample [rad/s]. @default 0 */
  initialSpeed?: number;
  /** Constant load torque opposing the motor [N·m]. @default 0 */
  loadTorque?: number;
}

/** Output buffers of the linear simulation (caller-allocated, length n). */
export interface LinearTrace {
  /** Armature current [A]. */
  current: Float64Array;
  /** Rotor speed [rad/s]. */
  speed: Float64Array;
}

/**
 * The exact zero-order-hold matrices of one sample interval h:
 * x⁺ = Φ·x + Γv·v + Γτ·τ_load with x = [i, ω].
 */
export interface ZohMatrices {
  /** Φ = e^{A·h}, row-major [φ11, φ12, φ21, φ22]. */
  phi: Float64Array;
  /** Γv = ∫₀ʰ e^{Aτ}dτ·[1/L, 0]ᵀ (response to the held voltage) [A/V, rad/(s·V)]. */
  gammaVoltage: Float64Array;
  /** Γτ = ∫₀ʰ e^{Aτ}dτ·[0, −1/J]ᵀ (response to the held load torque). */
  gammaLoad: Float64Array;
}

/**
 * Names of the sensitivity directions, in the order used by every sensitivity array:
 * R, L, Kt, Ke, J, b, then the initial state i0 and ω0.
 */
export type SensitivityName = 'R' | 'L' | 'Kt' | 'Ke' | 'J' | 'b' | 'i0' | 'omega0';

/**
 * Resumable state of the chunked simulation-with-sensitivities kernel. Create it with
 * `createSensitivityState`; `simulateChunkInto` advances it. Treat the fields as opaque.
 */
export interface SensitivityState {
  /** Motor constants the state was created for. */
  readonly params: Readonly<MotorParams>;
  /** Constant load torque [N·m]. */
  readonly loadTorque: number;
  /** Index of the next sample to be written (0 after creation). */
  nextIndex: number;
  /** State [i, ω] at sample `nextIndex`. */
  readonly x: Float64Array;
  /** Sensitivities at sample `nextIndex`: sens[2j] = ∂i/∂θj, sens[2j+1] = ∂ω/∂θj, j in 0..7. */
  readonly sens: Float64Array;
  /** Sample interval of the cached matrices [s] (NaN when none). */
  cachedInterval: number;
  /** Cached Φ, Γv, Γτ (8 numbers) and their derivatives w.r.t. the six constants (6×8). */
  readonly matrices: Float64Array;
  /** Scratch space of the discretisation. */
  readonly work: Float64Array;
}

/**
 * Caller-allocated chunk buffers. For a range of m samples: `current` and `speed` have length ≥ m,
 * `currentSensitivity` and `speedSensitivity` length ≥ 8·m, sample-major:
 * `currentSensitivity[8·(k − k0) + j]` = ∂i(t_k)/∂θj in the `SensitivityName` order.
 */
export interface SensitivityChunk {
  /** Armature current [A]. */
  current: Float64Array;
  /** Rotor speed [rad/s]. */
  speed: Float64Array;
  /** ∂i/∂θ, 8 per sample. */
  currentSensitivity: Float64Array;
  /** ∂ω/∂θ, 8 per sample. */
  speedSensitivity: Float64Array;
}

/** Pole structure of the linear model. */
export type PoleKind = 'real-distinct' | 'repeated' | 'complex';

/** Closed-form response of the linear model at one time. */
export interface StepPoint {
  /** Armature current [A]. */
  current: number;
  /** Rotor speed [rad/s]. */
  speed: number;
}

/** Derived datasheet figures of the linear model for a supply voltage. */
export interface MotorFigures {
  /** Electrical time constant τe = L/R [s]. */
  electricalTimeConstant: number;
  /** Mechanical time constant τm = J·R/(Kt·Ke) [s]. */
  mechanicalTimeConstant: number;
  /** Mechanical time constant with viscous friction τm' = J·R/(R·b + Kt·Ke) [s]. */
  mechanicalTimeConstantViscous: number;
  /** The two poles; for complex poles re ± i·im [rad/s]. */
  poles: { kind: PoleKind; re1: number; re2: number; im: number };
  /** Natural frequency ωn = √det(A) [rad/s]. */
  naturalFrequency: number;
  /** Damping ratio ζ = −tr(A)/(2ωn). */
  dampingRatio: number;
  /** Steady-state speed Kt·V/(R·b + Kt·Ke) [rad/s]. */
  steadySpeed: number;
  /** Steady-state current b·ω_ss/Kt [A] (equal to (V − Ke·ω_ss)/R). */
  steadyCurrent: number;
  /** Stall current V/R [A]. */
  stallCurrent: number;
  /** Stall torque Kt·V/R [N·m]. */
  stallTorque: number;
  /** Ideal no-load speed V/Ke [rad/s]. */
  noLoadSpeed: number;
  /** Motor constant Km = Kt/√R [N·m/√W]. */
  motorConstant: number;
}

/** Options of the adaptive detailed-model integrator. */
export interface DetailedOptions {
  /** Armature current at t₀ [A]. @default 0 */
  initialCurrent?: number;
  /** Rotor speed at t₀ [rad/s]. @default 0 */
  initialSpeed?: number;
  /** Rotor angle at t₀ [rad]. @default 0 */
  initialPosition?: number;
  /** Relative tolerance of the embedded Dormand–Prince error estimate. @default 1e-9 */
  relativeTolerance?: number;
  /** Maximum number of internal steps inside one sample interval. @default 200000 */
  maxStepsPerInterval?: number;
  /**
   * Time [s] from which the armature circuit is open (i = 0, the terminals show the back-EMF).
   * @default Infinity
   */
  openCircuitFrom?: number;
}

/** Energy totals of a detailed simulation over the whole record [J]. */
export interface EnergyTotals {
  /** ∫ v_t·i dt at the motor terminals. */
  electricalInput: number;
  /** ∫ R(T)·i² dt. */
  copperLoss: number;
  /** ∫ Rs·i² dt dissipated in the supply internal resistance (not part of electricalInput). */
  sourceLoss: number;
  /** Change of the magnetic energy ½·L·i². */
  magneticEnergyChange: number;
  /** ∫ (b·ω² + Tc·|ω| + cd·|ω|³) dt. */
  frictionLoss: number;
  /** ∫ (loadTorque + loadDamping·ω)·ω dt delivered to the load. */
  loadWork: number;
  /** Change of ½·(J + loadInertia)·ω². */
  kineticEnergyChange: number;
  /** ∫ (Ke − Kt)·i·ω dt: energy the model creates when Kt ≠ Ke (0 when Kt = Ke). */
  conversionMismatch: number;
  /**
   * electricalInput − copperLoss − magneticEnergyChange − frictionLoss − loadWork −
   * kineticEnergyChange − conversionMismatch: integration error only (≈ 0).
   */
  balance: number;
}

/** Result of `simulateDetailed`. */
export interface DetailedTrace {
  /** Armature current [A] at the requested times. */
  current: Float64Array;
  /** Rotor speed [rad/s]. */
  speed: Float64Array;
  /** Rotor angle [rad]. */
  position: Float64Array;
  /** Terminal voltage actually applied to the armature [V] (after clipping, Rs and current limit). */
  terminalVoltage: Float64Array;
  /** Winding temperature [°C] (constant when the thermal model is off). */
  temperature: Float64Array;
  /** Shaft torque passed to the load, loadTorque + loadDamping·ω + loadInertia·dω/dt [N·m]. */
  shaftTorque: Float64Array;
  /** Energy bookkeeping. */
  energy: EnergyTotals;
  /** Counts of integrator work and located events. */
  stats: { steps: number; rejected: number; stickEvents: number; breakawayEvents: number; reversals: number };
}

/** Experiment kinds the recording generator can play. */
export type ExperimentKind =
  | 'locked-rotor'
  | 'step'
  | 'coast-down'
  | 'steady-state'
  | 'prbs'
  | 'multisine'
  | 'loaded';

/** Noise standard deviations per channel (in the channel's SI unit). */
export interface ChannelNoise {
  /** [V] @default 0 */
  voltage?: number;
  /** [A] @default 0 */
  current?: number;
  /** [rad/s] @default 0 */
  speed?: number;
  /** [N·m] @default 0 */
  torque?: number;
  /** [°C] @default 0 */
  temperature?: number;
}

/** Options of `generateRecording`. */
export interface RecordingOptions {
  /** Sample rate [Hz]. @default 10000 */
  sampleRate?: number;
  /** Record length [s]. @default depends on the experiment and the motor (see generateRecording). */
  duration?: number;
  /** Supply / step voltage [V]. @default 12 */
  volts?: number;
  /** Noise σ per channel. @default all 0 (clean trajectory) */
  noise?: ChannelNoise;
  /** Encoder counts per revolution; when set, position in counts is logged. */
  encoderCounts?: number;
  /** Log speed as well when an encoder is set. @default false with an encoder, true without */
  logSpeed?: boolean;
  /** Standard deviation of the sample-time jitter [s]; must be < 0.25 sample interval. @default 0 */
  timeJitter?: number;
  /** Seed of the generator's PRNG. @default 1 */
  seed?: number;
}

/** One logged column. */
export interface RecordingColumn {
  /** Column name, e.g. `current`. */
  name: string;
  /** Unit text, e.g. `A`. */
  unit: string;
  /** Values. */
  values: Float64Array;
}

/** Description of the commanded input, stored beside the record as truth. */
export interface CommandedInput {
  /** What was played. */
  kind: ExperimentKind;
  /** Human-readable description of the input. */
  description: string;
  /** Time of the step / switching / open-circuit instant [s] where the experiment has one. */
  eventTime?: number;
  /** Voltage levels [V] (step: [before, after]; staircase: each level; prbs: [low, high]). */
  levels: number[];
  /** Dwell per level for the staircase, PRBS bit period, multisine base frequency, … */
  detail: Record<string, number | string>;
  /** The commanded (noise-free) voltage at each sample [V]. */
  voltage: Float64Array;
}

/** Everything needed to check an estimate against the generated record. */
export interface RecordingTruth {
  /** True motor constants and effect terms. */
  params: DetailedParams;
  /** The experiment played. */
  experiment: ExperimentKind;
  /** The resolved options. */
  options: Required<Omit<RecordingOptions, 'encoderCounts' | 'noise'>> & {
    encoderCounts: number | null;
    noise: Required<ChannelNoise>;
  };
  /** Names of the effect terms switched on. */
  effects: string[];
  /** Which model produced the trajectory. */
  model: 'linear-exact' | 'detailed-adaptive';
  /** PRNG seed. */
  seed: number;
  /** The commanded input. */
  input: CommandedInput;
  /** Notes on what the record contains, e.g. what the voltage column shows. */
  notes: string[];
  /** Label: the record is invented (made by this generator). */
  provenance: string;
}

/** A generated recording. */
export interface GeneratedRecording {
  /** Logged columns, time first. */
  columns: RecordingColumn[];
  /** The truth sidecar. */
  truth: RecordingTruth;
}

/**
 * What `simulateHybrid` is asked to simulate: sample instants, the held drive voltage, and how
 * the run starts and ends.
 */
export interface HybridPlan {
  /** Sample instants [s], strictly increasing; the outputs are the states at these instants. */
  time: Float64Array;
  /**
   * Drive voltage [V] held piecewise constant: `input[j]` holds from `inputTime[j]` until the next
   * change. Without `inputTime`, `input[k]` holds on [time[k], time[k+1]) (one value per sample).
   * With `Rs` in the parameters this is the supply voltage; otherwise the terminal voltage (or the
   * command, when `Vmax` clips it).
   */
  input: Float64Array;
  /** Instants [s] at which each input value starts, increasing (the input's own grid, e.g. a DAC clock). */
  inputTime?: Float64Array;
  /** `held`: the rotor is clamped (locked-rotor test). @default 'free' */
  rotor?: 'free' | 'held';
  /** Instant [s] from which the armature circuit is open (coast-down): i = 0, the terminals show Ke·ω. @default Infinity */
  openFrom?: number;
  /**
   * Start state: `rest` (i = 0, ω = 0; stuck when the model has friction), `steady` (the running
   * steady state under the first input value), or explicit values. @default 'rest'
   */
  initial?: 'rest' | 'steady' | { current: number; speed: number };
  /** Winding temperature at the first sample [°C] (thermal model). @default the ambient temperature */
  initialTemperature?: number;
}

/** Output of `simulateHybrid`, one value per sample instant. */
export interface HybridTrace {
  /** Armature current [A]. */
  current: Float64Array;
  /** Rotor speed [rad/s]. */
  speed: Float64Array;
  /** Rotor angle from the first sample [rad] (exact integral of the speed). */
  position: Float64Array;
  /** Voltage at the motor terminals [V]: the drive voltage less Rs·i, Ke·ω with the circuit open, R·i + Ke·ω at the current limit. */
  terminalVoltage: Float64Array;
  /** Winding temperature [°C] (the initial temperature throughout without the thermal model). */
  temperature: Float64Array;
  /** Number of located events (stick, breakaway, reversal, limit entries and exits). */
  events: number;
}

/** Options of {@link lockedRotorHoldTime}. */
export interface LockedRotorHoldOptions {
  /** Winding resistance [Ω] at `resistanceTemperature`. */
  R: number;
  /** Current held through the stalled winding [A] (its magnitude is used). */
  current: number;
  /** Allowed rise of the winding temperature ΔT [K], > 0. @default 20 */
  riseK?: number;
  /** Thermal resistance winding → ambient [K/W]; absent: no cooling at all (adiabatic). */
  Rth?: number;
  /** Thermal capacitance of the winding [J/K]; absent: the conservative default (see below). */
  Cth?: number;
  /** Temperature at which R is given [°C]. @default 20 */
  resistanceTemperature?: number;
  /** Winding temperature at the start of the hold [°C]. @default resistanceTemperature */
  startTemperature?: number;
  /** Copper law constant k [°C]. @default 234.5 */
  copperConstant?: CopperConstant;
}

/** Result of {@link lockedRotorHoldTime}. */
export interface LockedRotorHold {
  /** Longest hold [s] before the winding has risen by `riseK` (Infinity when it never does). */
  holdSeconds: number;
  /** The allowed rise ΔT [K]. */
  riseK: number;
  /** Copper loss at the start of the hold, I²·R(T_start) [W]. */
  powerAtStart: number;
  /** Thermal resistance used [K/W] (Infinity: no cooling). */
  Rth: number;
  /** Thermal capacitance used [J/K]. */
  Cth: number;
  /** `given`: both Rth and Cth came from the caller; `default`: the conservative default filled a gap. */
  thermalData: 'given' | 'default';
  /** Plain words on the thermal data, for reports. */
  note: string;
}

/** A rational transfer function in s: numerator and denominator coefficients, highest power first. */
export interface TransferFunction {
  /** Numerator coefficients, highest power of s first. */
  numerator: number[];
  /** Denominator coefficients, highest power of s first (monic: the first is 1). */
  denominator: number[];
}

/** The lumped model's linear forms (see {@link linearModelForms}). */
export interface LinearModelForms {
  /** State, input and output names with their SI units. */
  signals: { state: string[]; inputs: string[]; outputs: string[] };
  /** Continuous state space ẋ = A·x + B·u, y = C·x + D·u; matrices as arrays of rows. */
  stateSpace: { A: number[][]; B: number[][]; C: number[][]; D: number[][] };
  /** Transfer functions from the terminal voltage (load torque 0). */
  transfer: { voltageToCurrent: TransferFunction; voltageToSpeed: TransferFunction };
  /**
   * Exact zero-order-hold model at the sample time `dt`: x[k+1] = Φ·x[k] + Γ·u[k], y = C·x + D·u,
   * inputs held over each interval. Present when `dt` was given.
   */
  discrete?: { dt: number; Phi: number[][]; Gamma: number[][]; C: number[][]; D: number[][] };
}
