import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sumOfSquaredResiduals, sumsOfThree, sumsOfTwo } from '../fitLinearModel.js';
import { linearRows } from '../linearSums.js';

const value = fc.oneof(
  { weight: 8, arbitrary: fc.double({ min: -1e3, max: 1e3, noNaN: true }) },
  { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity, 0, -0, 1, 1e300) },
);
/** p columns and y, of one length 0…200. */
const columnsAndY = (p: number): fc.Arbitrary<Float64Array[]> => fc.integer({ min: 0, max: 200 }).chain((n) =>
  fc.array(fc.array(value, { minLength: n, maxLength: n }).map((v) => Float64Array.from(v)), { minLength: p + 1, maxLength: p + 1 }));

function bits(a: ArrayLike<number>): string[] {
  return Array.from(a, (x) => (Object.is(x, -0) ? '-0' : String(x)));
}

describe('fitLinearModel\'s sums through the WebAssembly kernel are its JavaScript sums, bit for bit', () => {
  it('two columns: the sums, the check and the residual sum of squares', () => {
    fc.assert(fc.property(columnsAndY(2), fc.double(), fc.double(), (arrays, b0, b1) => {
      const [a, b, y] = arrays as [Float64Array, Float64Array, Float64Array];
      const rows = linearRows([a, b], y);
      expect(rows).not.toBeNull();
      const sq = new Float64Array(2), xy = new Float64Array(2), cross = new Float64Array(4);
      const sq2 = new Float64Array(2), xy2 = new Float64Array(2), cross2 = new Float64Array(4);
      const c1 = rows!.sums(sq, xy, cross), c2 = sumsOfTwo(a, b, y, sq2, xy2, cross2);
      expect(bits([c1, ...sq, ...xy, ...cross])).toEqual(bits([c2, ...sq2, ...xy2, ...cross2]));
      for (const beta of [Float64Array.of(b0, b1), Float64Array.of(0.5, -2)]) {
        expect(bits([rows!.ssr(beta)])).toEqual(bits([sumOfSquaredResiduals([a, b], beta, y)]));
      }
    }), { numRuns: 300 });
  });

  it('three columns: the sums, the check and the residual sum of squares', () => {
    fc.assert(fc.property(columnsAndY(3), fc.double(), fc.double(), fc.double(), (arrays, b0, b1, b2) => {
      const [a, b, c, y] = arrays as [Float64Array, Float64Array, Float64Array, Float64Array];
      const rows = linearRows([a, b, c], y);
      expect(rows).not.toBeNull();
      const sq = new Float64Array(3), xy = new Float64Array(3), cross = new Float64Array(9);
      const sq2 = new Float64Array(3), xy2 = new Float64Array(3), cross2 = new Float64Array(9);
      const c1 = rows!.sums(sq, xy, cross), c2 = sumsOfThree(a, b, c, y, sq2, xy2, cross2);
      expect(bits([c1, ...sq, ...xy, ...cross])).toEqual(bits([c2, ...sq2, ...xy2, ...cross2]));
      for (const beta of [Float64Array.of(b0, b1, b2), Float64Array.of(0.5, -2, 3)]) {
        expect(bits([rows!.ssr(beta)])).toEqual(bits([sumOfSquaredResiduals([a, b, c], beta, y)]));
      }
    }), { numRuns: 300 });
  });

  it('other column counts stay with the JavaScript loops', () => {
    const y = new Float64Array(10);
    expect(linearRows([y], y)).toBeNull();
    expect(linearRows([y, y, y, y], y)).toBeNull();
  });
});
