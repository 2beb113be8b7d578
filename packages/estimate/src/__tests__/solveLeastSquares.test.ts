import { expectClose } from '@motorprint/testkit';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { accumulateNormalEquations } from '../solver/accumulateNormalEquations.js';
import { createCurveProblem } from '../solver/createCurveProblem.js';
import { createNormalEquations } from '../solver/createNormalEquations.js';
import { resetNormalEquations } from '../solver/resetNormalEquations.js';
import { solveLeastSquares } from '../solver/solveLeastSquares.js';
import type { LeastSquaresProblem, NormalEquations } from '../solver/types.js';

/**
 * Invented 8-parameter model (two decays, a sinusoid, an offset):
 * y(t) = a1·e^(−k1·t) + a2·e^(−k2·t) + c·sin(ω·t + φ) + d, θ = [a1, k1, a2, k2, c, ω, φ, d].
 */
function eightParameterProblem(n: number, chunk: number, y: Float64Array | null): LeastSquaresProblem & { data: Float64Array } {
  const p = 8;
  const r = new Float64Array(chunk);
  const J = new Float64Array(chunk * p);
  const data = y ?? new Float64Array(n);
  return {
    parameterCount: p,
    data,
    evaluate(th, wantJacobian, acc) {
      const [a1, k1, a2, k2, c, w, ph, d] = th as unknown as number[];
      for (let s = 0; s < n; s += chunk) {
        const rows = Math.min(chunk, n - s);
        for (let i = 0; i < rows; i++) {
          const t = ((s + i) / n) * 10; // t in [0, 10) s
          const e1 = Math.exp(-k1! * t);
          const e2 = Math.exp(-k2! * t);
          const sn = Math.sin(w! * t + ph!);
          const cs = Math.cos(w! * t + ph!);
          r[i] = a1! * e1 + a2! * e2 + c! * sn + d! - data[s + i]!;
          if (wantJacobian) {
            J[i] = e1;
            J[rows + i] = -a1! * t * e1;
            J[2 * rows + i] = e2;
            J[3 * rows + i] = -a2! * t * e2;
            J[4 * rows + i] = sn;
            J[5 * rows + i] = c! * t * cs;
            J[6 * rows + i] = c! * cs;
            J[7 * rows + i] = 1;
          }
        }
        accumulateNormalEquations(acc, r, wantJacobian ? J : null, rows);
      }
      return acc.ssr;
    },
  };
}

// Invented true values for the synthetic 8-parameter record.
const TRUE8 = [2, 1.5, 0.5, 0.2, 0.3, 2.5, 0.4, 0.1];
const START8 = [1.8, 1.3, 0.6, 0.25, 0.25, 2.45, 0.3, 0.0];

function synthesise(n: number): Float64Array {
  const y = new Float64Array(n);
  const [a1, k1, a2, k2, c, w, ph, d] = TRUE8 as [number, number, number, number, number, number, number, number];
  for (let k = 0; k < n; k++) {
    const t = (k / n) * 10;
    y[k] = a1 * Math.exp(-k1 * t) + a2 * Math.exp(-k2 * t) + c * Math.sin(w * t + ph) + d;
  }
  return y;
}

