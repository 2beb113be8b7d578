import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { COMMA, DOT, parseCellReference, scanCellBytes } from '../parseCell.js';
import { rowKernelUse, scanRowsOf, setRowKernel } from '../scanRows.js';
import { createIngestor } from '../index.js';
import type { IngestResult } from '../index.js';

// The WebAssembly row kernel (scanRows.wat) must read every cell it reads exactly as the
// JavaScript byte scanner does (and as Number() does), and an ingestor that uses it must give the
// same recording, drops, issues and errors, bit for bit, as one that does not. Fixed seeds keep
// the property runs repeatable.

const SEED = 20261204;

/** Doubles printed as JavaScript, C and loggers print them. */
const printedNumber = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => String(x)),
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e4, max: 1e4 }).map((x) => String(x)),
  fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), fc.integer({ min: 1, max: 21 })).map(([x, p]) => x.toPrecision(p)),
  fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 20 })).map(([x, d]) => x.toExponential(d)),
  fc.tuple(fc.double({ noNaN: true, min: -1e3, max: 1e3 }), fc.integer({ min: 0, max: 24 })).map(([x, d]) => x.toFixed(d)),
  fc.integer({ min: -1e9, max: 1e9 }).map(String),
  fc.bigInt({ min: 9007199254740000n, max: 99999999999999999n }).map((n) => `${n}`),
  fc.tuple(fc.bigInt({ min: 9007199254740992n, max: 99999999999999999n }), fc.integer({ min: 1, max: 24 })).map(([n, j]) => `${n}e-${j}`),
);

/** Cells that take the rarer branches, or that the kernel must leave to the JavaScript scanner. */
const oddCell = fc.constantFrom(
  '', ' ', '\t', 'abc', 'n/a', 'NaN', '-Infinity', 'Infinity', '1e999', '-1e-999', '0x1A', '1.2.3', '1e', 'e5', '.', '+', '-', '+-1', '--1',
  '9007199254740993', '9007199254740993.0', '4503599627370497.5', '9007199254740995.0', '0.9007199254740993', '-9007199254740993',
  '123456789012345678', '0.12345678901234567890123456789', '1'.repeat(40), `0.${'0'.repeat(30)}1`, `${'9'.repeat(25)}.5`,
  '1.50000000000000000001', '100000000000000000000000', '0.0000000000000000000000001', '1e22', '1e23', '1e-22', '1e-23',
  '1e0001', '1e10000', '1E+0308', '2.2250738585072014e-308', '4.9e-324', '1.7976931348623157e308', '-0', '-0.0', '+0', '000', '007.5',
  '.5', '-.25', '5.', '0.019926150997693796', '-0.0035299454618450887', '0.00030000000000000003', '2.3531073170362536e-7',
  '12345678901234567e-22', '12345678901234567e-23', '99999999999999999e-22', '1,5', '1;5', '1 5', '"4"',
  // Bytes next to the digits ('/' below '0', ':' above '9'), where eight digits are tested at once.
  '12345678:12345678', '0.12345678/1234', '1234567/', '0.:12345678', '123456789.1234567:', '98765432/1e3',
);

/** A number of the size logged channels have, printed in one of the usual ways. */
const moderateNumber = fc
  .tuple(
    // A ratio of integers: mostly of a size channels have, and with all 16–17 digits when printed shortest.
    fc.integer({ min: -250_000_000, max: 1_000_000_000 }),
    fc.integer({ min: 1, max: 1_000_000 }),
    fc.constantFrom('shortest', 'shortest', 'fixed', 'precision', 'exponential'),
    fc.integer({ min: 1, max: 17 }),
  )
  .map(([a, b, form, d]) => {
    const x = a / b;
    return form === 'shortest' ? String(x) : form === 'fixed' ? x.toFixed(d) : form === 'precision' ? x.toPrecision(d) : x.toExponential(d);
  });

/** A cell: a number with blanks and a '+' around it, or an odd one. */
const cellText = fc.oneof(
  { weight: 6, arbitrary: fc.tuple(printedNumber, fc.constantFrom('', '', '+'), fc.constantFrom('', '', ' ', '\t', '  '), fc.constantFrom('', '', ' ', '\t', '\r', ' \r')).map(([n, plus, lead, trail]) => lead + (plus && !n.startsWith('-') ? plus : '') + n + trail) },
  { weight: 1, arbitrary: oddCell },
);

/** Byte offsets of the lines of `bytes` (each ends with `newline`). */
function lineStarts(bytes: Buffer, newline: number): number[] {
  const starts: number[] = [];
  for (let at = 0; at < bytes.length; at = bytes.indexOf(newline, at) + 1) starts.push(at);
  return starts;
}

