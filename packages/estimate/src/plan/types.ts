/**
 * Plain data shapes of experiment planning: planned runs, their predicted information, and the
 * locked-rotor time budget. JSON-able except `Float64Array` series.
 */
import type { MotorParams } from '@motorprint/model';
import type { MotorExperimentKind, RecordingData } from '../motor/types.js';

/** Measurement noise of a planned run: SDs per channel [V, A, rad/s, N·m]. */
export interface PlannedNoise {
  /** Voltage noise σ [V]; 0: the logged voltage is the exact command. */
  voltage?: number;
  /** Current noise σ [A]. */
  current?: number;
  /** Speed noise σ [rad/s]. */
  speed?: number;
  /** Torque noise σ [N·m] (loaded runs). */
  torque?: number;
}

/** One planned bench run. Absent fields take the defaults named on each. */
export interface PlannedRun {
  /** Experiment kind. */
  kind: MotorExperimentKind;
  /** Label. @default `<kind> <n>` */
  name?: string;
  /** Record length [s]. @default as the recording generator (12·τe/0.9 locked-rotor, 6·τm/0.9 step, …) */
  duration?: number;
  /** Sample rate [Hz]. @default 10000 */
  sampleRate?: number;
  /**
   * Voltage levels [V]: step, locked-rotor, loaded — [before, after]; coast-down — [the driven
   * plateau]; steady-state — each level of the staircase; prbs — [low, high]; multisine — [offset,
   * peak deviation]. @default from `PlanOptions.volts` as the recording generator plays them
   */
  levels?: number[];
  /** PRBS bit time [s]. @default max(τm/2, one sample) */
  bitTime?: number;
  /** Noise σ per channel; the quantisation of `resolution` adds q/√12. @default `PlanOptions.noise`, channel by channel */
  noise?: PlannedNoise;
  /** Quantisation step per channel [V, A, rad/s]: contributes σ = q/√12. */
  resolution?: { voltage?: number; current?: number; speed?: number };
  /** Encoder counts per revolution: the speed is logged as count differences (angle quantum 2π/counts, σ = q/√12 on the angle). */
  encoderCounts?: number;
  /** Whether the voltage (and current) is logged; false: a speed-only coast-down. @default true */
  voltage?: boolean;
  /** Load torque of a loaded run [N·m]. @default 25 % of the stall torque at the top level */
  loadTorque?: number;
}

/** Options of {@link planExperiments}. */
export interface PlanOptions {
  /** Supply voltage for default levels [V]. @default 12 */
  volts?: number;
  /** Noise of runs that give none. */
  noise?: PlannedNoise;
  /** Target relative standard error (0.01 = 1 %). @default 0.01 */
  target?: number;
  /** Look for run changes that meet the target. @default true */
  suggest?: boolean;
  /** Thermal data of the winding for the locked-rotor budget; absent parts take conservative defaults. */
  thermal?: { Rth?: number; Cth?: number };
  /** Allowed winding rise of the locked-rotor budget [K]. @default 20 */
  riseK?: number;
  /** Seed of the voltage noise of the planning runs (see `planExperiments`). @default 1 */
  seed?: number;
}

/** A planned run with every default filled in. */
export interface ResolvedRun {
  kind: MotorExperimentKind;
  name: string;
  duration: number;
  sampleRate: number;
  levels: number[];
  bitTime: number | null;
  noise: Required<PlannedNoise>;
  resolution: { voltage: number; current: number; speed: number };
  encoderCounts: number | null;
  voltage: boolean;
  loadTorque: number | null;
  /** Effective σ per channel (noise and quantisation combined) [V, A, rad/s, rad for an encoder angle]. */
  sigma: { voltage: number; current: number; speed: number; angle: number | null; torque: number };
}

/** One constant's prediction. */
export interface PlannedConstant {
  /** Constant name (K stands for Kt = Ke). */
  name: string;
  /** Draft value [SI]. */
  value: number;
  /** SI unit. */
  unit: string;
  /** Predicted standard error [unit] (null when not informed or set aside). */
  standardError: number | null;
  /** Predicted relative standard error (null when not informed or set aside). */
  relativeError: number | null;
  /** `identified`; `set-aside`: barely informed, predicted as pinned; `not-informed`: no run informs it. */
  status: 'identified' | 'set-aside' | 'not-informed';
  /** Whether the relative SE meets the target. */
  met: boolean;
  /** Share of the constant's Fisher information per run (run name → share 0…1). */
  shares: Record<string, number>;
  /** Relative SE before it was set aside (set-aside only). */
  relativeErrorFree?: number;
}

