import fc from 'fast-check';
import { createRandom } from '@motorprint/model';
import { describe, expect, it } from 'vitest';
import {
  channelScan, coulombRows, delaySteps, firstNotFiniteOf, increments, KERNEL_MIN, meanSquares, modelOutput, plateauScan, residualPasses, restRows, scanKernelRuns, speedScan, trendSums,
} from '../passes.js';

/** Deep equality with Object.is on every number (NaN equals NaN, −0 differs from +0), typed arrays element by element. */
function same(a: unknown, b: unknown, path = '$'): string | null {
  if (typeof a === 'number' || typeof b === 'number') return Object.is(a, b) ? null : `${path}: ${String(a)} vs ${String(b)}`;
  if (a instanceof Float64Array || a instanceof Int32Array) {
    if (!(b instanceof a.constructor) || (b as Float64Array).length !== a.length) return `${path}: arrays differ in type or length`;
    for (let i = 0; i < a.length; i++) if (!Object.is(a[i], (b as Float64Array)[i])) return `${path}[${i}]: ${a[i]} vs ${(b as Float64Array)[i]}`;
    return null;
  }
  if (a !== null && typeof a === 'object' && b !== null && typeof b === 'object') {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) {
      const d = same((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
      if (d !== null) return d;
    }
    return null;
  }
  return Object.is(a, b) ? null : `${path}: ${String(a)} vs ${String(b)}`;
}

/** Samples: mostly ordinary numbers, with repeated small integers (runs, rails), zeros of both signs and NaN/±Infinity gaps. */
const sample = fc.oneof(
  { weight: 6, arbitrary: fc.double({ min: -50, max: 50, noNaN: true }) },
  { weight: 3, arbitrary: fc.integer({ min: -3, max: 3 }) },
  { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity, 0, -0, 1e300, -1e300, 5e-324) },
);
/** Few distinct values (ties, zeros of both signs, a gap): where the order of comparisons shows. */
const tie = fc.constantFrom(0, -0, 1, -1, 2, NaN);
/** A series of 0…300 samples, or of 0…20 of few values. */
const series = fc.oneof(fc.array(sample, { maxLength: 300 }), fc.array(tie, { maxLength: 20 })).map((v) => Float64Array.from(v));
/** Two series of one length. */
const pairOf = (value: fc.Arbitrary<number>, most: number): fc.Arbitrary<[Float64Array, Float64Array]> => fc.integer({ min: 0, max: most }).chain((n) => fc.tuple(
  fc.array(value, { minLength: n, maxLength: n }).map((v) => Float64Array.from(v)),
  fc.array(value, { minLength: n, maxLength: n }).map((v) => Float64Array.from(v)),
));
const pair = fc.oneof(pairOf(sample, 300), pairOf(tie, 20));
/** Finite series (the recordings' channels are checked finite), with plateaus. */
const finitePair = fc.integer({ min: 0, max: 300 }).chain((n) => fc.tuple(
  fc.array(fc.oneof(fc.double({ min: -50, max: 50, noNaN: true }), fc.integer({ min: -3, max: 3 }), fc.constant(-0)), { minLength: n, maxLength: n }).map((v) => Float64Array.from(v)),
  fc.array(fc.double({ min: -50, max: 50, noNaN: true }), { minLength: n, maxLength: n }).map((v) => Float64Array.from(v)),
));
const real = fc.double({ noNaN: false });

/** Invented signal of n samples: a ramp into a rail at 4, noise quantised to 1/16, with optional gaps. */
function railed(n: number, seed: number, gaps: boolean): Float64Array {
  const rng = createRandom(seed);
  return Float64Array.from({ length: n }, (_, k) => {
    if (gaps && k % 997 === 13) return k % 2 === 0 ? NaN : Infinity;
    return Math.min(4, Math.round((3 * Math.sin(k / 500) + 1.5 + 0.2 * rng.normal()) * 16) / 16);
  });
}