describe('solveLeastSquares streams the normal equations', () => {
  const n = 100_000;
  const y = synthesise(n);

  it('accumulates JᵀJ, Jᵀr and rᵀr in chunks of 4096 equal to one dense pass (p = 8, n = 1e5)', () => {
    const theta = Float64Array.from(START8);
    const streamed = createNormalEquations(8);
    const dense = createNormalEquations(8);
    eightParameterProblem(n, 4096, y).evaluate(theta, true, streamed);
    eightParameterProblem(n, n, y).evaluate(theta, true, dense);
    expect(streamed.rows).toBe(n);
    expect(dense.rows).toBe(n);
    // Same sums in a different order. Derived here: recursive summation of n terms errs by at most
    // n·eps·Σ|xₖ| ≈ 1.1e-11·Σ|xₖ| (n = 1e5), and Σ|JᵢJⱼ| ≤ √(JᵀJᵢᵢ·JᵀJⱼⱼ) (Cauchy–Schwarz); the
    // tolerance 1e-10·√(JᵀJᵢᵢ·JᵀJⱼⱼ) covers both passes with margin. Cancelling entries (Σ sin) need
    // this scale: a tolerance relative to the entry itself would be meaningless there.
    const d = (i: number) => dense.JtJ[i * 8 + i]!;
    for (let i = 0; i < 8; i++) {
      for (let j = 0; j < 8; j++) {
        const tol = 1e-10 * Math.sqrt(d(i) * d(j));
        expectClose(streamed.JtJ[i * 8 + j]!, dense.JtJ[i * 8 + j]!, { abs: tol }, `JtJ[${i},${j}]`);
      }
      expectClose(streamed.Jtr[i]!, dense.Jtr[i]!, { abs: 1e-10 * Math.sqrt(d(i) * dense.ssr) }, `Jtr[${i}]`);
    }
    expectClose(streamed.ssr, dense.ssr, { rel: 1e-10 }, 'ssr');
  });

  it('fits the invented 8-parameter record from chunks and from one dense pass to the same optimum', () => {
    const a = solveLeastSquares(eightParameterProblem(n, 4096, y), START8);
    const b = solveLeastSquares(eightParameterProblem(n, n, y), START8);
    expect(a.converged).toBe(true);
    expect(b.converged).toBe(true);
    TRUE8.forEach((v, j) => {
      // Noise-free data generated from TRUE8 (invented): the optimum is TRUE8 itself.
      expectClose(a.theta[j]!, v, { rel: 1e-7, abs: 1e-9 }, `streamed theta[${j}]`);
      expectClose(b.theta[j]!, v, { rel: 1e-7, abs: 1e-9 }, `dense theta[${j}]`);
    });
    expect(a.jacobianEvaluations).toBeLessThanOrEqual(a.functionEvaluations);
    expect(a.JtJ.length).toBe(64);
  });
});

describe('accumulateNormalEquations compensates chunk totals', () => {
  it('keeps 1000 unit chunks added after a 1e16 chunk (plain addition drops them)', () => {
    // Derived here: 1e16 + 1 rounds back to 1e16 in double precision (ulp(1e16) = 2), so a plain
    // running sum stays at 1e16; the exact total 1e16 + 1000 is representable.
    const comp = createNormalEquations(1, true);
    const plain = createNormalEquations(1, false);
    for (const acc of [comp, plain]) {
      accumulateNormalEquations(acc, Float64Array.of(1e8), null, 1);
      for (let i = 0; i < 1000; i++) accumulateNormalEquations(acc, Float64Array.of(1), null, 1);
    }
    expect(comp.ssr).toBe(1e16 + 1000);
    expect(plain.ssr).toBe(1e16);
  });

  it('reads Jacobian columns with a stride and resets to zero', () => {
    const acc = createNormalEquations(2);
    // Columns [1, 2] and [3, 4] stored with stride 3 (one unused slot each); r = [1, 1].
    accumulateNormalEquations(acc, Float64Array.of(1, 1), Float64Array.of(1, 2, 99, 3, 4, 99), 2, 3);
    // Derived here: JᵀJ = [[5, 11], [11, 25]], Jᵀr = [3, 7], rᵀr = 2.
    expect(Array.from(acc.JtJ)).toEqual([5, 11, 11, 25]);
    expect(Array.from(acc.Jtr)).toEqual([3, 7]);
    expect(acc.ssr).toBe(2);
    resetNormalEquations(acc);
    expect(acc.ssr).toBe(0);
    expect(Array.from(acc.JtJ)).toEqual([0, 0, 0, 0]);
  });
});

/** Invented test data: uniform numbers in (−1, 1) from a seeded mulberry32 generator. */
function uniformStream(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) / 4294967296) * 2 - 1;
  };
}

/**
 * Straightforward reference: every entry of JᵀJ (full p×p), Jᵀr and rᵀr as its own left-to-right
 * dot product over rows 0…rows−1, plus the matching sums of |terms| for error bounds.
 */
