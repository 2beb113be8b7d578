/**
 * The time base's WebAssembly passes (timeBaseKernels.wat) against the JavaScript they stand for:
 * the same bits (Object.is on every figure) on clocks as loggers write them — jittered, rounded to
 * a resolution, with gaps and repeated intervals.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { checkTimeBase, intervalStats, intervalStatsKernel } from '../checkTimeBase.js';

const SEED = 20261204;

const clock = fc
  .record({
    n: fc.integer({ min: 257, max: 4000 }),
    h: fc.constantFrom(1e-4, 1e-3, 0.02, 1 / 3),
    t0: fc.double({ noNaN: true, min: -5, max: 1e4 }),
    jitter: fc.double({ noNaN: true, min: 0, max: 0.3 }),
    digits: fc.integer({ min: 5, max: 17 }),
    gaps: fc.array(fc.nat(), { maxLength: 4 }),
  })
  .map(({ n, h, t0, jitter, digits, gaps }) => {
    const t = new Float64Array(n);
    let at = t0;
    for (let k = 0; k < n; k++) {
      at += h * (1 + (gaps.includes(k % 997) ? 4 : 0));
      t[k] = Number((at + jitter * h * Math.sin(1.7 * k * k)).toPrecision(digits));
    }
    // Keep it strictly increasing (what checkTimeBase is given).
    for (let k = 1; k < n; k++) if (!(t[k]! > t[k - 1]!)) t[k] = t[k - 1]! + h;
    return t;
  });

describe('the time base kernel', () => {
  it('gives the same sum, extremes, sum of squares, median and gap count as the JavaScript', () => {
    fc.assert(
      fc.property(clock, (t) => {
        const plain = intervalStats(t);
        const kernel = intervalStatsKernel(t)!;
        expect(kernel).not.toBeNull();
        for (const key of ['sum', 'maxDt', 'maxAt', 'minDt', 'ss', 'median', 'gaps'] as const) expect(Object.is(kernel[key], plain[key]), key).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('still reports a gap through the kernel path', () => {
    const t = Float64Array.from({ length: 1000 }, (_, k) => k * 1e-3 + (k >= 500 ? 0.01 : 0));
    const { timeBase, issues } = checkTimeBase(t);
    expect(timeBase.gaps).toBe(1);
    expect(timeBase.sampleInterval).toBeCloseTo(1e-3, 15);
    expect(issues.map((i) => i.code)).toContain('time-gap');
  });
});