describe('the row kernel reads cells as scanCellBytes and Number() do', () => {
  it('is available here (otherwise the comparisons below would compare the scanner with itself)', () => {
    const bytes = Buffer.from('1,2.5\n-3e-2, 0.019926150997693796\nx,1\n');
    const rows = scanRowsOf(bytes, 0, bytes.length, 2, 44, DOT, 10, 1000);
    expect(rows).toEqual([[1, 2.5], [-3e-2, 0.019926150997693796], null]);
  });

  for (const [name, delimiter, decimal] of [['comma', 44, DOT], ['semicolon with a decimal comma', 59, COMMA], ['tab', 9, DOT]] as const) {
    for (const newline of [10, 13]) {
      it(`on random cells, ${name}, newline ${newline === 10 ? 'LF' : 'CR'}`, () => {
        fc.assert(
          fc.property(fc.array(fc.array(cellText, { minLength: 1, maxLength: 4 }), { minLength: 1, maxLength: 40 }), fc.integer({ min: 1, max: 4 }), (lines, nCols) => {
            const fix = (cell: string): string => {
              let c = decimal === COMMA ? cell.replaceAll('.', ',') : cell;
              if (newline === 13) c = c.replaceAll('\r', ' ');
              return c.replaceAll(String.fromCharCode(delimiter), ' ');
            };
            const cellsOf = lines.map((cells) => cells.map(fix));
            const text = cellsOf.map((cells) => cells.join(String.fromCharCode(delimiter)) + String.fromCharCode(newline)).join('');
            const bytes = Buffer.from(text, 'latin1');
            const maxLine = 200;
            const rows = scanRowsOf(bytes, 0, bytes.length, nCols, delimiter, decimal, newline, maxLine)!;
            expect(rows.length).toBe(lines.length);
            const starts = lineStarts(bytes, newline);
            rows.forEach((row, k) => {
              const cells = cellsOf[k]!;
              const plain = cells.length === nCols && cells.every((c) => /^[ \t]*[+-]?\d{1,8}(\.\d{0,6})?[ \t]*$/.test(decimal === COMMA ? c.replace(',', '.') : c));
              if (plain && (starts[k + 1] ?? bytes.length) - starts[k]! - 1 <= maxLine) expect(row, JSON.stringify(cells)).not.toBeNull();
              // A line of one blank cell is a blank line, not a row: left to the scanner.
              if (cells.length === 1 && cells[0]!.trim() === '') expect(row).toBeNull();
              if (row === null) return;
              // A line the kernel reads has nCols cells, each a number that scanCellBytes reads the
              // same, and perhaps blank cells after them.
              expect(cells.length).toBeGreaterThanOrEqual(nCols);
              for (const cell of cells.slice(nCols)) expect(cell.trim(), JSON.stringify(cells)).toBe('');
              const out = new Float64Array(1);
              let at = starts[k]!;
              cells.slice(0, nCols).forEach((cell, c) => {
                const end = scanCellBytes(bytes, at, bytes.length, delimiter, decimal, out, 0, newline);
                expect(end).toBe(at + cell.length);
                expect(Object.is(row[c], out[0]), `${JSON.stringify(cell)} → ${row[c]}, scanner ${out[0]}`).toBe(true);
                expect(Object.is(row[c], parseCellReference(cell, decimal)), JSON.stringify(cell)).toBe(true);
                at = end + 1;
              });
            });
          }),
          { seed: SEED, numRuns: 600 },
        );
      });
    }
  }

  it('on shortest round-trip doubles, which it reads itself (none left to the scanner)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, noDefaultInfinity: true, min: 1e-5, max: 1e7 }), { minLength: 3, maxLength: 300 }), (xs) => {
        const signed = xs.map((x, k) => (k % 3 === 1 ? -x : x));
        const text = signed.map(String).join('\n') + '\n';
        const rows = scanRowsOf(Buffer.from(text, 'latin1'), 0, text.length, 1, 44, DOT, 10, 1000)!;
        expect(rows.length).toBe(signed.length);
        rows.forEach((row, k) => {
          expect(row).not.toBeNull();
          expect(Object.is(row![0], signed[k]), String(signed[k])).toBe(true);
        });
      }),
      { seed: SEED, numRuns: 300 },
    );
  });

  it('at halfway cases and next to the midpoints between doubles', () => {
    const cells = ['9007199254740993', '9007199254740993.0', '4503599627370497.5', '9007199254740995.0', '9007199254740994.9999', '9007199254740993.00001'];
    const bits = new Float64Array(1);
    const words = new BigUint64Array(bits.buffer);
    for (let k = 0; k < 4000; k++) {
      // 17-digit decimals around the midpoint above x, for x spread over [1e-6, 1e15].
      bits[0] = 1e-6 * 1e21 ** (((k * 2654435761) % 4000) / 4000);
      const b = words[0]!;
      const mantissa = (b & ((1n << 52n) - 1n)) | (1n << 52n);
      const e2 = Number((b >> 52n) & 0x7ffn) - 1075;
      // The midpoint (2·mantissa + 1) · 2^(e2 − 1), printed to 40 digits and cut to 17 (± one unit).
      const mid = e2 - 1 >= 0 ? (2n * mantissa + 1n) << BigInt(e2 - 1) : null;
      const text = mid !== null ? mid.toString() : ((2n * mantissa + 1n) * 10n ** 60n / (1n << BigInt(1 - e2))).toString();
      const digits = BigInt(text.slice(0, 17)) + BigInt((k % 3) - 1);
      const pointAt = mid !== null ? text.length : text.length - 60;
      const exponent = pointAt - 17;
      cells.push(`${digits}e${exponent}`);
    }
    const text = cells.join('\n') + '\n';
    const rows = scanRowsOf(Buffer.from(text, 'latin1'), 0, text.length, 1, 44, DOT, 10, 1000)!;
    let read = 0;
    rows.forEach((row, k) => {
      if (row === null) return;
      read++;
      expect(Object.is(row[0], Number(cells[k])), cells[k]).toBe(true);
    });
    // The exact ties go to Number(); the near-midpoint values are read by the kernel.
    expect(rows.slice(0, 4)).toEqual([null, null, null, null]);
    expect(read).toBeGreaterThan(3900);
  });

  it('leaves over-long lines to the scanner', () => {
    const text = `1,2\n${' '.repeat(62)}3,4\n5,6\n`;
    expect(scanRowsOf(Buffer.from(text), 0, text.length, 2, 44, DOT, 10, 64)).toEqual([[1, 2], null, [5, 6]]);
    expect(scanRowsOf(Buffer.from(text), 0, text.length, 2, 44, DOT, 10, 65)).toEqual([[1, 2], [3, 4], [5, 6]]);
  });
});

