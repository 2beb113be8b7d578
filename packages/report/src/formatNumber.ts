/**
 * A number for people: `digits` significant digits, exponent form outside 1e-3…1e6, a real minus
 * sign, and an en dash for null or non-finite values.
 *
 * @param x - the number (or null)
 * @param digits - significant digits @default 4
 * @returns the text
 * @example
 * formatNumber(0.000123456); // => '1.235e-4'
 * formatNumber(-2291.831180523293); // => '−2292'
 */
export function formatNumber(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '–';
  if (x === 0) return '0';
  const a = Math.abs(x);
  let s: string;
  if (a >= 1e-3 && a < 1e6) s = String(Number(x.toPrecision(digits)));
  else {
    const [m, e] = x.toExponential(digits - 1).split('e');
    s = `${String(Number(m))}e${Number(e)}`;
  }
  return s.replace(/^-/, '−').replace(/e-/, 'e−');
}
