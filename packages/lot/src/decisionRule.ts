import type { DecisionRule } from './types.js';

/**
 * The decision rule every verdict follows, stated in words for the output, the report and the store.
 *
 * ## Method
 * Guarded acceptance and guarded rejection with the 95 % interval of the fit as the coverage
 * interval: a key passes when its whole 95 % interval lies inside the specification limits (ends
 * on a limit count as inside), fails when the whole interval lies outside them, and is undecided
 * when the interval straddles a limit. Put in the terms of JCGM 106:2012, §8 (acceptance limits and
 * guard bands; clause number from memory): the acceptance limits sit inside the tolerance limits by
 * a guard band w equal to the expanded uncertainty U (the interval half-width, k from Student-t at
 * 95 %), and the rejection limits sit outside them by the same U. ISO 14253-1 states the same
 * default rule for proving conformity and non-conformity (from memory). For a log-scale interval,
 * which is not symmetric, U is the distance from the estimate to the end of the interval on the
 * side of the limit.
 *
 * ## References
 * JCGM 106:2012, Evaluation of measurement data — The role of measurement uncertainty in
 * conformity assessment. ISO 14253-1, Geometrical product specifications — Inspection by
 * measurement of workpieces and measuring equipment — Part 1: Decision rules.
 *
 * @returns the rule (a fresh object)
 * @example
 * decisionRule().id; // => 'guarded-95'
 */
export function decisionRule(): DecisionRule {
  return {
    id: 'guarded-95',
    text:
      'A key passes when its whole 95 % interval lies inside the limits (an end on a limit counts as inside), ' +
      'fails when its whole 95 % interval lies outside them, and is undecided when the interval straddles a limit. ' +
      'A motor passes only when every checked key passes; it fails when any key fails; otherwise it is undecided. ' +
      'A motor whose recordings cannot be read or whose fit does not converge is an error, never a pass.',
    guardBand:
      'equal to the expanded uncertainty U at 95 % (the distance from the estimate to the end of its 95 % interval) on each side: ' +
      'the estimate must lie at least U inside a limit to pass (guarded acceptance) and at least U outside it to fail (guarded rejection).',
    references: [
      'JCGM 106:2012, The role of measurement uncertainty in conformity assessment, §8 (clause number from memory)',
      'ISO 14253-1, Decision rules for verifying conformity or nonconformity with specifications (from memory)',
    ],
  };
}
