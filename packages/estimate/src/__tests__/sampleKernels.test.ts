/**
 * The preparation's WebAssembly passes (sampleKernels.wat) against the JavaScript they stand for:
 * the same bits (Object.is on every element), on random series with the things logs have —
 * repeats and grids, NaN and infinite gaps, signed zeros, odd lengths.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { differenceStats, differenceStatsKernel, gridStepKernel, gridStepPlain } from '../motor/estimateNoiseLevel.js';
import { KERNEL_MIN_LENGTH, sampleKernels } from '../motor/sampleKernels.js';
import { selectKth, selectKthPlain } from '../motor/selectKth.js';

const SEED = 20261204;

/** Series of the lengths the kernels take, finite or with gaps. */
const sample = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }),
  fc.integer({ min: -40, max: 40 }).map((k) => k * 0.0125),
  fc.constantFrom(0, -0, 1e-300, -1e-300),
);
const finiteSeries = fc.array(sample, { minLength: KERNEL_MIN_LENGTH, maxLength: 1500 }).map((a) => Float64Array.from(a));
const gappySeries = fc
  .array(fc.oneof({ weight: 12, arbitrary: sample }, { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity) }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1500 })
  .map((a) => Float64Array.from(a));

/** Element-by-element Object.is (tells −0 from +0 and compares NaN with itself). */
function sameBits(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let k = 0; k < a.length; k++) if (!Object.is(a[k], b[k])) return false;
  return true;
}

describe('the sample kernels', () => {
  it('compile here (WebAssembly is part of every Node the package supports)', () => {
    expect(sampleKernels.room(8 * KERNEL_MIN_LENGTH)).not.toBeNull();
  });
  it('select: the same value and the same arrangement as the JavaScript selection', () => {
    fc.assert(
      fc.property(finiteSeries, fc.nat(), (x, at) => {
        const k = at % x.length;
        const viaKernel = Float64Array.from(x);
        const plain = Float64Array.from(x);
        expect(Object.is(selectKth(viaKernel, k), selectKthPlain(plain, k))).toBe(true);
        expect(sameBits(viaKernel, plain)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('the noise level passes: the same finite count, quantum, deviations and MAD as the JavaScript', () => {
    fc.assert(
      fc.property(fc.oneof(finiteSeries, gappySeries), fc.integer({ min: 1, max: 7 }), (x, stride) => {
        const plain = differenceStats(x, stride);
        const kernel = differenceStatsKernel(x, stride)!;
        expect(kernel).not.toBeNull();
        expect(kernel.finite).toBe(plain.finite);
        expect(Object.is(kernel.quantum, plain.quantum)).toBe(true);
        expect(Object.is(kernel.mad, plain.mad)).toBe(true);
        expect(sameBits(kernel.deviations, plain.deviations)).toBe(true);
      }),
      { seed: SEED, numRuns: 300 },
    );
  });
  it('the noise level passes on series with no finite second difference, and a constant one', () => {
    const gaps = new Float64Array(KERNEL_MIN_LENGTH).fill(NaN);
    for (let k = 0; k < gaps.length; k += 3) gaps[k] = k;
    const constant = new Float64Array(KERNEL_MIN_LENGTH + 1).fill(2.5);
    for (const x of [gaps, constant]) {
      const plain = differenceStats(x, 1);
      const kernel = differenceStatsKernel(x, 1)!;
      expect([kernel.finite, kernel.quantum, kernel.mad]).toEqual([plain.finite, plain.quantum, plain.mad]);
      expect(sameBits(kernel.deviations, plain.deviations)).toBe(true);
    }
    expect(differenceStatsKernel(gaps, 1)!.mad).toBeNaN();
    expect(differenceStatsKernel(constant, 1)!.quantum).toBe(Infinity);
  });
  it('the grid step: the same step (or none) as the JavaScript, on grids with rounding in the file, off-grid values and gaps', () => {
    // Values on a grid of step q, printed with a few digits (so each gap is a whole number of q only
    // roughly), plus a share of values off the grid and of non-finite ones.
    const gridded = fc
      .record({
        q: fc.constantFrom(0.001, 0.0025, 0.01, 0.1, 1 / 3),
        digits: fc.integer({ min: 3, max: 12 }),
        codes: fc.array(fc.integer({ min: -60, max: 60 }), { minLength: KERNEL_MIN_LENGTH, maxLength: 1200 }),
        off: fc.array(fc.double({ noNaN: true, min: -1, max: 1 }), { maxLength: 40 }),
        gaps: fc.array(fc.constantFrom(NaN, Infinity, -Infinity), { maxLength: 5 }),
      })
      .map(({ q, digits, codes, off, gaps }) => Float64Array.from([...codes.map((c) => Number((c * q).toPrecision(digits))), ...off, ...gaps]));
    let grids = 0;
    fc.assert(
      fc.property(fc.oneof(gridded, finiteSeries), fc.integer({ min: 1, max: 5 }), (x, stride) => {
        const { quantum } = differenceStats(x, 1);
        if (!(quantum > 0 && Number.isFinite(quantum))) return;
        const step = gridStepPlain(x, quantum, stride);
        expect(Object.is(gridStepKernel(x, quantum, stride), step)).toBe(true);
        if (step > 0) grids++;
      }),
      { seed: SEED, numRuns: 400 },
    );
    expect(grids).toBeGreaterThan(40);
    // Some of those cases must find a grid, or the comparison above proves little.
    const q = 0.0025;
    const onGrid = Float64Array.from({ length: 600 }, (_, k) => Number((((k % 40) - 20) * q).toPrecision(6)));
    const quantum = differenceStats(onGrid, 1).quantum;
    expect(gridStepKernel(onGrid, quantum, 1)).toBeCloseTo(q, 12);
    expect(gridStepPlain(onGrid, quantum, 1)).toBeCloseTo(q, 12);
  });
});
