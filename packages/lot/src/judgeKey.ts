import type { KeyJudgement, MotorValue, SpecLimit } from './types.js';

/** Six significant digits, exponent form outside 1e-3…1e6 (as the command line prints numbers). */
function fmt(x: number): string {
  const a = Math.abs(x);
  if (a === 0 || (a >= 1e-3 && a < 1e6)) return String(Number(x.toPrecision(6)));
  return x.toExponential(5).replace(/\.?0+e/, 'e');
}

/**
 * The verdict of one checked key of one motor under {@link decisionRule}: `pass` when the whole
 * 95 % interval lies inside the limits (ends on a limit count as inside), `fail` when it lies
 * entirely outside, `undecided` when it straddles a limit or there is no interval.
 *
 * @param limit - the resolved spec limit
 * @param value - the motor's value of that key (null when the fit has none)
 * @returns the judgement, with the guard bands and the reason in plain words
 * @example
 * judgeKey({ key: 'R', unit: 'Ω', lower: 1.805, upper: 1.995, … }, { value: 1.994, ci95: [1.993, 1.996], unit: 'Ω', note: '' }).verdict;
 * // => 'undecided'
 */
export function judgeKey(limit: SpecLimit, value: MotorValue | undefined): KeyJudgement {
  const base = {
    key: limit.key, unit: limit.unit, lower: limit.lower, upper: limit.upper,
    value: value?.value ?? null, ci95: value?.ci95 ?? null,
  };
  if (value === undefined || value.value === null) {
    return { ...base, guardBand: null, verdict: 'undecided', reason: `no value: ${value?.note || 'the fit does not give this key'}` };
  }
  if (value.ci95 === null || !Number.isFinite(value.ci95[0]) || !Number.isFinite(value.ci95[1])) {
    return { ...base, guardBand: null, verdict: 'undecided', reason: `no 95 % interval: ${value.note || 'not identifiable from these recordings'}` };
  }
  const [lo, hi] = value.ci95;
  const x = value.value;
  const guardBand = { below: Math.max(0, x - lo), above: Math.max(0, hi - x) };
  const { lower, upper } = limit;
  const u = limit.unit;
  if (upper !== null && lo > upper) {
    return { ...base, guardBand, verdict: 'fail', reason: `whole interval above the upper limit ${fmt(upper)} ${u}` };
  }
  if (lower !== null && hi < lower) {
    return { ...base, guardBand, verdict: 'fail', reason: `whole interval below the lower limit ${fmt(lower)} ${u}` };
  }
  const straddles: string[] = [];
  if (lower !== null && lo < lower) straddles.push(`the lower limit ${fmt(lower)} ${u}`);
  if (upper !== null && hi > upper) straddles.push(`the upper limit ${fmt(upper)} ${u}`);
  if (straddles.length > 0) {
    return { ...base, guardBand, verdict: 'undecided', reason: `interval straddles ${straddles.join(' and ')}` };
  }
  return { ...base, guardBand, verdict: 'pass', reason: 'whole interval inside the limits' };
}