/** One suggested change of the plan and what it predicts. */
export interface PlanSuggestion {
  /** The constant the change is for. */
  constant: string;
  /** The run changed. */
  run: string;
  /** Changes made: knob, old and new value (`levels`: the top level [V]; all levels scale with it). */
  changes: { knob: 'duration' | 'sampleRate' | 'bitTime' | 'levels'; from: number; to: number }[];
  /** Relative SE of the constant before and after. */
  from: number;
  to: number;
  /** Whether the target is met after the change. */
  met: boolean;
  /** One line: "duration 50 ms → 3.2 s, and sample rate 1 kHz → 16 kHz: b 11 % → 0.83 %". */
  text: string;
}

/** The locked-rotor time budget of one planned locked-rotor run. */
export interface LockedRotorBudget {
  /** Run name. */
  run: string;
  /** Time the top level is held [s]. */
  holdSeconds: number;
  /** Steady current at the top level, V/R [A]. */
  current: number;
  /** Longest hold before the winding rises by `riseK` [s]. */
  budgetSeconds: number;
  /** Allowed rise [K]. */
  riseK: number;
  /** Where the thermal data came from, in words. */
  note: string;
  /** Hold longer than the budget. */
  over: boolean;
}

/** Result of {@link planExperiments}. */
export interface ExperimentPlan {
  /** The draft constants the plan was computed at. */
  draft: MotorParams;
  /** The runs with their defaults filled in. */
  runs: ResolvedRun[];
  /** Target relative SE. */
  target: number;
  /** Predictions per constant (R, L, K — or Kt and Ke apart with a loaded run —, J, b). */
  constants: PlannedConstant[];
  /** Constants set aside as barely informed, with the rule. */
  setAside: { names: string[]; rule: string };
  /** Time constants of the draft: τe = L/R and τm = J·R/(R·b + Kt·Ke) [s]. */
  timeConstants: { electrical: number; mechanical: number };
  /** Hints on sampling and excitation against the time constants. */
  notes: string[];
  /** Suggested changes for constants that miss the target. */
  suggestions: PlanSuggestion[];
  /** Locked-rotor budgets. */
  lockedRotor: LockedRotorBudget[];
  /** How the numbers were computed, in words. */
  method: string;
}

/** A simulated planned run: the recording with its kind and name, ready for `fitMotor`. */
export interface PlannedRecording {
  /** The data (noisy unless asked otherwise). */
  recording: RecordingData;
  /** Experiment kind. */
  kind: MotorExperimentKind;
  /** Run name. */
  name: string;
  /** The commanded (noise-free) voltage [V] per sample. */
  command: Float64Array;
}

/** Options of {@link checkLockedRotorHold}. */
export interface LockedRotorHoldCheckOptions {
  /** Winding resistance [Ω] (a fit's R) at `resistanceTemperature`. */
  R: number;
  /** Recording name for the finding. @default 'the locked-rotor recording' */
  name?: string;
  /** Thermal resistance winding → ambient [K/W]; absent: no cooling (conservative default). */
  Rth?: number;
  /** Thermal capacitance [J/K]; absent: the conservative default of `lockedRotorHoldTime`. */
  Cth?: number;
  /** Temperature at which R is given [°C]. @default 20 */
  resistanceTemperature?: number;
  /** Allowed winding rise [K]. @default 20 */
  riseK?: number;
}

/** A finding in the shape the diagnosis and the parameter set use. */
export interface HoldFinding {
  code: 'locked-rotor-hold-over-budget';
  severity: 'warning';
  title: string;
  evidence: Record<string, number | string>;
  advice: string;
}

/** Result of {@link checkLockedRotorHold}. */
export interface LockedRotorHoldCheck {
  /** How long the winding was driven [s]. */
  holdSeconds: number;
  /** Current through the stalled winding used for the budget [A]. */
  current: number;
  /** Longest hold for the allowed rise [s]. */
  budgetSeconds: number;
  /** Where the thermal data came from, in words. */
  note: string;
  /** Present when the hold was longer than the budget. */
  finding?: HoldFinding;
}
