import { judgeKey } from './judgeKey.js';
import type { LotSpec, MotorJudgement, MotorOutcome } from './types.js';

/**
 * A motor's verdict under {@link decisionRule}: `error` when it was not fitted (with the reason),
 * otherwise every spec limit is judged by {@link judgeKey}; the motor passes only when every key
 * passes, fails when any key fails, and is undecided otherwise.
 *
 * @param spec - the resolved spec
 * @param outcome - what fitting the motor gave
 * @returns the judgement
 * @example
 * judgeMotor(spec, outcome).verdict; // => 'pass' | 'fail' | 'undecided' | 'error'
 */
export function judgeMotor(spec: LotSpec, outcome: MotorOutcome): MotorJudgement {
  if (outcome.status !== 'fitted') {
    return { serial: outcome.serial, verdict: 'error', reason: outcome.reason || 'not fitted', keys: [], outcome };
  }
  const keys = spec.limits.map((limit) => judgeKey(limit, outcome.values[limit.key]));
  const failed = keys.filter((k) => k.verdict === 'fail').map((k) => k.key);
  const open = keys.filter((k) => k.verdict === 'undecided').map((k) => k.key);
  if (failed.length > 0) {
    return { serial: outcome.serial, verdict: 'fail', reason: `out of spec: ${failed.join(', ')}${open.length > 0 ? `; undecided: ${open.join(', ')}` : ''}`, keys, outcome };
  }
  if (open.length > 0) return { serial: outcome.serial, verdict: 'undecided', reason: `undecided: ${open.join(', ')}`, keys, outcome };
  return { serial: outcome.serial, verdict: 'pass', reason: 'every checked key inside its limits', keys, outcome };
}