function referenceNormalEquations(p: number, r: Float64Array, J: Float64Array, rows: number, stride: number) {
  const JtJ = new Float64Array(p * p);
  const JtJAbs = new Float64Array(p * p);
  const Jtr = new Float64Array(p);
  const JtrAbs = new Float64Array(p);
  let ssr = 0;
  for (let i = 0; i < p; i++) {
    for (let j = 0; j < p; j++) {
      let s = 0;
      let a = 0;
      for (let k = 0; k < rows; k++) {
        const x = J[i * stride + k]! * J[j * stride + k]!;
        s += x;
        a += Math.abs(x);
      }
      JtJ[i * p + j] = s;
      JtJAbs[i * p + j] = a;
    }
    let s = 0;
    let a = 0;
    for (let k = 0; k < rows; k++) {
      const x = J[i * stride + k]! * r[k]!;
      s += x;
      a += Math.abs(x);
    }
    Jtr[i] = s;
    JtrAbs[i] = a;
  }
  for (let k = 0; k < rows; k++) ssr += r[k]! * r[k]!;
  return { JtJ, JtJAbs, Jtr, JtrAbs, ssr };
}

/**
 * Invented random chunk layout: `rows` residuals and p Jacobian columns with per-column scales
 * 10^e, e in [−3, 3], stored with `stride` = rows + pad; the pad slots hold NaN so any read
 * outside the rows would poison the sums.
 */
function randomLayout(p: number, rows: number, pad: number, seed: number) {
  const u = uniformStream(seed);
  const stride = rows + pad;
  const r = new Float64Array(rows);
  for (let k = 0; k < rows; k++) r[k] = 10 * u();
  const J = new Float64Array(p * stride).fill(NaN);
  for (let j = 0; j < p; j++) {
    const scale = 10 ** Math.round(3 * u());
    for (let k = 0; k < rows; k++) J[j * stride + k] = scale * u();
  }
  return { r, J, stride };
}

const EPS = 2 ** -52; // double-precision machine epsilon (IEEE 754 binary64)

