/** Test helper: two normal-equation accumulators hold the same bits (kernel against JavaScript). */
import { firstDifference } from '@motorprint/testkit';
import { expect } from 'vitest';
import type { NormalEquations } from '../solver/types.js';

export function expectSameNormalEquations(a: NormalEquations, b: NormalEquations): void {
  expect(firstDifference(a.high, b.high)).toBe(-1);
  expect(firstDifference(a.low, b.low)).toBe(-1);
  expect(firstDifference(a.JtJ, b.JtJ)).toBe(-1);
  expect(firstDifference(a.Jtr, b.Jtr)).toBe(-1);
  expect(Object.is(a.ssr, b.ssr)).toBe(true);
  expect(a.rows).toBe(b.rows);
}
