import { frictionWith } from './detectFriction.js';
import { detectInputDelay } from './detectInputDelay.js';
import { detectSaturation } from './detectSaturation.js';
import { detectSensorOffset } from './detectSensorOffset.js';
import { detectSlowSampling } from './detectSlowSampling.js';
import { stictionWith } from './detectStiction.js';
import { detectWeakExcitation } from './detectWeakExcitation.js';
import { detectWindingHeating } from './detectWindingHeating.js';
import { arraysOf, checkRecording, withSharedNoise } from './internal.js';
import { mechanicalRegressionOf } from './mechanicalRegression.js';
import type { MechanicalRegression, MechanicalRegressionInput } from './mechanicalRegression.js';
import type { Finding, ModelComparison, RecordingKind, RecordingLike } from './types.js';

/** Options of `scanRecording`. */
export interface ScanOptions {
  /** Experiment kind; `coast-down` switches the friction method. @default 'unknown' */
  kind?: RecordingKind;
  /** Commanded voltage per sample [V], when known (enables the voltage-limit check). */
  commandedVoltage?: Float64Array;
  /** Electrical time constant τe [s], when known. */
  electricalTimeConstant?: number;
  /** Significance level of the model comparisons. @default 0.01 */
  alpha?: number;
}

/**
 * Runs every data-only detector on one recording and returns what fired, with the model
 * comparisons behind the friction verdicts. Codes: `coulomb-friction`, `speed-squared-drag`,
 * `stiction`, `drive-saturation`, `clipped-samples`, `winding-heating`, `weak-excitation`,
 * `slow-sampling`, `sensor-offset`, `input-delay` (see each `detect…` function for its rule).
 *
 * @param recording - `{ time [s], channels }` in SI
 * @param options - kind, commanded voltage, τe, alpha
 * @returns `{ findings, comparisons }`
 * @throws TypeError / RangeError for a malformed recording (names the channel and sample)
 * @example
 * scanRecording(sweep, { kind: 'steady-state' }).findings.map((f) => f.code); // => ['coulomb-friction'] with Coulomb friction
 */
export function scanRecording(recording: RecordingLike, options: ScanOptions = {}): { findings: Finding[]; comparisons: ModelComparison[] } {
  // (A malformed argument skips the memo and meets scanShared's checks and their messages.)
  const wellFormed = recording !== null && typeof recording === 'object' && recording.channels !== null && typeof recording.channels === 'object' && options !== null && typeof options === 'object';
  const memo = scans !== null && wellFormed ? scans : null;
  const arrays = memo === null ? [] : arraysOf(recording);
  const hit = memo?.get(recording)?.find((s) => sameScan(s, arrays, options));
  if (hit !== undefined) return hit.result;
  // Every detector below reads the same channels' noise levels: each is estimated once.
  const result = withSharedNoise(() => scanShared(recording, options));
  if (memo !== null) {
    const list = memo.get(recording) ?? [];
    list.push({ arrays, options: { ...options }, result });
    memo.set(recording, list);
  }
  return result;
}

/**
 * The scans already run inside the current `shareScans` call, by recording object: `identifyMotor`
 * diagnoses each fit it moves to, and the data-only detectors give the same answer on the same
 * recording each time. A scan is reused when the recording holds the same arrays (by identity) and
 * the options are the same (each field by `Object.is`); the map is dropped when the outermost call
 * returns or throws. Callers read the result only (`diagnoseFit` copies what it keeps).
 */
let scans: Map<RecordingLike, { arrays: unknown[]; options: ScanOptions; result: { findings: Finding[]; comparisons: ModelComparison[] } }[]> | null = null;

/** Runs `work` with each `scanRecording` of the same recording and options done once (see `scans`). */
export function shareScans<T>(work: () => T): T {
  if (scans !== null) return work();
  scans = new Map();
  try {
    return work();
  } finally {
    scans = null;
  }
}

function sameScan(s: { arrays: unknown[]; options: ScanOptions }, arrays: unknown[], options: ScanOptions): boolean {
  if (s.arrays.length !== arrays.length || !s.arrays.every((a, i) => a === arrays[i])) return false;
  const keys = new Set([...Object.keys(s.options), ...Object.keys(options)]) as Set<keyof ScanOptions>;
  for (const k of keys) if (!Object.is(s.options[k], options[k])) return false;
  return true;
}

function scanShared(recording: RecordingLike, options: ScanOptions): { findings: Finding[]; comparisons: ModelComparison[] } {
  checkRecording('scanRecording', recording);
  if (options === null || typeof options !== 'object') throw new TypeError('scanRecording: options must be an object');
  const kind = options.kind ?? 'unknown';
  const findings: Finding[] = [];
  const regress = sharedRegression();
  const friction = frictionWith(recording, { kind, ...(options.alpha !== undefined ? { alpha: options.alpha } : {}) }, regress);
  findings.push(...friction.findings);
  if (kind !== 'coast-down' && kind !== 'locked-rotor') {
    const st = stictionWith(recording, regress);
    if (st) findings.push(st);
  }
  findings.push(...detectSaturation(recording, options.commandedVoltage ? { commandedVoltage: options.commandedVoltage } : {}));
  if (kind === 'locked-rotor' || kind === 'unknown') {
    const h = detectWindingHeating(recording);
    if (h) findings.push(h);
  }
  if (kind !== 'coast-down' && kind !== 'steady-state') {
    const w = detectWeakExcitation(recording, null);
    if (w) findings.push(w);
  }
  if (kind === 'locked-rotor' || kind === 'step' || kind === 'unknown' || options.electricalTimeConstant !== undefined) {
    const s = detectSlowSampling(recording, options.electricalTimeConstant !== undefined ? { electricalTimeConstant: options.electricalTimeConstant } : {});
    if (s) findings.push(s);
  }
  findings.push(...detectSensorOffset(recording));
  if (kind !== 'coast-down') {
    const d = detectInputDelay(recording);
    if (d) findings.push(d);
  }
  return { findings, comparisons: friction.comparisons };
}

/**
 * `mechanicalRegression` for one scan, run once per input: the friction and stiction detectors
 * regress the same current on the same speed (both only read the result). An input that differs
 * in any field (the arrays by identity) is regressed afresh; a failure is repeated as it was.
 */
function sharedRegression(): (input: MechanicalRegressionInput) => MechanicalRegression {
  const done: { input: MechanicalRegressionInput; result?: MechanicalRegression; error?: unknown }[] = [];
  const same = (a: MechanicalRegressionInput, b: MechanicalRegressionInput): boolean => {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]) as Set<keyof MechanicalRegressionInput>;
    for (const k of keys) if (!Object.is(a[k] ?? defaults[k], b[k] ?? defaults[k])) return false;
    return true;
  };
  return (input) => {
    const hit = done.find((d) => same(d.input, input));
    if (hit !== undefined) {
      if ('error' in hit) throw hit.error;
      return hit.result!;
    }
    try {
      // The drive and the speed are the recording's channels, checked finite by checkRecording above.
      const result = mechanicalRegressionOf(input, true);
      done.push({ input: { ...input }, result });
      return result;
    } catch (error) {
      done.push({ input: { ...input }, error });
      throw error;
    }
  };
}

/** The documented defaults of the regression's options that the detectors may leave out. */
const defaults: Partial<Record<keyof MechanicalRegressionInput, unknown>> = { alpha: 0.01, trim: 5, offset: false };