describe('accumulateNormalEquations matches a one-dot-product-per-entry reference', () => {
  const ps = Array.from({ length: 12 }, (_, i) => i + 1); // p = 1…12: unrolled (≤ 8) and tiled (> 8) paths

  it.each(ps)('gives bit-identical JᵀJ, Jᵀr, rᵀr for one strided chunk (p = %i)', (p) => {
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 300 }), fc.integer({ min: 0, max: 3 }), fc.integer(), (rows, pad, seed) => {
        const { r, J, stride } = randomLayout(p, rows, pad, seed);
        const ref = referenceNormalEquations(p, r, J, rows, stride);
        for (const compensated of [true, false]) {
          const acc = createNormalEquations(p, compensated);
          const ret = accumulateNormalEquations(acc, r, J, rows, stride);
          // Derived here: into a zeroed accumulator one chunk total x is added exactly (0 + x = x,
          // compensation term 0), and each entry is the same left-to-right sum of the same products
          // as the reference (JavaScript never fuses multiply-add), so equality is exact.
          expect(ret).toBe(ref.ssr);
          expect(acc.ssr).toBe(ref.ssr);
          expect(acc.rows).toBe(rows);
          for (let i = 0; i < p; i++) {
            expect(acc.Jtr[i]).toBe(ref.Jtr[i]);
            for (let j = 0; j < p; j++) {
              // Both triangles: the reference sums x_i·x_j and x_j·x_i separately (same value, products commute).
              expect(acc.JtJ[i * p + j]).toBe(ref.JtJ[i * p + j]);
            }
          }
          expect(Number.isFinite(acc.ssr)).toBe(true); // NaN pad slots were never read
        }
      }),
      { seed: 20240611 + p, numRuns: 40 },
    );
  });

  it.each(ps)('agrees within the summation error bound when the rows come in several chunks (p = %i)', (p) => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 400 }),
        fc.integer({ min: 0, max: 3 }),
        fc.integer(),
        fc.array(fc.integer({ min: 0, max: 400 }), { minLength: 1, maxLength: 4 }),
        (rows, pad, seed, cutsRaw) => {
          const { r, J, stride } = randomLayout(p, rows, pad, seed);
          const ref = referenceNormalEquations(p, r, J, rows, stride);
          const cuts = [0, ...cutsRaw.map((c) => c % (rows + 1)).sort((a, b) => a - b), rows];
          const acc = createNormalEquations(p);
          let chunkSsrTotal = 0;
          for (let c = 0; c + 1 < cuts.length; c++) {
            const s = cuts[c]!;
            const m = cuts[c + 1]! - s;
            // Chunk view: residuals from row s, Jacobian columns still `stride` apart (m may be 0).
            chunkSsrTotal += accumulateNormalEquations(acc, r.subarray(s, s + m), J.subarray(s), m, stride);
          }
          expect(acc.rows).toBe(rows);
          // Derived here: a recursive sum of n terms errs by at most γₙ·Σ|terms| ≤ 1.01·n·eps·Σ|terms|
          // (Higham 2002, "Accuracy and Stability of Numerical Algorithms", §4.2); the reference and
          // the chunked sums each carry at most that error, and the compensated addition of the chunk
          // totals adds at most ~2·eps·|total|. Tolerance: 2.1·n·eps·Σ|terms| + 4·eps·|ref|.
          const tol = (a: number, v: number) => 2.1 * rows * EPS * a + 4 * EPS * Math.abs(v);
          for (let i = 0; i < p; i++) {
            expectClose(acc.Jtr[i]!, ref.Jtr[i]!, { abs: tol(ref.JtrAbs[i]!, ref.Jtr[i]!) }, `Jtr[${i}]`);
            for (let j = 0; j < p; j++) {
              const v = ref.JtJ[i * p + j]!;
              expectClose(acc.JtJ[i * p + j]!, v, { abs: tol(ref.JtJAbs[i * p + j]!, v) }, `JtJ[${i},${j}]`);
            }
            for (let j = 0; j < i; j++) expect(acc.JtJ[i * p + j]).toBe(acc.JtJ[j * p + i]);
          }
          // rᵀr terms are all ≥ 0, so Σ|terms| = rᵀr.
          expectClose(acc.ssr, ref.ssr, { abs: tol(ref.ssr, ref.ssr) }, 'ssr');
          expectClose(chunkSsrTotal, ref.ssr, { abs: tol(ref.ssr, ref.ssr) }, 'sum of returned chunk rᵀr');
        },
      ),
      { seed: 7 + p, numRuns: 40 },
    );
  });

  it.each(ps)('leaves the sums untouched for rows = 0 and adds x·xᵀ exactly for rows = 1 (p = %i)', (p) => {
    const acc = createNormalEquations(p);
    // rows = 0 with a NaN-filled Jacobian: nothing may be read.
    expect(accumulateNormalEquations(acc, new Float64Array(0), new Float64Array(p).fill(NaN), 0, 1)).toBe(0);
    expect(acc.rows).toBe(0);
    expect(acc.ssr).toBe(0);
    expect(acc.JtJ.every((v) => v === 0)).toBe(true);
    expect(acc.Jtr.every((v) => v === 0)).toBe(true);
    // rows = 1: column j holds x_j = j + 1 (stride 2, NaN pad), r = [3]. Derived here: JᵀJ[i][j] =
    // (i+1)(j+1), Jᵀr[i] = 3(i+1), rᵀr = 9 — small integers, exact in double precision.
    const J = new Float64Array(2 * p).fill(NaN);
    for (let j = 0; j < p; j++) J[2 * j] = j + 1;
    expect(accumulateNormalEquations(acc, Float64Array.of(3), J, 1, 2)).toBe(9);
    expect(acc.rows).toBe(1);
    expect(acc.ssr).toBe(9);
    for (let i = 0; i < p; i++) {
      expect(acc.Jtr[i]).toBe(3 * (i + 1));
      for (let j = 0; j < p; j++) expect(acc.JtJ[i * p + j]).toBe((i + 1) * (j + 1));
    }
  });

  it.each([5, 9])('compensates JᵀJ chunk totals on the unrolled and tiled paths (p = %i)', (p) => {
    // Derived here: the last column is 1e8 in the first chunk and 1 in 1000 later chunks, so its
    // JᵀJ diagonal is 1e16 + 1000 exactly; 1e16 + 1 rounds back to 1e16 (ulp(1e16) = 2), so plain
    // addition of the chunk totals stays at 1e16. Other columns are 0, r = 0.
    const comp = createNormalEquations(p, true);
    const plain = createNormalEquations(p, false);
    const J = new Float64Array(p);
    const d = (p - 1) * p + (p - 1);
    for (const acc of [comp, plain]) {
      J[p - 1] = 1e8;
      accumulateNormalEquations(acc, Float64Array.of(0), J, 1);
      J[p - 1] = 1;
      for (let i = 0; i < 1000; i++) accumulateNormalEquations(acc, Float64Array.of(0), J, 1);
    }
    expect(comp.JtJ[d]).toBe(1e16 + 1000);
    expect(plain.JtJ[d]).toBe(1e16);
  });
});