// ---- whole files ---------------------------------------------------------------------------

/** Everything in a result, values as IEEE bits. */
function summary(result: IngestResult): unknown {
  const r = result.recording;
  const hex = (x: Float64Array): string => Buffer.from(x.buffer, x.byteOffset, x.byteLength).toString('hex');
  return {
    time: hex(r.time),
    channels: Object.fromEntries(Object.entries(r.channels).map(([k, v]) => [k, hex(v)])),
    spread: Object.fromEntries(Object.entries(r.spread).map(([k, v]) => [k, hex(v!)])),
    extra: r.extra.map((e) => [e.name, e.reason, hex(e.values)]),
    meta: r.meta,
    issues: result.issues,
  };
}

/** The summary of reading `bytes` (pushed in pieces of the given sizes, cycled), or the error. */
function read(bytes: Buffer, sizes: number[], kernel: boolean): unknown {
  setRowKernel(kernel);
  try {
    const ing = createIngestor({ fileName: 'k.csv', sizeHint: bytes.length, maxLineLength: 1000 });
    for (let at = 0, k = 0; at < bytes.length; k++) {
      const next = Math.min(bytes.length, at + sizes[k % sizes.length]!);
      ing.push(bytes.subarray(at, next));
      at = next;
    }
    return summary(ing.finish());
  } catch (e) {
    const error = e as { name: string; code: string; file: string; line: number; column: string; message: string };
    return { name: error.name, code: error.code, file: error.file, line: error.line, column: error.column, message: error.message };
  } finally {
    setRowKernel(true);
  }
}

