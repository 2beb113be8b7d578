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
 * which IEEE 754 rounds correctly (Clinger's fast path), so the result equals `Number()`'s. Those
 * with 16 or 17 significant digits forming an integer of 2⁵³ or more, divided by 10^1 … 10^22 (as
 * JavaScript and C print doubles, e.g. 0.019926150997693796), are rounded by
 * {@link roundQuotient}, which checks its result exactly. Anything else (more digits, larger
 * exponents, hex, `Infinity`, odd whitespace, stray characters, exact ties) goes to
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
  // The significant digits: the first 9 in `high`, the next 8 in `low` (`lowDigits` of them).
  let high = 0;
  let low = 0;
  let digits = 0;
  let lowDigits = 0;
  let exponent = 0;
  let sawDigit = false;
  let sawPoint = false;
  c = -1;
  for (; i < lineEnd; i++) {
    c = text.charCodeAt(i);
    if (c >= ZERO && c <= NINE) {
      sawDigit = true;
      if (digits === 0 && c === ZERO) {
        if (sawPoint) exponent--;
      } else if (digits < 9) {
        high = high * 10 + (c - ZERO);
        digits++;
        if (sawPoint) exponent--;
      } else if (digits < 17) {
        low = low * 10 + (c - ZERO);
        lowDigits++;
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
  if (!storeValue(high, low, lowDigits, exponent, negative, out, slot)) return slowCell(text, start, lineEnd, delimiter, decimal, out, slot);
  return i;
}

/**
 * Stores ± the digits `high` (the first up to 9 significant digits) and `low` (the next
 * `lowDigits` ≤ 8) times 10^exponent in `out[slot]` and returns true, or returns false (storing
 * nothing) when the value cannot be had exactly without `Number()`. (Storing rather than returning
 * the double spares V8 a heap number per cell when the call is not inlined.)
 */
function storeValue(high: number, low: number, lowDigits: number, exponent: number, negative: boolean, out: Float64Array, slot: number): boolean {
  // high · 10^lowDigits is exact (below 10⁹ · 5⁸ · 2⁸ with a mantissa under 2⁵³), and so is `low`.
  const top = lowDigits === 0 ? high : high * POW10[lowDigits]!;
  // Their sum is exact below 2⁵³; at or past it the rounded sum is at least 2⁵³ too.
  const mantissa = top + low;
  if (mantissa >= TWO_53) {
    // 16 or 17 digits: Clinger's fast path does not apply, so the quotient is checked exactly.
    return exponent < 0 && exponent >= -22 && storeQuotient(top, low, -exponent, negative, out, slot);
  }
  let value: number;
  if (mantissa === 0) value = 0;
  else if (exponent === 0) value = mantissa;
  else if (exponent > 0 && exponent <= 22) value = mantissa * POW10[exponent]!;
  else if (exponent < 0 && exponent >= -22) value = mantissa / POW10[-exponent]!;
  else return false;
  out[slot] = negative ? -value : value;
  return true;
}

/**
 * {@link scanCell} for a line held as bytes (ASCII; every byte is one character, as `latin1`
 * decodes it): the same cells, ends and bit-identical values, without making a string per cell.
 * Cells the fast path cannot settle are decoded and go to {@link parseCellReference}.
 *
 * When `newline` (a char code) is given, `lineEnd` may lie past the line: the line then ends at the
 * first `newline` byte from `start` on, as if that were `lineEnd`, so the caller need not look for
 * it first. (A `\r` that is not the newline is a trailing blank, as in {@link scanCell}.)
 */
export function scanCellBytes(bytes: Buffer, start: number, lineEnd: number, delimiter: number, decimal: number, out: Float64Array, slot: number, newline = -1): number {
  let i = start;
  let c = i < lineEnd ? bytes[i]! : -1;
  while (c === SPACE || (c === TAB && delimiter !== TAB)) c = ++i < lineEnd ? bytes[i]! : -1;
  if (i === lineEnd || c === delimiter || c === newline) {
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
  // Significant digits: the first 9 go to `high`, the next 8 to `low`; a 18th goes to the slow path.
  const firstDigit = i;
  let high = 0;
  let low = 0;
  let digits = 0;
  while (i < lineEnd && bytes[i] === ZERO) i++;
  // Each loop stops at a non-digit or when its part is full, so it need not count.
  let from = i;
  let stop = i + 9 < lineEnd ? i + 9 : lineEnd;
  for (; i < stop; i++) {
    const d = bytes[i]! - ZERO;
    if (d < 0 || d > 9) break;
    high = high * 10 + d;
  }
  digits = i - from;
  if (digits === 9) {
    from = i;
    stop = i + 8 < lineEnd ? i + 8 : lineEnd;
    for (; i < stop; i++) {
      const d = bytes[i]! - ZERO;
      if (d < 0 || d > 9) break;
      low = low * 10 + d;
    }
    digits += i - from;
    if (digits === 17 && i < lineEnd && bytes[i]! >= ZERO && bytes[i]! <= NINE) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
  }
  let sawDigit = i > firstDigit;
  let exponent = 0;
  c = i < lineEnd ? bytes[i]! : -1;
  if (c === decimal) {
    i++;
    const fractionStart = i;
    // Zeros before the first significant digit only move the exponent.
    if (digits === 0) while (i < lineEnd && bytes[i] === ZERO) i++;
    if (digits < 9) {
      from = i;
      stop = i + 9 - digits < lineEnd ? i + 9 - digits : lineEnd;
      for (; i < stop; i++) {
        const d = bytes[i]! - ZERO;
        if (d < 0 || d > 9) break;
        high = high * 10 + d;
      }
      digits += i - from;
    }
    if (digits >= 9) {
      from = i;
      stop = i + 17 - digits < lineEnd ? i + 17 - digits : lineEnd;
      for (; i < stop; i++) {
        const d = bytes[i]! - ZERO;
        if (d < 0 || d > 9) break;
        low = low * 10 + d;
      }
      digits += i - from;
      if (digits === 17 && i < lineEnd && bytes[i]! >= ZERO && bytes[i]! <= NINE) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
    }
    // Every digit after the point divides by 10.
    exponent = fractionStart - i;
    if (i > fractionStart) sawDigit = true;
    c = i < lineEnd ? bytes[i]! : -1;
  }
  if (!sawDigit) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
  if (c === LOWER_E || c === UPPER_E) {
    i++;
    let expNegative = false;
    if (i < lineEnd) {
      c = bytes[i]!;
      if (c === MINUS) {
        expNegative = true;
        i++;
      } else if (c === PLUS) {
        i++;
      }
    }
    const expStart = i;
    let e = 0;
    for (; i < lineEnd; i++) {
      const d = bytes[i]! - ZERO;
      if (d < 0 || d > 9) break;
      if (i - expStart >= 4) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
      e = e * 10 + d;
    }
    if (i === expStart) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
    exponent += expNegative ? -e : e;
    c = i < lineEnd ? bytes[i]! : -1;
  }
  // Trailing blanks, then the delimiter or the line end.
  while (c === SPACE || (c === CR && newline !== CR) || (c === TAB && delimiter !== TAB)) c = ++i < lineEnd ? bytes[i]! : -1;
  if (i < lineEnd && c !== delimiter && c !== newline) return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
  if (!storeValue(high, low, digits > 9 ? digits - 9 : 0, exponent, negative, out, slot)) {
    return slowCellBytes(bytes, start, lineEnd, delimiter, decimal, out, slot, newline);
  }
  return i;
}

function slowCellBytes(bytes: Buffer, start: number, lineEnd: number, delimiter: number, decimal: number, out: Float64Array, slot: number, newline: number): number {
  if (newline >= 0) {
    const nl = bytes.indexOf(newline, start);
    if (nl >= 0 && nl < lineEnd) lineEnd = nl;
  }
  let d = delimiter < 0 ? lineEnd : bytes.indexOf(delimiter, start);
  if (d < 0 || d > lineEnd) d = lineEnd;
  out[slot] = parseCellReference(bytes.toString('latin1', start, d), decimal);
  return d;
}

/** 2²⁷ + 1, Dekker's splitting constant for doubles. */
const SPLITTER = 134217729;
/** Scratch for reading the bits of a double. */
const bitsF64 = new Float64Array(1);
const bitsU32 = new Uint32Array(bitsF64.buffer);
const HIGH_WORD = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;

/**
 * The double nearest to (top + low) / 10^j, for integers top, low with top + low ≥ 2⁵³ (so at most
 * 17 digits, the top ones in `top` with `top` ≥ 2⁵³ − 10⁸ and 0 ≤ low < 10⁸) and 1 ≤ j ≤ 22; NaN
 * when the quotient lies exactly halfway between two doubles or the search does not settle, for
 * the caller to fall back to `Number()`.
 *
 * ## Method
 * A first guess x = fl(fl(top + low) / 10^j) is within a few units in the last place (ulp) of the
 * quotient q. It is the correctly rounded result exactly when q lies strictly between the midpoints
 * x − ulp⁻/2 and x + ulp/2 of x and its neighbours, i.e. when N = top + low − m · 10^j (m a
 * midpoint) is negative for the upper one and positive for the lower one; otherwise x steps to the
 * neighbour and the test repeats. Each N is evaluated exactly: 10^j (j ≤ 22) is a double, so x · 10^j
 * = p + e exactly with p = fl(x · 10^j) and e from Dekker's product; (ulp/2) · 10^j = h is exact (a
 * power of two times a double); `top − p` is exact by Sterbenz' lemma (p and top are within a factor
 * of 2 of each other, both near the mantissa ≥ 2⁵³) and an integer (doubles ≥ 2⁵² are integers), so
 * s = (top − p) + low is an exact integer below 2⁵³; the sign of N = s − e ∓ h, a sum of three
 * doubles, is then read from the sorted non-overlapping expansion that Shewchuk's error-free
 * Two-Sum steps make of it (the sign of such an expansion is that of its largest component).
 *
 * ## References
 * T. J. Dekker, "A floating-point technique for extending the available precision", Numer. Math. 18
 * (1971) 224–242, doi:10.1007/BF01397083;
 * J. R. Shewchuk, "Adaptive precision floating-point arithmetic and fast robust geometric
 * predicates", Discrete Comput. Geom. 18 (1997) 305–363, doi:10.1007/PL00009321
 */
export function roundQuotient(top: number, low: number, j: number): number {
  return storeQuotient(top, low, j, false, quotientScratch, 0) ? quotientScratch[0]! : Number.NaN;
}

const quotientScratch = new Float64Array(1);

/** {@link roundQuotient}, stored (negated when `negative`) in `out[slot]`; false when it is NaN. */
function storeQuotient(top: number, low: number, j: number, negative: boolean, out: Float64Array, slot: number): boolean {
  const scale = POW10[j]!;
  const scaleC = SPLITTER * scale;
  const scaleHigh = scaleC - (scaleC - scale);
  const scaleLow = scale - scaleHigh;
  let x = (top + low) / scale;
  let round = 0;
  for (; round < 4; round++) {
    // Exact product x · scale = p + e (Dekker).
    const p = x * scale;
    const xc = SPLITTER * x;
    const xHigh = xc - (xc - x);
    const xLow = x - xHigh;
    const e = xHigh * scaleHigh - p + xHigh * scaleLow + xLow * scaleHigh + xLow * scaleLow;
    const s = top - p + low;
    // ulp(x), and the gap below x (half of it when x is a power of two).
    bitsF64[0] = x;
    const hi = bitsU32[HIGH_WORD]!;
    const lo = bitsU32[1 - HIGH_WORD]!;
    const biased = hi >>> 20;
    bitsU32[HIGH_WORD] = (biased - 52) << 20;
    bitsU32[1 - HIGH_WORD] = 0;
    const ulp = bitsF64[0];
    const below = lo === 0 && (hi & 0xfffff) === 0 ? 0.5 * ulp : ulp;
    const halfUp = 0.5 * ulp * scale;
    const halfDown = 0.5 * below * scale;
    // Most often s − e lies well inside (−halfDown, halfUp): fl(s − e) is within a relative 2⁻⁵³
    // of it, far less than the 10⁻³ margin, so both midpoint tests are settled at once.
    const t = s - e;
    if (t < 0.999 * halfUp && t > -0.999 * halfDown) break;
    const up = signOfSum(s, -e, -halfUp);
    if (up > 0) {
      x += ulp;
      continue;
    }
    if (up === 0) return false;
    const down = signOfSum(s, -e, halfDown);
    if (down < 0) {
      x -= below;
      continue;
    }
    if (down === 0) return false;
    break;
  }
  // Not settled in four rounds (the first guess is within a few ulp, so this is not expected).
  if (round === 4) return false;
  out[slot] = negative ? -x : x;
  return true;
}

/** The exact sign (−1, 0 or 1) of a + b + c, from Two-Sum steps (no overflow assumed). */
function signOfSum(a: number, b: number, c: number): number {
  // a + b = x + y exactly, |y| ≤ ulp(x)/2.
  const x = a + b;
  const bv = x - a;
  const y = a - (x - bv) + (b - bv);
  // Grow the expansion (y, x) by c: components r1, r2, q2 in increasing magnitude.
  const q1 = c + y;
  const yv = q1 - c;
  const r1 = c - (q1 - yv) + (y - yv);
  const q2 = q1 + x;
  const xv = q2 - q1;
  const r2 = q1 - (q2 - xv) + (x - xv);
  const top = q2 !== 0 ? q2 : r2 !== 0 ? r2 : r1;
  return top > 0 ? 1 : top < 0 ? -1 : 0;
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

/**
 * Runs {@link scanCellBytes} once over cells that take its rarer branches (exponents, signs, blank
 * and non-numeric cells, 17-digit values, a carriage return), so that V8 has seen them by the time
 * it compiles the scanner; a branch first taken after that would send the compiled code back to
 * the interpreter and have it compiled again. The values go to a scratch array.
 */
function primeByteScanner(): void {
  const sample = Buffer.from(' 1.5e-7 ,-2.5E+3,+.5,,abc,0.019926150997693796,-0.0035299454618450887,12345678901234567,1e,2.3531073170362536e-7,7\r\n', 'latin1');
  const scratch = new Float64Array(2);
  for (let round = 0; round < 2; round++) {
    for (let start = 0; start < sample.length; ) {
      const end = scanCellBytes(sample, start, sample.length, COMMA, DOT, scratch, 0, 10);
      if (sample[end] !== COMMA) break;
      start = end + 1;
    }
  }
}
primeByteScanner();
