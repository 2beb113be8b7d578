/**
 * Asserts `|actual − expected| ≤ rel·|expected| + abs` and, on failure, throws an Error whose
 * message prints the actual value, the expected value, their difference and the tolerance.
 *
 * Use it instead of `toBeCloseTo(x, digits)`, which checks absolute decimals and so checks
 * nothing on a J of 1e-5 kg·m².
 *
 * @param actual - value computed by the code under test
 * @param expected - reference value (state its provenance beside the call)
 * @param tol - relative and absolute tolerance; both default to 0
 * @param label - what is being compared, printed on failure
 * @example
 * expectClose(2.4322200, 2.432220039, { rel: 1e-7 }, 'R at 75 °C');
 */
export function expectClose(
  actual: number,
  expected: number,
  tol: { rel?: number; abs?: number },
  label = 'value',
): void {
  const rel = tol.rel ?? 0;
  const abs = tol.abs ?? 0;
  const delta = Math.abs(actual - expected);
  const allowed = rel * Math.abs(expected) + abs;
  if (!(delta <= allowed) || !Number.isFinite(actual) !== !Number.isFinite(expected)) {
    throw new Error(
      `${label}: actual ${actual} vs expected ${expected}; |delta| = ${delta} > tol ${allowed} ` +
        `(rel ${rel}, abs ${abs})`,
    );
  }
}
