import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { choleskyFactor, forwardSubstitute, solveWithCholeskyFactor } from '../solver/choleskyFactor.js';
import { solveSymmetricSystem } from '../solver/solveSymmetricSystem.js';
import { solveDampedStep } from '../solver/solveDampedStep.js';

// Worked by hand: A = [[4, 2, −2], [2, 10, 2], [−2, 2, 6]].
// L00 = √4 = 2, L10 = 2/2 = 1, L20 = −2/2 = −1, L11 = √(10 − 1) = 3, L21 = (2 − (−1)(1))/3 = 1,
// L22 = √(6 − 1 − 1) = 2. With x = (1, −1, 2): b = A·x = (−2, −4, 8); L·y = b gives y = (−1, (−4 + 1)/3, (8 − 1 + 1)/2) = (−1, −1, 4).
const A3 = Float64Array.of(4, 2, -2, 2, 10, 2, -2, 2, 6);
const L3 = [2, 0, 0, 1, 3, 0, -1, 1, 2];
const B3 = Float64Array.of(-2, -4, 8);

describe('choleskyFactor', () => {
  it('writes the hand-computed lower factor and leaves the upper triangle alone', () => {
    const L = new Float64Array(9).fill(7);
    expect(choleskyFactor(A3, 3, L)).toBe(true);
    expect(Array.from(L)).toEqual([2, 7, 7, 1, 3, 7, -1, 1, 2]);
  });

  it('solves through the factor: forward substitution, then the full solve', () => {
    const L = Float64Array.from(L3);
    expect(Array.from(forwardSubstitute(L, B3, 3, new Float64Array(3)))).toEqual([-1, -1, 4]);
    expect(Array.from(solveWithCholeskyFactor(L, B3, 3, new Float64Array(3)))).toEqual([1, -1, 2]);
    // In place: the right-hand side array receives the solution.
    const b = Float64Array.from(B3);
    solveWithCholeskyFactor(L, b, 3, b);
    expect(Array.from(b)).toEqual([1, -1, 2]);
  });

  it('adds the shift to the diagonal and refuses pivots at or below the floor', () => {
    const L = new Float64Array(4);
    // [[1, 2], [2, 1]] is indefinite: the second pivot is 1 − 4 = −3.
    expect(choleskyFactor(Float64Array.of(1, 2, 2, 1), 2, L)).toBe(false);
    // With shift 8 it is [[9, 2], [2, 9]]: L = [[3, 0], [2/3, √(9 − 4/9)]].
    expect(choleskyFactor(Float64Array.of(1, 2, 2, 1), 2, L, 8)).toBe(true);
    expectClose(L[2]!, 2 / 3, { rel: 1e-15 }, 'L10');
    expectClose(L[3]!, Math.sqrt(77) / 3, { rel: 1e-15 }, 'L11');
    // diag(4, 1e-20): positive, but the second pivot is below a floor of 1e-14 · 4.
    const tiny = Float64Array.of(4, 0, 0, 1e-20);
    expect(choleskyFactor(tiny, 2, L)).toBe(true);
    expect(choleskyFactor(tiny, 2, L, 0, 4e-14)).toBe(false);
  });
});

describe('the callers of the one factorisation', () => {
  it('solveSymmetricSystem and solveDampedStep give the hand-computed solution', () => {
    expect(Array.from(solveSymmetricSystem(A3, B3, 3)!)).toEqual([1, -1, 2]);
    const z = new Float64Array(3), work = new Float64Array(9);
    expect(solveDampedStep(A3, 0, B3, 3, z, work)).toBe('cholesky');
    expect(Array.from(z)).toEqual([1, -1, 2]);
    // The factor is left in work for the damping update of the trust region.
    expect([work[0], work[3], work[4], work[6], work[7], work[8]]).toEqual([2, 1, 3, -1, 1, 2]);
  });

  it('solveDampedStep falls back to the eigendecomposition for a singular matrix', () => {
    // [[1, 1], [1, 1]] z = (2, 2): the minimum-norm solution is (1, 1).
    const z = new Float64Array(2);
    expect(solveDampedStep(Float64Array.of(1, 1, 1, 1), 0, Float64Array.of(2, 2), 2, z, new Float64Array(4))).toBe('eigen');
    expectClose(z[0]!, 1, { rel: 1e-12 }, 'z0');
    expectClose(z[1]!, 1, { rel: 1e-12 }, 'z1');
  });

  it('solveSymmetricSystem adds a ridge to a semi-definite matrix and returns null for an indefinite one', () => {
    // [[1, 1], [1, 1]]: the plain factor fails (second pivot 0); the 1e-13 ridge makes it solvable.
    const x = solveSymmetricSystem(Float64Array.of(1, 1, 1, 1), Float64Array.of(2, 2), 2)!;
    expect(x).not.toBeNull();
    expectClose(x[0]! + x[1]!, 2, { rel: 1e-6 }, 'x0 + x1');
    expect(solveSymmetricSystem(Float64Array.of(1, 2, 2, 1), Float64Array.of(1, 1), 2)).toBeNull();
  });
});
