import { describe, expect, it } from 'vitest';
import { gaussNewtonStep } from '../solver/gaussNewtonStep.js';

describe('gaussNewtonStep', () => {
  it('solves the normal equations with scaled columns, and holds marked entries', () => {
    // Derived here: A = diag(4, 1), Jᵀr = (−8, 2) → δ = (2, −2), drop = −(−8·2 + 2·(−2)) = 20.
    const r = gaussNewtonStep(Float64Array.of(4, 0, 0, 1), Float64Array.of(-8, 2), 2)!;
    expect(Array.from(r.step)).toEqual([2, -2]);
    expect(r.drop).toBe(20);
    // A = [[2, 1], [1, 2]], Jᵀr = (−3, −3): δ = (1, 1), drop 6; holding the second: δ = (1.5, 0), drop 4.5.
    const A = Float64Array.of(2, 1, 1, 2), g = Float64Array.of(-3, -3);
    const full = gaussNewtonStep(A, g, 2)!;
    expect(full.step[0]).toBeCloseTo(1, 14);
    expect(full.step[1]).toBeCloseTo(1, 14);
    expect(full.drop).toBeCloseTo(6, 13);
    const held = gaussNewtonStep(A, g, 2, Uint8Array.of(0, 1))!;
    expect(held.step[0]).toBeCloseTo(1.5, 14);
    expect(held.step[1]).toBe(0);
    expect(held.drop).toBeCloseTo(4.5, 13);
    // Not positive definite (a negative curvature): no step.
    expect(gaussNewtonStep(Float64Array.of(1, 0, 0, -1), g, 2)).toBeNull();
  });
});
