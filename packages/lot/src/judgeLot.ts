import { judgeMotor } from './judgeMotor.js';
import { keyStatistics } from './keyStatistics.js';
import type { LotJudgement, LotSpec, MotorOutcome, VerdictCounts } from './types.js';

/**
 * Judges a whole lot: every motor by {@link judgeMotor}, lot statistics of every checked key by
 * {@link keyStatistics}, the verdict counts, and the lot's overall state (`pass` only when every
 * motor passes).
 *
 * @param spec - the resolved spec
 * @param outcomes - what fitting each motor gave, in the order to report
 * @returns the judged lot
 * @example
 * judgeLot(spec, outcomes).counts; // => { pass: 9, fail: 2, undecided: 1, error: 0 }
 */
export function judgeLot(spec: LotSpec, outcomes: readonly MotorOutcome[]): LotJudgement {
  const motors = outcomes.map((o) => judgeMotor(spec, o));
  const counts: VerdictCounts = { pass: 0, fail: 0, undecided: 0, error: 0 };
  for (const m of motors) counts[m.verdict]++;
  const statistics = spec.limits.map((limit) => keyStatistics(limit, motors));
  const verdict = motors.length > 0 && counts.pass === motors.length ? 'pass' : 'not accepted';
  return { motors, statistics, counts, verdict };
}
