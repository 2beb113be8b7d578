import { formatNumber } from './formatNumber.js';

/** How {@link formatInterval} writes an interval. */
export interface FormatIntervalOptions {
  /** Fewest significant digits of each end. @default 4 */
  digits?: number;
  /** Number writer, called with the number and its significant digits. @default formatNumber (real minus sign) */
  format?: (x: number, digits: number) => string;
  /** Text for a missing interval. @default '–' */
  missing?: string;
}

/** Most significant digits tried: a double has 17. */
const MAX_DIGITS = 17;

/**
 * The number of significant digits at which the two ends of an interval are written differently
 * (at least `minDigits`), so that a narrow interval never reads `0.052 … 0.052`.
 *
 * @param ci - the interval [low, high], or null
 * @param minDigits - fewest digits @default 4
 * @param format - number writer @default formatNumber
 * @returns digits to use (minDigits when the ends are equal, not finite or the interval is null)
 * @example
 * intervalDigits([0.0519964, 0.0520008]); // => 5 ('0.051996 … 0.052001')
 */
export function intervalDigits(
  ci: readonly [number, number] | null,
  minDigits = 4,
  format: (x: number, digits: number) => string = formatNumber,
): number {
  if (ci === null || !Number.isFinite(ci[0]) || !Number.isFinite(ci[1]) || ci[0] === ci[1]) return minDigits;
  for (let d = minDigits; d <= MAX_DIGITS; d++) {
    // The ends must differ as numbers, not only as text: 9.9969e-4 and 1.0003e-3 at 3 digits are
    // both 0.00100, however each is written ('1e-3 … 0.001' reads as a point).
    if (Number(ci[0].toPrecision(d)) !== Number(ci[1].toPrecision(d)) && format(ci[0], d) !== format(ci[1], d)) return d;
  }
  return MAX_DIGITS;
}

/**
 * An interval for people: `low … high`, each end with enough significant digits that the two
 * differ (at least `digits`; see {@link intervalDigits}). The one interval writer of the
 * Markdown and HTML reports and the command line's text.
 *
 * @param ci - the interval [low, high], or null
 * @param options - digits, number writer and the text for a missing interval
 * @returns the text, e.g. `0.051996 … 0.052001`, or `missing` for null
 * @example
 * formatInterval([0.0519964, 0.0520008]); // => '0.051996 … 0.052001'
 * formatInterval([1.8994, 1.9014]); // => '1.899 … 1.901'
 */
export function formatInterval(ci: readonly [number, number] | null, options: FormatIntervalOptions = {}): string {
  const format = options.format ?? formatNumber;
  if (ci === null) return options.missing ?? '–';
  const d = intervalDigits(ci, options.digits ?? 4, format);
  return `${format(ci[0], d)} … ${format(ci[1], d)}`;
}