describe('the WebAssembly passes give the JavaScript passes\' numbers, bit for bit', () => {
  it('the kernels run in Node (so the comparisons below compare two routes)', () => {
    expect(scanKernelRuns()).toBe(true);
  });

  it('residualPasses (finite residuals, deviations, compensated sums, runs counts)', () => {
    fc.assert(fc.property(pair, ([y, yh]) => {
      expect(same(residualPasses(y, yh, true), residualPasses(y, yh, false))).toBeNull();
    }), { numRuns: 300 });
  });

  it('channelScan (extremes and pinned samples at any rail and test)', () => {
    fc.assert(fc.property(series, real, fc.constantFrom(1 as const, -1 as const), real, fc.oneof(real, fc.constant(Infinity), fc.integer({ min: 0, max: 10 })), real, (x, rail, side, sigma, longest, minSlope) => {
      const w = channelScan(x, true), j = channelScan(x, false);
      expect(same([w.min, w.max], [j.min, j.max])).toBeNull();
      const test = { sigma, longest, minSlope };
      for (const r of [rail, j.min, j.max]) expect(same(w.pinned(r, side, test), j.pinned(r, side, test)), `rail ${r}`).toBeNull();
      const usual = { sigma: 0.05, longest: 3, minSlope: 0.1 };
      expect(same(w.pinned(j.max, 1, usual), j.pinned(j.max, 1, usual))).toBeNull();
      expect(same(w.pinned(j.min, -1, usual), j.pinned(j.min, -1, usual))).toBeNull();
    }), { numRuns: 300 });
  });

  it('plateauScan (|current| and the longest run above a threshold with the speed range on it)', () => {
    fc.assert(fc.property(fc.oneof(pair, finitePair), real, ([i, w], t) => {
      const a = plateauScan(i, w, true), b = plateauScan(i, w, false);
      expect(same(a.magnitude, b.magnitude)).toBeNull();
      for (const threshold of [t, 0, 1, 2.5, -0, NaN]) expect(same(a.run(threshold), b.run(threshold)), `threshold ${threshold}`).toBeNull();
    }), { numRuns: 300 });
  });

  it('trendSums (means, moments, lag-one sums, range of x over the finite y)', () => {
    fc.assert(fc.property(pair, real, real, ([x, y], p, q) => {
      const a = trendSums(x, y, true), b = trendSums(x, y, false);
      expect(same([a.m, a.sx, a.sy], [b.m, b.sx, b.sy])).toBeNull();
      const xb = a.sx / a.m, yb = a.sy / a.m;
      for (const [u, v] of [[xb, yb], [p, q], [0, 0]] as const) {
        expect(same(a.moments(u, v), b.moments(u, v))).toBeNull();
        expect(same(a.lagOne(u, v), b.lagOne(u, v))).toBeNull();
      }
      expect(same(a.range(), b.range())).toBeNull();
    }), { numRuns: 300 });
  });

  it('firstNotFiniteOf', () => {
    fc.assert(fc.property(series, (v) => {
      expect(firstNotFiniteOf(v, true)).toBe(firstNotFiniteOf(v, false));
    }), { numRuns: 300 });
    const x = new Float64Array(KERNEL_MIN + 3);
    expect(firstNotFiniteOf(x)).toBe(-1);
    x[KERNEL_MIN + 1] = -Infinity;
    expect(firstNotFiniteOf(x)).toBe(KERNEL_MIN + 1);
  });

  it('meanSquares', () => {
    fc.assert(fc.property(series, (v) => {
      expect(same(meanSquares(v, true), meanSquares(v, false))).toBeNull();
    }), { numRuns: 300 });
  });

  it('coulombRows (rows, signs with a dead band, lag-one sums)', () => {
    fc.assert(fc.property(pair, fc.oneof(real, fc.constant(0), fc.constant(1)), real, real, ([w, r], dead, c, g) => {
      const a = coulombRows(w, r, dead, true), b = coulombRows(w, r, dead, false);
      expect(same({ ...a, lagOne: null }, { ...b, lagOne: null })).toBeNull();
      const fit = [0.1, -0.7] as const;
      for (const [u, v] of [[c, g], fit, [0, 0]] as const) expect(same(a.lagOne(u, v), b.lagOne(u, v))).toBeNull();
    }), { numRuns: 300 });
  });

  it('restRows (with and without the second channel)', () => {
    fc.assert(fc.property(pair, real, real, fc.boolean(), ([v, o], vl, ol, other) => {
      for (const [p, q] of [[vl, ol], [1, 2], [Math.abs(vl), Infinity]] as const) {
        expect(same(restRows(v, p, other ? o : undefined, q, v.length, true), restRows(v, p, other ? o : undefined, q, v.length, false))).toBeNull();
      }
    }), { numRuns: 300 });
  });

  it('delaySteps (voltage steps and kept residuals, with gaps or not)', () => {
    fc.assert(fc.property(fc.oneof(pair, finitePair), ([v, r]) => {
      expect(same(delaySteps(v, r, true), delaySteps(v, r, false))).toBeNull();
    }), { numRuns: 300 });
  });

  it('increments', () => {
    fc.assert(fc.property(pair.filter(([a]) => a.length >= 1), ([a, b]) => {
      expect(same(increments(a, b, true), increments(a, b, false))).toBeNull();
    }), { numRuns: 300 });
  });

  it('modelOutput', () => {
    fc.assert(fc.property(pair, ([y, e]) => {
      expect(same(modelOutput(y, e, true), modelOutput(y, e, false))).toBeNull();
    }), { numRuns: 300 });
  });

  it('speedScan (range, central differences, sign with a dead band)', () => {
    fc.assert(fc.property(series, fc.oneof(real, fc.constant(2e-4)), real, (w, h2, band) => {
      const a = speedScan(w, h2, true), b = speedScan(w, h2, false);
      expect(same([a.acc, a.wmin, a.wmax], [b.acc, b.wmin, b.wmax])).toBeNull();
      for (const d of [band, 0, 0.5, -0]) expect(same(a.sign(d), b.sign(d)), `band ${d}`).toBeNull();
    }), { numRuns: 300 });
  });

  it('long series (the default route takes the kernels) with and without gaps, odd lengths', () => {
    for (const [n, gaps] of [[KERNEL_MIN, false], [KERNEL_MIN + 1, true], [20011, false], [20011, true]] as const) {
      const x = railed(n, 1, gaps), y = railed(n, 2, gaps);
      const t = Float64Array.from({ length: n }, (_, k) => k * 1e-4);
      expect(same(residualPasses(x, y), residualPasses(x, y, false)), `residualPasses ${n}`).toBeNull();
      const a = channelScan(x), b = channelScan(x, false);
      expect([a.min, a.max]).toEqual([b.min, b.max]);
      const test = { sigma: 0.1, longest: 40, minSlope: 0.01 };
      expect(a.pinned(4, 1, test)).toBe(b.pinned(4, 1, test));
      if (!gaps) expect(b.pinned(4, 1, test)).toBeGreaterThan(0);
      const pa = plateauScan(x, y), pb = plateauScan(x, y, false);
      expect(same(pa.magnitude, pb.magnitude)).toBeNull();
      expect(same(pa.run(3.5), pb.run(3.5))).toBeNull();
      const ta = trendSums(t, x), tb = trendSums(t, x, false);
      expect(same([ta.m, ta.sx, ta.sy, ta.moments(1, 2), ta.lagOne(0.5, 3), ta.range()], [tb.m, tb.sx, tb.sy, tb.moments(1, 2), tb.lagOne(0.5, 3), tb.range()])).toBeNull();
      expect(same(meanSquares(y), meanSquares(y, false))).toBeNull();
      const ca = coulombRows(x, y, 0.5), cb = coulombRows(x, y, 0.5, false);
      expect(same([{ ...ca, lagOne: null }, ca.lagOne(0.2, -0.3)], [{ ...cb, lagOne: null }, cb.lagOne(0.2, -0.3)])).toBeNull();
      expect(same(restRows(x, 1, y, 2, n), restRows(x, 1, y, 2, n, false))).toBeNull();
      expect(same(delaySteps(x, y), delaySteps(x, y, false))).toBeNull();
      expect(same(increments(x, y), increments(x, y, false))).toBeNull();
      expect(same(modelOutput(x, y), modelOutput(x, y, false))).toBeNull();
      const sa = speedScan(x, 2e-4), sb = speedScan(x, 2e-4, false);
      expect(same([sa.acc, sa.wmin, sa.wmax, sa.sign(1)], [sb.acc, sb.wmin, sb.wmax, sb.sign(1)])).toBeNull();
    }
  });
});