/** Rosenbrock's function as residuals r = [10(θ₂ − θ₁²), 1 − θ₁] (Moré, Garbow, Hillstrom 1981, problem 1). */
function rosenbrock(): LeastSquaresProblem {
  const r = new Float64Array(2);
  const J = new Float64Array(4);
  return {
    parameterCount: 2,
    evaluate(t, want, acc: NormalEquations) {
      r[0] = 10 * (t[1]! - t[0]! * t[0]!);
      r[1] = 1 - t[0]!;
      J[0] = -20 * t[0]!;
      J[1] = -1;
      J[2] = 10;
      J[3] = 0;
      accumulateNormalEquations(acc, r, want ? J : null, 2);
      return acc.ssr;
    },
  };
}

describe('solveLeastSquares stops and reports honestly', () => {
  it('solves Rosenbrock from (−1.2, 1) to (1, 1) with zero residual', () => {
    // Moré, Garbow, Hillstrom (1981), ACM TOMS 7(1), problem 1: minimiser (1, 1), f = 0.
    const res = solveLeastSquares(rosenbrock(), [-1.2, 1]);
    expect(res.converged).toBe(true);
    expectClose(res.theta[0]!, 1, { rel: 1e-9 }, 'theta0');
    expectClose(res.theta[1]!, 1, { rel: 1e-9 }, 'theta1');
    expect(res.ssr).toBeLessThan(1e-20);
  });

  it('reports a maxIterations stop as not converged', () => {
    const res = solveLeastSquares(rosenbrock(), [-1.2, 1], { maxIterations: 2 });
    expect(res.stopReason).toBe('max-iterations');
    expect(res.converged).toBe(false);
    expect(res.iterations).toBe(2);
  });

  it("reports a stop on a tiny step away from a stationary point as 'stalled', not converged", () => {
    // Contrived stall: r = θ − 5 with a Jacobian of the wrong sign (J = −1, a typical user bug).
    // Every predicted step goes uphill, λ grows until the step test fires, yet r (= −5 at θ = 0)
    // lies entirely in the column space of J: stationarity = 1 (derived here: |Jᵀr|/(‖J‖‖r‖) = 1).
    const problem: LeastSquaresProblem = {
      parameterCount: 1,
      evaluate(t, w, acc) {
        accumulateNormalEquations(acc, Float64Array.of(t[0]! - 5), w ? Float64Array.of(-1) : null, 1);
        return acc.ssr;
      },
    };
    const res = solveLeastSquares(problem, [0]);
    expect(res.stopReason).toBe('stalled');
    expect(res.converged).toBe(false);
    expectClose(res.stationarity, 1, { abs: 1e-12 }, 'stationarity');
    expect(res.theta[0]).toBe(0);
  });

  it('bounds the first step by initialStepBound·‖Dθ₀‖ and validates the new options', () => {
    // r = θ − 1000 from θ = 1 (D = 1): the Gauss–Newton step is 999; with factor 1 the first
    // accepted step is at most 1.1·‖Dθ₀‖ = 1.1 (derived here), so θ after one iteration ≤ 2.1.
    const problem: LeastSquaresProblem = {
      parameterCount: 1,
      evaluate(t, w, acc) {
        accumulateNormalEquations(acc, Float64Array.of(t[0]! - 1000), w ? Float64Array.of(1) : null, 1);
        return acc.ssr;
      },
    };
    const one = solveLeastSquares(problem, [1], { maxIterations: 1 });
    expect(one.theta[0]!).toBeGreaterThan(1);
    expect(one.theta[0]!).toBeLessThanOrEqual(2.1);
    const free = solveLeastSquares(problem, [1], { maxIterations: 1, initialStepBound: Infinity });
    // Unbounded: one step with λ₀ = 1e-3 lands at 1 + 999/(1 + 1e-3) (derived here).
    expectClose(free.theta[0]!, 1 + 999 / 1.001, { rel: 1e-12 }, 'unbounded step');
    const full = solveLeastSquares(problem, [1]);
    expect(full.converged).toBe(true);
    expectClose(full.theta[0]!, 1000, { rel: 1e-9 }, 'bounded fit still converges');
    expect(() => solveLeastSquares(problem, [1], { initialStepBound: 0 })).toThrow(
      'solveLeastSquares: options.initialStepBound must be > 0 (Infinity for no bound) (got 0)',
    );
    expect(() => solveLeastSquares(problem, [1], { stationarityTolerance: 1 })).toThrow(RangeError);
  });

  it("stops with 'non-finite' when the residuals at the start are NaN", () => {
    const res = solveLeastSquares(
      { parameterCount: 1, evaluate: (t, w, acc) => (accumulateNormalEquations(acc, Float64Array.of(Math.sqrt(t[0]!)), w ? Float64Array.of(1) : null, 1), acc.ssr) },
      [-1],
    );
    expect(res.stopReason).toBe('non-finite');
    expect(res.converged).toBe(false);
    expect(res.functionEvaluations).toBe(1);
  });

  it("stops with 'non-finite' when every step lands where the residuals are NaN", () => {
    // r = θ − 5 for θ ≤ 1, NaN above: the downhill direction is always NaN.
    const problem: LeastSquaresProblem = {
      parameterCount: 1,
      evaluate(t, w, acc) {
        const v = t[0]! <= 1 ? t[0]! - 5 : NaN;
        accumulateNormalEquations(acc, Float64Array.of(v), w ? Float64Array.of(1) : null, 1);
        return acc.ssr;
      },
    };
    const res = solveLeastSquares(problem, [1]);
    expect(res.stopReason).toBe('non-finite');
    expect(res.converged).toBe(false);
    expect(res.theta[0]).toBe(1);
  });

  it('rejects a trial step into a NaN region and still converges', () => {
    // r = [√θ − 2, 0.1·(θ − 3)] is NaN for θ < 0; from θ = 0.05 the first Gauss–Newton steps are
    // long. Minimiser derived here: d/dθ[(√θ − 2)² + 0.01(θ − 3)²] = 0 → θ ≈ 3.9 (checked by
    // a finite gradient below rather than pinned).
    const r = new Float64Array(2);
    const J = new Float64Array(2);
    const problem: LeastSquaresProblem = {
      parameterCount: 1,
      evaluate(t, w, acc) {
        const s = Math.sqrt(t[0]!);
        r[0] = s - 2;
        r[1] = 0.1 * (t[0]! - 3);
        J[0] = 0.5 / s;
        J[1] = 0.1;
        accumulateNormalEquations(acc, r, w ? J : null, 2);
        return acc.ssr;
      },
    };
    const res = solveLeastSquares(problem, [0.05]);
    expect(res.converged).toBe(true);
    expect(Math.abs(res.gradient[0]!)).toBeLessThan(1e-9);
    expect(res.theta[0]!).toBeGreaterThan(3);
  });
});

