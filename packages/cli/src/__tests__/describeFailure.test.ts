import { describe, expect, it } from 'vitest';
import { describeFailure } from '../describeFailure.js';

describe('describeFailure: a fault of the program is said to be one', () => {
  it('frames a bare JavaScript fault as an internal error to report', () => {
    const text = describeFailure(new TypeError("Cannot read properties of undefined (reading 'value')"));
    expect(text).toMatch(/^internal error in motorprint \(a fault of the program, not of your files\): Cannot read properties/);
    expect(text).toMatch(/Please report it with the command line and the files/);
    expect(describeFailure(new ReferenceError('x is not defined'))).toMatch(/^internal error/);
  });
  it('leaves the packages\' own refusals (function-prefixed, or with a code) as they are', () => {
    expect(describeFailure(new RangeError('fitMotor: options.alpha must be in (0, 1) (got 2)'))).toBe('fitMotor: options.alpha must be in (0, 1) (got 2)');
    expect(describeFailure(new RangeError('planExperiments: runs[0].duration must be > 0 (got -1)'))).toMatch(/^planExperiments: runs\[0\]/);
    const coded = Object.assign(new TypeError('the spec has no limits'), { code: 'spec-invalid' });
    expect(describeFailure(coded)).toBe('the spec has no limits [spec-invalid]');
    expect(describeFailure(new Error('the fit did not converge'))).toBe('the fit did not converge');
  });
});
