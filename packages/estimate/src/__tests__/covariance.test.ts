import { expectClose } from '@motorprint/testkit';
import { describe, expect, it } from 'vitest';
import { covarianceFromJacobian } from '../solver/covarianceFromJacobian.js';
import { covarianceFromNormalMatrix } from '../solver/covarianceFromNormalMatrix.js';
import { fitCurve } from '../solver/fitCurve.js';

// Straight line through (0, 0), (1, 1), (2, 3). Derived here: XᵀX = [[3, 3], [3, 5]], det 6,
// (XᵀX)⁻¹ = [[5/6, −1/2], [−1/2, 1/2]]; fit a = −1/6, b = 3/2; residuals model − y = (−1/6, 1/3, −1/6),
// SSR = 1/6, σ² = SSR/(3 − 2) = 1/6; SE(a) = √(5/36) = 0.3726779962, SE(b) = √(1/12) = 0.2886751346.
const J_LINE = Float64Array.of(1, 1, 1, 0, 1, 2);
const SE_A = Math.sqrt(5 / 36);
const SE_B = Math.sqrt(1 / 12);

describe('covarianceFromJacobian and covarianceFromNormalMatrix', () => {
  it('give the closed-form standard errors of a straight-line fit', () => {
    for (const cov of [
      covarianceFromJacobian(J_LINE, 3, 2, 1 / 6),
      covarianceFromNormalMatrix(Float64Array.of(3, 3, 3, 5), 2, 1 / 6, 3),
    ]) {
      expectClose(cov.standardErrors[0]!, SE_A, { rel: 1e-12 }, 'SE a');
      expectClose(cov.standardErrors[1]!, SE_B, { rel: 1e-12 }, 'SE b');
      expectClose(cov.covariance[1]!, (1 / 6) * -0.5, { rel: 1e-12 }, 'cov ab');
      expectClose(cov.residualVariance, 1 / 6, { rel: 1e-15 }, 'σ²');
      expect(cov.degreesOfFreedom).toBe(1);
      expect(cov.rank).toBe(2);
      expect(cov.conditionNumber).toBeGreaterThan(1);
    }
  });

  it('marks duplicated columns as not identifiable with NaN standard errors instead of huge numbers', () => {
    // Columns 2 and 3 identical: θ₂ + θ₃ is determined, θ₂ − θ₃ is not; θ₁ stays identifiable.
    const J = Float64Array.of(1, 1, 1, 1, 0, 1, 2, 3, 0, 1, 2, 3);
    const cov = covarianceFromJacobian(J, 4, 3, 0.5);
    expect(cov.rank).toBe(2);
    expect(cov.identifiable).toEqual([true, false, false]);
    expect(Number.isNaN(cov.standardErrors[1]!)).toBe(true);
    expect(Number.isFinite(cov.standardErrors[0]!)).toBe(true);
    expect(cov.conditionNumber).toBeGreaterThan(1e12);
    const fromNormal = covarianceFromNormalMatrix(Float64Array.of(4, 6, 6, 6, 14, 14, 6, 14, 14), 3, 0.5, 4);
    expect(fromNormal.identifiable).toEqual([true, false, false]);
  });

  it('validates shapes and values', () => {
    expect(() => covarianceFromJacobian(new Float64Array(5), 3, 2, 1)).toThrow(
      'covarianceFromJacobian: jacobian must be a Float64Array of length n*p = 6',
    );
    expect(() => covarianceFromJacobian(J_LINE, 3, 2, -1)).toThrow(RangeError);
    expect(() => covarianceFromNormalMatrix(Float64Array.of(1, 0, 0, Infinity), 2, 1, 3)).toThrow(
      'covarianceFromNormalMatrix: JtJ[3] must be finite (got Infinity)',
    );
  });
});

describe('fitCurve', () => {
  const x = Float64Array.of(0, 1, 2);
  const y = Float64Array.of(0, 1, 3);
  const line = (t: Float64Array, [c]: readonly Float64Array[], out: Float64Array) => {
    for (let k = 0; k < out.length; k++) out[k] = t[0]! + t[1]! * c![k]!;
  };

  it('fits the straight line with a central-difference Jacobian and reports its covariance', () => {
    const fit = fitCurve({ x, y, model: line, start: [1, 1] });
    expectClose(fit.theta[0]!, -1 / 6, { rel: 1e-9 }, 'a'); // derived above
    expectClose(fit.theta[1]!, 1.5, { rel: 1e-9 }, 'b');
    expectClose(fit.covariance.standardErrors[0]!, SE_A, { rel: 1e-7 }, 'SE a');
    expectClose(fit.residuals[1]!, 1 / 3, { rel: 1e-9 }, 'residual 1 (model − y)'); // 4/3 − 1, derived above
    expect(fit.converged).toBe(true);
  });

  it('rejects bad input with typed errors that name the field and index', () => {
    expect(() => fitCurve({ x: Float64Array.of(1, 2), y, model: line, start: [1, 1] })).toThrow(
      'fitCurve: input.x[0] has length 2, input.y has length 3',
    );
    expect(() => fitCurve({ x, y: Float64Array.of(0, NaN, 1), model: line, start: [1, 1] })).toThrow(
      'fitCurve: input.y[1] must be finite (got NaN)',
    );
    expect(() => fitCurve({ x, y, model: line, start: [1, 1, 1, 1] })).toThrow(RangeError);
    expect(() => fitCurve({ x, y: [0, 1, 3] as unknown as Float64Array, model: line, start: [1, 1] })).toThrow(TypeError);
  });
});