describe('an ingestor reads the same with the row kernel as without it', () => {
  afterEach(() => setRowKernel(true));

  it('for files whose lines it mostly leaves to the JavaScript scanner, or all of them', () => {
    const lines = ['time [s],voltage [V],current [A],note'];
    for (let k = 0; k < 20_000; k++) {
      const t = (k + 1) / 1000;
      // From line 5000 on, text in the note on every other line, and blank notes; a trailing delimiter on some lines.
      const note = k < 5000 || k % 7 === 0 ? String(k % 13) : k % 2 === 0 ? 'n/a' : '';
      lines.push(`${t},${k % 3 === 0 ? 12 : 0},${Math.sin(k) / 3},${note}${k % 5 === 0 ? ',' : ''}`);
    }
    const bytes = Buffer.from(lines.join('\n') + '\n', 'latin1');
    for (const sizes of [[1 << 20], [65536, 7000], [100_000, 3]]) {
      const before = rowKernelUse.lines;
      const want = read(bytes, sizes, false);
      expect(read(bytes, sizes, true)).toEqual(want);
      expect(rowKernelUse.lines - before).toBeGreaterThan(4000);
      // In one chunk, the JavaScript scanner takes over once a quarter of the lines read are left to it
      // (the kernel alone would keep 5000 + 15000 · (1/7 + 6/7 · 1/2) ≈ 13570 lines).
      if (sizes.length === 1) expect(rowKernelUse.lines - before).toBeLessThan(10_000);
      expect((want as { meta: { rowsKept: number } }).meta.rowsKept).toBe(20_000);
    }
  });

  /** A row of the random files: its time step and its other cells. */
  const row = fc.record({
    step: fc.oneof({ weight: 400, arbitrary: fc.double({ min: 0.01, max: 2, noNaN: true }) }, { weight: 12, arbitrary: fc.constant(0) }, { weight: 1, arbitrary: fc.constant(-1) }),
    timeForm: fc.oneof({ weight: 20, arbitrary: fc.constant('plain') }, { weight: 1, arbitrary: fc.constantFrom('exp', 'fixed', 'odd') }),
    cells: fc.array(fc.oneof({ weight: 6, arbitrary: moderateNumber }, { weight: 1, arbitrary: cellText }), { minLength: 6, maxLength: 6 }),
    shape: fc.oneof(
      { weight: 600, arbitrary: fc.constant('row') },
      { weight: 15, arbitrary: fc.constantFrom('blank', 'comment', 'surplus', 'surplusText', 'short') },
      { weight: 1, arbitrary: fc.constant('long') },
    ),
  });

  for (const [name, delimiter, decimal, eol] of [['comma, LF', ',', '.', '\n'], ['comma, CRLF', ',', '.', '\r\n'], ['semicolon with a decimal comma', ';', ',', '\n'], ['tab', '\t', '.', '\n']] as const) {
    it(`on random files with artefacts (${name})`, () => {
      const before = rowKernelUse.lines;
      let lastError = '';
      fc.assert(
        fc.property(fc.array(row, { minLength: 20, maxLength: 300, size: 'max' }), fc.integer({ min: 0, max: 400 }), fc.constantFrom([1 << 20], [65536, 4096], [70_000, 333, 5000]), (rows, at, sizes) => {
          const header = ['time [ms]', 'voltage [V]', 'current [mA]', 'temperature [C]', 'speed [rpm]', 'speed_sd [rpm]', 'note'].join(delimiter);
          const lines = [header];
          const localise = (cell: string): string => (decimal === ',' ? cell.replaceAll('.', ',') : cell);
          const plainRow = (t: number): string => [String(t), '12', String(t % 7), '25.5', String(t * 3), '0.5', '1'].map(localise).join(delimiter);
          let t = 0;
          // Plain rows around the random ones, so that the file is read by the byte path (after a 64 KiB head).
          for (let k = 0; k < at; k++) lines.push(plainRow((t += 0.25)));
          for (const r of rows) {
            t = r.step === -1 ? t - 0.5 : t + r.step;
            const time = r.timeForm === 'exp' ? t.toExponential(12) : r.timeForm === 'fixed' ? t.toFixed(3) : r.timeForm === 'odd' ? `+${t} ` : String(t);
            let cells = [time, ...r.cells].map(localise);
            if (delimiter === '\t') cells = cells.map((c) => c.replaceAll('\t', ' '));
            if (delimiter === ',' && decimal === '.') cells = cells.map((c) => c.replaceAll(',', '.'));
            if (delimiter === ';') cells = cells.map((c) => c.replaceAll(';', ','));
            cells = cells.map((c) => c.replaceAll('"', "'"));
            if (eol === '\n') cells = cells.map((c) => c.replaceAll('\r', ' '));
            let line = cells.join(delimiter);
            if (r.shape === 'blank') line = '';
            else if (r.shape === 'comment') line = '# ' + line;
            else if (r.shape === 'surplus') line += delimiter;
            else if (r.shape === 'surplusText') line += delimiter + 'x';
            else if (r.shape === 'short') line = cells.slice(0, 6).join(delimiter);
            else if (r.shape === 'long') line += ' '.repeat(1100);
            lines.push(line);
          }
          for (let k = 0; lines.length < 2000 + at; k++) lines.push(plainRow((t += 0.25)));
          const text = lines.join(eol) + eol;
          const bytes = Buffer.from(text, 'latin1');
          expect(bytes.length).toBeGreaterThan(65536);
          const withKernel = read(bytes, [...sizes], true);
          const withoutKernel = read(bytes, [...sizes], false);
          if ('message' in (withoutKernel as object)) lastError = (withoutKernel as { message: string }).message;
          expect(withKernel).toEqual(withoutKernel);
        }),
        { seed: SEED, numRuns: 40 },
      );
      // The kernel did read rows, and some runs ended in an error (so both kinds of outcome were compared).
      expect(rowKernelUse.lines - before).toBeGreaterThan(40 * 500);
      expect(lastError).not.toBe('');
    });
  }
});
