import { firstDifference } from '@motorprint/testkit';
import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { estimateKernel, useKernels } from '../estimateKernels.js';
import { channelSums, channelSumsScalar } from '../motor/channelSums.js';
import { accumulateNormalEquations, addChunkSums } from '../solver/accumulateNormalEquations.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { sumChunkWasm, sumSquaresWasm } from '../solver/sumChunkKernel.js';
import { sumChunkTiled } from '../solver/sumChunkTiled.js';
import { sumChunkUnrolled } from '../solver/sumChunkUnrolled.js';
import { expectSameNormalEquations } from './sameNormalEquations.js';

afterEach(() => { useKernels.on = true; });

/** Doubles of mixed sizes with, now and then, NaN, ±Infinity, −0, huge and subnormal values. */
const value = fc.oneof(
  { weight: 12, arbitrary: fc.double({ min: -10, max: 10, noNaN: true }) },
  { weight: 3, arbitrary: fc.double({ noNaN: true, noDefaultInfinity: true }) },
  { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity, -0, 1e300, -1e300, 5e-324, 1e-310) },
);

/** A chunk: p, rows, stride and the arrays (the Jacobian a little longer than needed). */
const chunkCase = fc
  .record({ p: fc.integer({ min: 1, max: 12 }), rows: fc.integer({ min: 0, max: 300 }), pad: fc.integer({ min: 0, max: 5 }), seed: fc.integer() })
  .chain(({ p, rows, pad }) =>
    fc.record({
      p: fc.constant(p), rows: fc.constant(rows), stride: fc.constant(rows + pad),
      r: fc.array(value, { minLength: rows, maxLength: rows }).map((a) => Float64Array.from(a)),
      J: fc.array(value, { minLength: p * (rows + pad), maxLength: p * (rows + pad) }).map((a) => Float64Array.from(a)),
    }));


describe('the WebAssembly chunk sums', () => {
  it('run here (so the comparisons below test the kernel, not the fallback)', () => {
    const out = new Float64Array(3);
    expect(sumChunkWasm(1, out, Float64Array.of(1, 2), Float64Array.of(3, 4), 2, 2)).toBe(true);
    expect(Array.from(out)).toEqual([25, 11, 5]);
    expect(sumSquaresWasm(Float64Array.of(3, 4), 2)).toBe(25);
  });

  it('equal the JavaScript loops bit for bit, p = 1…12, odd sizes, non-finite values', () => {
    fc.assert(fc.property(chunkCase, ({ p, rows, stride, r, J }) => {
      const m = (p * (p + 1)) / 2 + p + 1;
      const tiled = new Float64Array(m).fill(7);
      const wasm = new Float64Array(m).fill(7);
      const sTiled = sumChunkTiled(p, tiled, r, J, rows, stride);
      expect(sumChunkWasm(p, wasm, r, J, rows, stride)).toBe(true);
      expect(firstDifference(wasm, tiled)).toBe(-1);
      expect(Object.is(wasm[m - 1], sTiled)).toBe(true);
      if (p <= 8) {
        const unrolled = new Float64Array(m).fill(7);
        const sUnrolled = sumChunkUnrolled(p, unrolled, r, J, rows, stride);
        expect(firstDifference(wasm, unrolled)).toBe(-1);
        expect(Object.is(wasm[m - 1], sUnrolled)).toBe(true);
      }
      let s = 0;
      for (let k = 0; k < rows; k++) s += r[k]! * r[k]!;
      expect(Object.is(sumSquaresWasm(r, rows), s)).toBe(true);
    }), { numRuns: 300 });
  });

  it('refuse arrays shorter than the rows asked for (the caller then runs the loops)', () => {
    const out = new Float64Array(3).fill(7);
    expect(sumChunkWasm(1, out, Float64Array.of(1), Float64Array.of(3, 4), 2, 2)).toBe(false);
    expect(sumChunkWasm(2, new Float64Array(6), Float64Array.of(1, 2), Float64Array.of(3, 4, 5), 2, 2)).toBe(false);
    expect(Array.from(out)).toEqual([7, 7, 7]);
    expect(sumSquaresWasm(Float64Array.of(1), 2)).toBe(null);
  });

  it('give accumulateNormalEquations the totals of the JavaScript loops over many chunks', () => {
    fc.assert(fc.property(fc.integer({ min: 1, max: 12 }), fc.array(fc.integer({ min: 0, max: 400 }), { minLength: 1, maxLength: 5 }), fc.boolean(), fc.integer({ min: 1, max: 2 ** 31 - 1 }),
      (p, sizes, withJ, seed) => {
        let x = seed;
        const next = (): number => { x = (Math.imul(x, 1103515245) + 12345) >>> 0; return (x / 2 ** 32 - 0.5) * 2 ** ((x % 41) - 20); };
        const viaKernel = createNormalEquations(p);
        const viaLoops = createNormalEquations(p);
        for (const rows of sizes) {
          const r = Float64Array.from({ length: rows }, next);
          const J = Float64Array.from({ length: p * rows }, next);
          const s1 = accumulateNormalEquations(viaKernel, r, withJ ? J : null, rows);
          let s2: number;
          if (!withJ) {
            s2 = 0;
            for (let k = 0; k < rows; k++) s2 += r[k]! * r[k]!;
            viaLoops.chunk[viaLoops.chunk.length - 1] = s2;
          } else {
            s2 = p <= 8 ? sumChunkUnrolled(p, viaLoops.chunk, r, J, rows, rows) : sumChunkTiled(p, viaLoops.chunk, r, J, rows, rows);
          }
          addChunkSums(viaLoops, withJ, rows);
          expect(Object.is(s1, s2)).toBe(true);
        }
        expectSameNormalEquations(viaKernel, viaLoops);
      }), { numRuns: 100 });
  });
});

describe('the WebAssembly channel sums of fitMotor\'s summaries', () => {
  it('equal the JavaScript loops bit for bit (odd lengths, residuals of another length, non-finite values)', () => {
    fc.assert(fc.property(
      fc.array(value, { minLength: 0, maxLength: 900 }), fc.option(fc.array(value, { minLength: 0, maxLength: 900 })), fc.integer({ min: 0, max: 300 }),
      (x, y, from) => {
        const meas = Float64Array.from(x), res = y === null ? null : Float64Array.from(y);
        const want = channelSumsScalar(meas, res, from);
        const got = channelSums(meas, res, from);
        expect(got.count).toBe(want.count);
        expect(Object.is(got.spread, want.spread)).toBe(true);
        expect(Object.is(got.squares, want.squares)).toBe(true);
      }), { numRuns: 300 });
  });

  it('run the kernel on long channels (so the comparison above reaches it)', () => {
    const meas = Float64Array.from({ length: 1000 }, (_, k) => Math.sin(k) + 0.1 * k);
    useKernels.on = false;
    const want = channelSums(meas, meas, 3);
    useKernels.on = true;
    const room = estimateKernel.room(8);
    room!.f64.fill(0);
    const got = channelSums(meas, meas, 3);
    // The kernel left the series in its memory: it ran.
    expect(room!.f64[0]).toBe(meas[3]);
    expect(got).toEqual(want);
  });
});