describe('solveLeastSquares validates its inputs', () => {
  const ok = rosenbrock();
  it('throws TypeError for a start of the wrong length, naming the lengths', () => {
    expect(() => solveLeastSquares(ok, [1])).toThrow(TypeError);
    expect(() => solveLeastSquares(ok, [1])).toThrow('solveLeastSquares: start must have length 2 (got 1)');
  });
  it('throws RangeError for a non-finite start value, naming the index', () => {
    expect(() => solveLeastSquares(ok, [1, NaN])).toThrow(RangeError);
    expect(() => solveLeastSquares(ok, [1, NaN])).toThrow('start[1] must be finite (got NaN)');
  });
  it('throws TypeError when the problem has no evaluate function', () => {
    expect(() => solveLeastSquares({ parameterCount: 2 } as unknown as LeastSquaresProblem, [1, 1])).toThrow(
      'problem must be an object with an evaluate function',
    );
  });
  it('throws RangeError for a bad parameterCount and bad options', () => {
    expect(() => solveLeastSquares({ ...ok, parameterCount: 0 }, [])).toThrow(
      'problem.parameterCount must be an integer >= 1 (got 0)',
    );
    expect(() => solveLeastSquares(ok, [1, 1], { maxIterations: -1 })).toThrow(
      'solveLeastSquares: options.maxIterations must be an integer >= 0 (got -1)',
    );
    expect(() => solveLeastSquares(ok, [1, 1], { stepTolerance: 2 })).toThrow(RangeError);
    expect(() => solveLeastSquares(ok, [1, 1], { compensatedSums: 'yes' as unknown as boolean })).toThrow(TypeError);
  });
  it('createNormalEquations throws RangeError for p < 1', () => {
    expect(() => createNormalEquations(0)).toThrow('createNormalEquations: p must be an integer >= 1 (got 0)');
  });
});

