import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';
import { keyStatistics } from '../keyStatistics.js';
import { robustZScores } from '../robustZScores.js';
import type { MotorJudgement, SpecLimit } from '../types.js';

const limit = (lower: number | null, upper: number | null): SpecLimit =>
  ({ key: 'x', unit: 'u', label: 'x', lower, upper, nominal: null, tolerancePercent: null, path: 'limits.x' });

function motors(values: (number | null)[]): MotorJudgement[] {
  return values.map((value, i) => ({
    serial: `M${i + 1}`, verdict: value === null ? 'error' : 'pass', reason: '',
    keys: value === null ? [] : [{ key: 'x', unit: 'u', value, ci95: [value, value], lower: null, upper: null, guardBand: { below: 0, above: 0 }, verdict: 'pass', reason: '' }],
    outcome: { serial: `M${i + 1}`, status: value === null ? 'error' : 'fitted', reason: '', values: {}, inputs: [], model: '', findings: [], ignoredFiles: [], parameterSet: null, threadId: 0 },
  }));
}

describe('keyStatistics', () => {
  it('gives n, mean, sample SD, min, max, Cp and Cpk of a small list', () => {
    // derived here: 1…5 → mean 3, SD √(10/4) = 1.5811388300841898; limits 0 … 6:
    // Cp = 6/(6·1.58114) = 0.6324555320336759, Cpk = min(3, 3)/(3·1.58114) = 0.6324555320336759.
    const s = keyStatistics(limit(0, 6), motors([1, 2, 3, 4, 5, null]));
    expect(s).toMatchObject({ n: 5, min: 1, max: 5, median: 3, mad: 1, outliers: [] });
    expectClose(s.mean!, 3, { rel: 1e-15 }, 'mean');
    expectClose(s.sd!, 1.5811388300841898, { rel: 1e-14 }, 'SD');
    expectClose(s.cp!, 0.6324555320336759, { rel: 1e-14 }, 'Cp');
    expectClose(s.cpk!, 0.6324555320336759, { rel: 1e-14 }, 'Cpk');
  });

  it('takes Cpk on the nearer limit of an off-centre lot, and on the given side of a one-sided limit', () => {
    // derived here: mean 3, SD 1.58114; limits 2 … 12: Cp = 10/9.48683 = 1.0540925533894598,
    // Cpk = (3 − 2)/(3·1.58114) = 0.21081851067789195.
    const s = keyStatistics(limit(2, 12), motors([1, 2, 3, 4, 5]));
    expectClose(s.cp!, 1.0540925533894598, { rel: 1e-14 }, 'Cp');
    expectClose(s.cpk!, 0.21081851067789195, { rel: 1e-14 }, 'Cpk');
    // derived here: only USL 9: Cpk = (9 − 3)/(3·1.58114) = 1.2649110640673518, Cp undefined.
    const one = keyStatistics(limit(null, 9), motors([1, 2, 3, 4, 5]));
    expect(one.cp).toBeNull();
    expectClose(one.cpk!, 1.2649110640673518, { rel: 1e-14 }, 'Cpk one-sided');
    expect(one.notes.join(' ')).toContain('one-sided');
  });

  it('marks a motor far from the median by its robust z-score and says when indices are undefined', () => {
    // derived here: median (10 + 10.05)/2 = 10.025; |x − 10.025| = 0.025, 0.075, 0.125, 0.025, 0.075, 2.975
    // → MAD 0.075; z(13) = 0.6745·2.975/0.075 = 26.755166…, z(9.9) = −0.6745·0.125/0.075 = −1.124 (no outlier).
    const s = keyStatistics(limit(9, 11), motors([10, 10.1, 9.9, 10.05, 9.95, 13]));
    expect(s.outliers.map((o) => o.serial)).toEqual(['M6']);
    expectClose(s.outliers[0]!.robustZ, 26.755166666666667, { rel: 1e-12 }, 'robust z');
    expect(keyStatistics(limit(0, 1), motors([0.5])).notes).toContain('Cp and Cpk need at least 2 motors with a value');
    const flat = keyStatistics(limit(0, 1), motors([0.5, 0.5, 0.5]));
    expect(flat.cp).toBeNull();
    expect(flat.notes.join(' ')).toMatch(/MAD is 0.*SD 0/);
    expect(keyStatistics(limit(0, 1), motors([null])).n).toBe(0);
  });
});

describe('robustZScores', () => {
  it('scales the deviation from the median by MAD/0.6745', () => {
    // derived here: median 3, MAD median(2, 1, 0, 1, 97) = 1, z = 0.6745·(x − 3).
    const r = robustZScores([1, 2, 3, 4, 100]);
    expect(r.median).toBe(3);
    expect(r.mad).toBe(1);
    expect(r.scores!.map((z) => Number(z.toFixed(6)))).toEqual([-1.349, -0.6745, 0, 0.6745, 65.4265]);
    expect(robustZScores([]).scores).toBeNull();
  });
});
