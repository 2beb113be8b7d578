import { checkRecording, noiseOf, sig } from './internal.js';
import { meanSquares } from './passes.js';
import type { CovarianceSummary, Finding, RecordingLike } from './types.js';

/**
 * Looks for too little excitation (`weak-excitation`): a flat input, or a fit whose scaled
 * Jacobian is badly conditioned.
 *
 * ## Method
 * Flat input: the SD of the voltage over the record is below 10 noise SDs (nothing but noise
 * drives the motor). Conditioning (when a covariance summary is given): condition number of the
 * column-scaled Jacobian above `maxConditionNumber` (default 1e4: about four digits lost, common
 * practice, no source), or rank below p.
 *
 * @param recording - `{ time [s], channels }`, or null to judge only the summary
 * @param summary - covariance summary of a fit, or null
 * @param options - `maxConditionNumber` @default 1e4
 * @returns the finding, or null
 * @throws TypeError / RangeError for a malformed recording
 * @example
 * detectWeakExcitation(constantVoltageRecord, null)?.code; // => 'weak-excitation'
 */
export function detectWeakExcitation(
  recording: RecordingLike | null,
  summary: CovarianceSummary | null,
  options: { maxConditionNumber?: number } = {},
): Finding | null {
  const maxCond = options.maxConditionNumber ?? 1e4;
  const evidence: Record<string, number | string> = {};
  let fire = false;
  if (recording !== null) {
    const { n } = checkRecording('detectWeakExcitation', recording);
    const v = recording.channels.voltage;
    if (v && n >= 20) {
      const { ss } = meanSquares(v);
      const sd = Math.sqrt(ss / n);
      const noise = noiseOf(v);
      if (sd < 10 * noise || sd === 0) {
        fire = true;
        evidence['voltage SD [V]'] = sig(sd);
        evidence['voltage noise [V]'] = sig(noise);
      }
    }
  }
  if (summary !== null) {
    const p = summary.identifiable.length;
    if (summary.conditionNumber > maxCond || summary.rank < p) {
      fire = true;
      evidence['condition number'] = sig(summary.conditionNumber);
      evidence.rank = `${summary.rank} of ${p}`;
    }
  }
  if (!fire) return null;
  return {
    code: 'weak-excitation', severity: 'warning', title: 'The recordings do not excite the motor enough to separate the constants',
    evidence,
    advice: 'Add a recording that moves the motor through a range of speeds and currents (a PRBS or multisine, or a steady-state sweep), or pin constants known from elsewhere.',
  };
}