describe('geodesic acceleration (Transtrum & Sethna 2012) is opt-in and second-order exact', () => {
  // Invented data: y = a·e^(b·x) on x = 0, 0.1, …, 1 with a = 1.5, b = 0.5 plus a fixed wobble.
  const n = 11;
  const x = Float64Array.from({ length: n }, (_, k) => k / 10);
  const y = Float64Array.from(x, (xk, k) => 1.5 * Math.exp(0.5 * xk) + 0.01 * Math.sin(3 * k));
  const model = (t: Float64Array, [c]: readonly Float64Array[], out: Float64Array) => {
    for (let k = 0; k < out.length; k++) out[k] = t[0]! * Math.exp(t[1]! * c![k]!);
  };
  /**
   * Hand-derived (derived here): r = a·e^(bx) − y, J = [e^(bx), a·x·e^(bx)], and along v = (va, vb)
   * r_vv = d²/dt² (a + t·va)·e^((b + t·vb)x) = 2·va·vb·x·e^(bx) + a·vb²·x²·e^(bx).
   */
  const analyticJtRvv = (a: number, b: number, va: number, vb: number): [number, number] => {
    let s0 = 0;
    let s1 = 0;
    for (const xk of x) {
      const e = Math.exp(b * xk);
      const rvv = 2 * va * vb * xk * e + a * vb * vb * xk * xk * e;
      s0 += e * rvv;
      s1 += a * xk * e * rvv;
    }
    return [s0, s1];
  };

  it('createCurveProblem.accumulateSecondOrder matches the analytic Jᵀr_vv of y = a·e^(b·x)', () => {
    const prob = createCurveProblem([x], y, model, undefined, 2);
    const theta = Float64Array.of(1.2, 0.7);
    const v = Float64Array.of(0.3, -0.2);
    const [e0, e1] = analyticJtRvv(1.2, 0.7, 0.3, -0.2);
    // Finite difference error is O(h·‖v‖) relative: ~h·0.3/3 (third-derivative term, derived here),
    // 1e-4 at h = 1e-3; the central-difference Jacobian adds ~1e-10.
    const out = new Float64Array(2);
    prob.accumulateSecondOrder(theta, v, 1e-3, out);
    expectClose(out[0]!, e0, { rel: 3e-4 }, 'Jᵀr_vv[0] at h = 1e-3');
    expectClose(out[1]!, e1, { rel: 3e-4 }, 'Jᵀr_vv[1] at h = 1e-3');
    // It accumulates: a second call doubles the sums (h = 1e-3 again, same point).
    prob.accumulateSecondOrder(theta, v, 1e-3, out);
    expectClose(out[0]!, 2 * e0, { rel: 3e-4 }, 'accumulated Jᵀr_vv[0]');
    // The default h = 0.1 is 100× coarser: error ~1e-2 relative (derived here as above), still close.
    out.fill(0);
    prob.accumulateSecondOrder(theta, v, 0.1, out);
    expectClose(out[1]!, e1, { rel: 2e-2 }, 'Jᵀr_vv[1] at h = 0.1');
    // One-parameter case y = e^(b·x): r_vv = v²·x²·e^(bx), Jᵀr_vv = v²·Σ x³·e^(2bx) (derived here).
    const prob1 = createCurveProblem([x], y, (t, [c], o) => {
      for (let k = 0; k < o.length; k++) o[k] = Math.exp(t[0]! * c![k]!);
    }, undefined, 1);
    let want = 0;
    for (const xk of x) want += 0.25 * xk ** 3 * Math.exp(2 * 0.4 * xk);
    const o1 = new Float64Array(1);
    prob1.accumulateSecondOrder(Float64Array.of(0.4), Float64Array.of(0.5), 1e-4, o1);
    expectClose(o1[0]!, want, { rel: 1e-4 }, 'Jᵀr_vv of e^(bx) at h = 1e-4');
  });

  it('is off by default: a problem offering accumulateSecondOrder runs bit-identically and it is never called', () => {
    const plain = createCurveProblem([x], y, model, undefined, 2);
    const offered = createCurveProblem([x], y, model, undefined, 2);
    let calls = 0;
    const base = offered.accumulateSecondOrder;
    offered.accumulateSecondOrder = (t, v, h, out) => {
      calls++;
      base(t, v, h, out);
    };
    const withoutIt: LeastSquaresProblem = { parameterCount: 2, evaluate: plain.evaluate };
    const a = solveLeastSquares(withoutIt, [1, 1]);
    const b = solveLeastSquares(offered, [1, 1]);
    expect(calls).toBe(0);
    expect(Array.from(b.theta)).toEqual(Array.from(a.theta));
    expect(b.iterations).toBe(a.iterations);
    // Asked for but not offered: ignored, same run.
    const c = solveLeastSquares(withoutIt, [1, 1], { geodesicAcceleration: true });
    expect(Array.from(c.theta)).toEqual(Array.from(a.theta));
  });

  it('with an analytic second-order term reaches the same least-squares optimum as plain LM', () => {
    const dense = createCurveProblem([x], y, model, undefined, 2);
    let calls = 0;
    const analytic: LeastSquaresProblem = {
      parameterCount: 2,
      evaluate: dense.evaluate,
      accumulateSecondOrder(t, v, _h, out) {
        calls++;
        const [s0, s1] = analyticJtRvv(t[0]!, t[1]!, v[0]!, v[1]!);
        out[0] = out[0]! + s0;
        out[1] = out[1]! + s1;
      },
    };
    const plain = solveLeastSquares({ parameterCount: 2, evaluate: dense.evaluate }, [0.2, 3]);
    const geo = solveLeastSquares(analytic, [0.2, 3], { geodesicAcceleration: true });
    expect(calls).toBeGreaterThan(0);
    expect(geo.converged, geo.stopReason).toBe(true);
    // Same data, same minimum; 1e-7 relative is common practice, no source (both stop at 1e-10 tolerances).
    expectClose(geo.theta[0]!, plain.theta[0]!, { rel: 1e-7 }, 'a');
    expectClose(geo.theta[1]!, plain.theta[1]!, { rel: 1e-7 }, 'b');
  });

  it('validates the geodesic options', () => {
    const ok = rosenbrock();
    expect(() => solveLeastSquares(ok, [1, 1], { geodesicAcceleration: 1 as unknown as boolean })).toThrow(
      'solveLeastSquares: options.geodesicAcceleration must be a boolean (got number)',
    );
    expect(() => solveLeastSquares(ok, [1, 1], { accelerationRatio: 0 })).toThrow(RangeError);
    expect(() => solveLeastSquares(ok, [1, 1], { secondOrderStep: 2 })).toThrow(
      'solveLeastSquares: options.secondOrderStep must be > 0 and <= 1 (got 2)',
    );
    expect(() => solveLeastSquares(ok, [1, 1], { dampingScale: 'max' as 'current' })).toThrow(TypeError);
  });
});
