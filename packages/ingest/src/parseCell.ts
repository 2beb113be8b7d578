import type { DropReason } from './types.js';

/** 10^0 … 10^22: every one is exactly representable as a double. */
const POW10 = [
  1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18,
  1e19, 1e20, 1e21, 1e22,
];

/** 2⁵³: integers below it are exact doubles. */
const TWO_53 = 9007199254740992;

const SPACE = 32;
const TAB = 9;
const CR = 13;
const PLUS = 43;
const MINUS = 45;
const ZERO = 48;
const NINE = 57;
const LOWER_E = 101;
const UPPER_E = 69;
/** Char code of `.`. */
export const DOT = 46;
/** Char code of `,`. */
export const COMMA = 44;

/**
 * The reference meaning of a cell: `Number(cell.trim())` (with `,` read as `.` when the decimal
 * separator is a comma), except that a blank cell is NaN rather than 0. Both the fast scanner and
 * the papaparse path read cells with {@link scanCell}, which equals this for every input.
 *
 * @param cell - the cell text
 * @param decimal - char code of the decimal separator ({@link DOT} or {@link COMMA})
 * @example
 * parseCellReference(' 1,5 ', COMMA) // => 1.5
 * parseCellReference('', DOT)        // => NaN
 */
export function parseCellReference(cell: string, decimal: number): number {
  const s = cell.trim();
  if (s === '') return Number.NaN;
  return Number(decimal === COMMA ? s.replaceAll(',', '.') : s);
}

/**
 * Reads one cell starting at `start` on a line ending at `lineEnd`, parses it into `out[slot]` and
 * returns where the cell ends (the index of the next `delimiter` char code, or `lineEnd`; pass −1
 * as `delimiter` to read a whole string as one cell), visiting each character once in the common
 * case. The value is bit-identical to {@link parseCellReference} of the cell's text.
 *
 * ## Method
 * Plain decimals whose significant digits form an integer below 2⁵³ (every one of at most 15
 * digits, and 16-digit ones up to 9007199254740991) and a decimal exponent of at most 22 in
 * magnitude are computed as one multiplication or division of two exactly representable doubles,
 * which IEEE 754 rounds correctly (Clinger's fast path), so the result equals `Number()`'s. Anything
 * else (more digits, hex, `Infinity`, odd whitespace, stray characters) goes to
 * {@link parseCellReference} on the cell's slice. The value is written to a typed array rather than
 * returned so that V8 need not box a double per cell.
 *
 * ## References
 * W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990, doi:10.1145/93542.93557
 */
export function scanCell(text: string, start: number, lineEnd: number, delimiter: number, decimal: number, out: Float64Array, slot: number): number {
  let i = start;
  let c = -1;
  while (i < lineEnd && ((c = text.charCodeAt(i)) === SPACE || (c === TAB && delimiter !== TAB))) i++;
  if (i === lineEnd || c === delimiter) {
    out[slot] = Number.NaN;
    return i;
  }
  let negative = false;
  if (c === MINUS) {
    negative = true;
    i++;
  } else if (c === PLUS) {
    i++;
  }
  let mantissa = 0;
  let digits = 0;
  let exponent = 0;
  let sawDigit = false;
  let sawPoint = false;
  c = -1;
  for (; i < lineEnd; i++) {
    c = text.charCodeAt(i);
    if (c >= ZERO && c <= NINE) {
      sawDigit = true;
      if (mantissa === 0 && c === ZERO) {
        if (sawPoint) exponent--;
      } else if (digits < 16) {
        mantissa = mantissa * 10 + (c - ZERO);
        digits++;
        if (sawPoint) exponent--;
      } else {
        return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
      }
    } else if (c === decimal && !sawPoint) {
      sawPoint = true;
    } else {
      break;
    }
    c = -1;
  }
  if (!sawDigit) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
  // A 16th digit may take the integer past 2⁵³, where it is no longer exact. Below 2⁵³ every step
  // of the accumulation was exact; at or past it the rounded sum is at least 2⁵³ too.
  if (mantissa >= TWO_53) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
  if (c === LOWER_E || c === UPPER_E) {
    i++;
    let expNegative = false;
    if (i < lineEnd) {
      c = text.charCodeAt(i);
      if (c === MINUS) {
        expNegative = true;
        i++;
      } else if (c === PLUS) {
        i++;
      }
    }
    let e = 0;
    let expDigits = 0;
    c = -1;
    for (; i < lineEnd; i++) {
      c = text.charCodeAt(i);
      if (c < ZERO || c > NINE) break;
      if (expDigits >= 4) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
      e = e * 10 + (c - ZERO);
      expDigits++;
      c = -1;
    }
    if (expDigits === 0) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
    exponent += expNegative ? -e : e;
  }
  // Trailing blanks, then the delimiter or the line end.
  while (c === SPACE || c === CR || (c === TAB && delimiter !== TAB)) {
    i++;
    c = i < lineEnd ? text.charCodeAt(i) : -1;
  }
  if (i < lineEnd && c !== delimiter) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
  let value: number;
  if (mantissa === 0) value = 0;
  else if (exponent === 0) value = mantissa;
  else if (exponent > 0 && exponent <= 22) value = mantissa * POW10[exponent]!;
  else if (exponent < 0 && exponent >= -22) value = mantissa / POW10[-exponent]!;
  else {
    // The reference parse sees the sign itself.
    out[slot] = parseCellReference(text.slice(start, i), decimal);
    return i;
  }
  out[slot] = negative ? -value : value;
  return i;
}

function slowCell(text: string, start: number, lineEnd: number, delimiter: number, decimal: number, out: Float64Array, slot: number): number {
  let d = delimiter < 0 ? lineEnd : text.indexOf(String.fromCharCode(delimiter), start);
  if (d < 0 || d > lineEnd) d = lineEnd;
  out[slot] = parseCellReference(text.slice(start, d), decimal);
  return d;
}

const NON_FINITE_WORD = /^[+-]?(nan|inf|infinity)$/i;

/**
 * Says why a cell did not give a finite number.
 *
 * @example
 * classifyBadCell('  ')   // => 'blank-cell'
 * classifyBadCell('NaN')  // => 'non-finite'
 * classifyBadCell('1e999') // => 'non-finite'
 * classifyBadCell('n/a')  // => 'non-numeric'
 */
export function classifyBadCell(cell: string, decimal = DOT): Exclude<DropReason, 'out-of-range' | 'column-count' | 'duplicate-time'> {
  const s = cell.trim();
  if (s === '') return 'blank-cell';
  if (NON_FINITE_WORD.test(s)) return 'non-finite';
  const v = parseCellReference(s, decimal);
  return v === Number.POSITIVE_INFINITY || v === Number.NEGATIVE_INFINITY ? 'non-finite' : 'non-numeric';
}
