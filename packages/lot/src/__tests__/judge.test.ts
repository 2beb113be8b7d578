import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { judgeKey } from '../judgeKey.js';
import { judgeLot } from '../judgeLot.js';
import { judgeMotor } from '../judgeMotor.js';
import type { LotSpec, MotorOutcome, MotorValue, SpecLimit } from '../types.js';

// Invented limits of the demo scenario: R 1.9 Ω ± 5 % (1.805 … 1.995 Ω, derived here).
const R: SpecLimit = { key: 'R', unit: 'Ω', label: 'armature resistance', lower: 1.805, upper: 1.995, nominal: 1.9, tolerancePercent: 5, path: 'limits.R' };
const v = (value: number | null, ci95: [number, number] | null, note = ''): MotorValue => ({ value, ci95, unit: 'Ω', note });

function outcome(serial: string, values: Record<string, MotorValue>, status: 'fitted' | 'error' = 'fitted', reason = ''): MotorOutcome {
  return { serial, status, reason, values, inputs: [], model: '', findings: [], ignoredFiles: [], parameterSet: null, threadId: 0 };
}

describe('judgeKey (guarded acceptance with the 95 % interval)', () => {
  it.each([
    ['inside', 1.9, [1.899, 1.901], 'pass', /inside the limits/],
    ['inside with an end exactly on the upper limit', 1.994, [1.993, 1.995], 'pass', /inside/],
    ['straddling the upper limit', 1.995, [1.994, 1.996], 'undecided', /straddles the upper limit 1\.995 Ω/],
    ['straddling the lower limit', 1.806, [1.804, 1.808], 'undecided', /straddles the lower limit 1\.805 Ω/],
    ['wider than the tolerance zone', 1.9, [1.7, 2.1], 'undecided', /lower limit 1\.805 Ω and the upper limit 1\.995 Ω/],
    ['entirely above', 2.12, [2.118, 2.122], 'fail', /above the upper limit 1\.995 Ω/],
    ['entirely below', 1.7, [1.69, 1.71], 'fail', /below the lower limit 1\.805 Ω/],
    ['below with the upper end exactly on the lower limit', 1.8, [1.795, 1.805], 'undecided', /straddles the lower limit/],
  ] as const)('%s → %s', (_name, value, ci, verdict, reason) => {
    const j = judgeKey(R, v(value, [ci[0], ci[1]]));
    expect(j.verdict).toBe(verdict);
    expect(j.reason).toMatch(reason);
    expect(j.guardBand).not.toBeNull();
  });

  it('cannot decide a key without a value or without an interval, and says why', () => {
    expect(judgeKey(R, undefined)).toMatchObject({ verdict: 'undecided', reason: 'no value: the fit does not give this key' });
    expect(judgeKey(R, v(null, null, 'not informed'))).toMatchObject({ verdict: 'undecided', reason: 'no value: not informed' });
    expect(judgeKey(R, v(1.9, null, 'not identifiable: fixed'))).toMatchObject({ verdict: 'undecided', reason: 'no 95 % interval: not identifiable: fixed', guardBand: null });
  });

  it('judges a one-sided limit on its side only', () => {
    const atLeast: SpecLimit = { ...R, key: 'peakEfficiency', unit: '%', lower: 60, upper: null, nominal: null, tolerancePercent: null };
    expect(judgeKey(atLeast, v(1e6, [1e6 - 1, 1e6 + 1])).verdict).toBe('pass');
    expect(judgeKey(atLeast, v(59, [58, 60.5])).verdict).toBe('undecided');
    expect(judgeKey(atLeast, v(50, [49, 51])).verdict).toBe('fail');
  });

  it('passes exactly when the estimate lies at least the guard band U inside each limit, and fails exactly when it lies at least U outside', () => {
    // Property (derived here from the rule): with U₋ = x − lo and U₊ = hi − x,
    // pass ⇔ LSL + U₋ ≤ x ≤ USL − U₊; fail ⇔ x + U₊ < LSL or x − U₋ > USL.
    fc.assert(fc.property(
      fc.double({ min: 1.6, max: 2.2, noNaN: true }), fc.double({ min: 0, max: 0.3, noNaN: true }), fc.double({ min: 0, max: 0.3, noNaN: true }),
      (x, below, above) => {
        const lo = x - below, hi = x + above;
        const j = judgeKey(R, v(x, [lo, hi]));
        const uBelow = j.guardBand!.below, uAbove = j.guardBand!.above;
        const pass = lo >= R.lower! && hi <= R.upper!;
        const fail = hi < R.lower! || lo > R.upper!;
        expect(j.verdict).toBe(pass ? 'pass' : fail ? 'fail' : 'undecided');
        // the guard bands are the distances from the estimate to the interval's ends
        expect(Math.abs(uBelow - (x - lo))).toBeLessThanOrEqual(1e-15 * Math.abs(x));
        expect(Math.abs(uAbove - (hi - x))).toBeLessThanOrEqual(1e-15 * Math.abs(x));
      },
    ), { seed: 14, numRuns: 500 });
  });
});

describe('judgeMotor and judgeLot', () => {
  const spec: LotSpec = {
    name: 'invented', description: '', ratedVoltage: null,
    limits: [R, { ...R, key: 'L', unit: 'H', lower: 5e-4, upper: 7e-4, nominal: null, tolerancePercent: null, path: 'limits.L' }],
  };
  const L = (x: number): MotorValue => ({ value: x, ci95: [x * 0.999, x * 1.001], unit: 'H', note: '' });

  it('passes a motor only when every key passes, fails it when any key fails, and leaves it undecided otherwise', () => {
    expect(judgeMotor(spec, outcome('A', { R: v(1.9, [1.89, 1.91]), L: L(6e-4) })).verdict).toBe('pass');
    const b = judgeMotor(spec, outcome('B', { R: v(1.995, [1.99, 2.0]), L: L(8e-4) }));
    expect(b.verdict).toBe('fail');
    expect(b.reason).toBe('out of spec: L; undecided: R');
    const c = judgeMotor(spec, outcome('C', { R: v(1.995, [1.99, 2.0]), L: L(6e-4) }));
    expect(c).toMatchObject({ verdict: 'undecided', reason: 'undecided: R' });
    const d = judgeMotor(spec, outcome('D', {}, 'error', 'D/step.csv: no time column'));
    expect(d).toMatchObject({ verdict: 'error', reason: 'D/step.csv: no time column', keys: [] });
  });

  it('accepts a lot only when every motor passes, and counts the verdicts', () => {
    const good = [outcome('A', { R: v(1.9, [1.89, 1.91]), L: L(6e-4) }), outcome('B', { R: v(1.85, [1.84, 1.86]), L: L(5.5e-4) })];
    const ok = judgeLot(spec, good);
    expect(ok.verdict).toBe('pass');
    expect(ok.counts).toEqual({ pass: 2, fail: 0, undecided: 0, error: 0 });
    const mixed = judgeLot(spec, [...good, outcome('E', {}, 'error', 'unreadable'), outcome('F', { R: v(2.2, [2.1, 2.3]), L: L(6e-4) })]);
    expect(mixed.verdict).toBe('not accepted');
    expect(mixed.counts).toEqual({ pass: 2, fail: 1, undecided: 0, error: 1 });
    expect(mixed.statistics.map((s) => [s.key, s.n])).toEqual([['R', 3], ['L', 3]]);
    expect(judgeLot(spec, []).verdict).toBe('not accepted');
  });
});
