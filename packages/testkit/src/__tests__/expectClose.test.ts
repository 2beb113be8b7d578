import { describe, expect, it } from 'vitest';
import { expectClose } from '@motorprint/testkit';

describe('expectClose', () => {
  it('accepts a value inside rel·|e| + abs', () => {
    expect(() => expectClose(1.0005, 1, { rel: 1e-3 })).not.toThrow();
    expect(() => expectClose(1e-12, 0, { abs: 1e-9 })).not.toThrow();
  });
  it('rejects a value outside and prints actual, expected, delta and tol', () => {
    expect(() => expectClose(1.01, 1, { rel: 1e-3 }, 'R')).toThrow(/R: actual 1.01 vs expected 1; \|delta\|/);
  });
  it('rejects NaN against a finite expectation', () => {
    expect(() => expectClose(Number.NaN, 1, { rel: 1 })).toThrow(/actual NaN/);
  });
});
