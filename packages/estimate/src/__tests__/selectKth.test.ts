import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { medianInterval } from '../motor/medianInterval.js';
import { selectKth } from '../motor/selectKth.js';

const SEED = 20261204;

/** Finite doubles with many repeats (a few levels) or none, as sample series have them. */
const series = fc.oneof(
  fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e3, max: 1e3 }), { minLength: 1, maxLength: 300 }),
  fc.array(fc.integer({ min: -3, max: 3 }).map((k) => k * 0.1), { minLength: 1, maxLength: 300 }),
);

describe('selectKth', () => {
  it('gives the value at position k of the sorted array, with nothing larger left of it and nothing smaller right of it', () => {
    fc.assert(
      fc.property(series, fc.nat(), (values, at) => {
        const x = Float64Array.from(values);
        const k = at % x.length;
        const sorted = Float64Array.from(x).sort();
        const got = selectKth(x, k);
        // −0 and +0 are one value here.
        expect(got === sorted[k]).toBe(true);
        expect(x[k]).toBe(got);
        for (let j = 0; j < k; j++) expect(x[j]! <= got).toBe(true);
        for (let j = k + 1; j < x.length; j++) expect(x[j]! >= got).toBe(true);
        // A rearrangement: the same values as before.
        expect(Float64Array.from(x).sort()).toEqual(sorted);
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });
});

describe('medianInterval', () => {
  /** The definition: the middle of the sorted differences. */
  function bySort(time: Float64Array): number {
    const d = new Float64Array(time.length - 1);
    for (let k = 1; k < time.length; k++) d[k - 1] = time[k]! - time[k - 1]!;
    return d.sort()[(time.length - 1) >> 1]!;
  }

  it('equals the middle of the sorted differences bit for bit, also with repeated, reversed, −0 or NaN samples', () => {
    const time = fc.oneof(
      fc.array(fc.double({ min: -10, max: 10 }), { minLength: 2, maxLength: 200 }),
      fc.array(fc.integer({ min: 0, max: 4 }), { minLength: 2, maxLength: 200 }).map((steps) => {
        // Jittered clocks: mostly one step, some repeats (zero differences), some −0.
        let t = 0;
        return steps.map((s) => (s === 4 ? -0 : (t += s * 1e-4)));
      }),
    );
    fc.assert(
      fc.property(time, (values) => {
        const t = Float64Array.from(values);
        expect(Object.is(medianInterval(t), bySort(t))).toBe(true);
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });

  it('of a uniform clock is its step; NaN below two samples', () => {
    expect(medianInterval(Float64Array.from({ length: 10_001 }, (_, k) => k / 1000))).toBe(bySort(Float64Array.from({ length: 10_001 }, (_, k) => k / 1000)));
    expect(medianInterval(Float64Array.of(0, 0.5, 1, 1.5))).toBe(0.5);
    expect(medianInterval(Float64Array.of(1))).toBeNaN();
  });
});
