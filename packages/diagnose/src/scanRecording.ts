import { detectFriction } from './detectFriction.js';
import { detectInputDelay } from './detectInputDelay.js';
import { detectSaturation } from './detectSaturation.js';
import { detectSensorOffset } from './detectSensorOffset.js';
import { detectSlowSampling } from './detectSlowSampling.js';
import { detectStiction } from './detectStiction.js';
import { detectWeakExcitation } from './detectWeakExcitation.js';
import { detectWindingHeating } from './detectWindingHeating.js';
import { checkRecording } from './internal.js';
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
  checkRecording('scanRecording', recording);
  if (options === null || typeof options !== 'object') throw new TypeError('scanRecording: options must be an object');
  const kind = options.kind ?? 'unknown';
  const findings: Finding[] = [];
  const friction = detectFriction(recording, { kind, ...(options.alpha !== undefined ? { alpha: options.alpha } : {}) });
  findings.push(...friction.findings);
  if (kind !== 'coast-down' && kind !== 'locked-rotor') {
    const st = detectStiction(recording);
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
