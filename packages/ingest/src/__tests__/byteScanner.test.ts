import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { COMMA, DOT, parseCellReference, roundQuotient, scanCell, scanCellBytes } from '../parseCell.js';
import { createIngestor, ingestText, readRecording } from '../index.js';
import type { IngestResult } from '../index.js';

// The byte scanner (scanCellBytes, used for pure-ASCII chunks) and the exact 16–17 digit quotient
// must give what Number() gives, bit for bit, and the ingestor must give the same recording, drops
// and issues whichever path reads a row. Fixed seeds keep the property runs repeatable.

const SEED = 20261204;

/** Logger-style artefacts, each read as one cell. */
const ARTEFACTS = [
  '1.5e3', '2.5E-3', '-7.25e+2', '6e0', '1e-7', '2.3531073170362536e-7',
  '+2.5', '+0', '.5', '-.25', '5.', '-0', '-0.0', '0', '000', '007.5',
  '3.25   ', '  3.25', '\t4', '7\r', '8 \r',
  '"4.5"', 'abc', 'n/a', 'NaN', '-Infinity', '1e999', '0x1A', '1.2.3', '1e', 'e5', '.', '+', '-', '',
  '0.019926150997693796', '-0.0035299454618450887', '0.00030000000000000003', '12345678901234567', '1234567890123456.7',
  '9007199254740993', '9007199254740993.0', '4503599627370497.5', '9007199254740995.0', '0.9007199254740993',
  '99999999999999999e-22', '12345678901234567e-22', '12345678901234567e-23', '1.2345678901234567e-5',
  '123456789012345678', '0.12345678901234567890123456789', '1'.repeat(40), `0.${'0'.repeat(30)}1`, `${'9'.repeat(25)}.5`,
  '1.50000000000000000001', '100000000000000000000000', '0.0000000000000000000000001',
];

function bytesOf(s: string): Buffer {
  return Buffer.from(s, 'latin1');
}

/** Reads `cell` with the byte scanner in both modes (line end given, and found from the newline). */
function readBytes(cell: string, delimiter: number, decimal: number): { value: number; end: number; valueNl: number; endNl: number } {
  const out = new Float64Array(2);
  const alone = bytesOf(cell);
  const end = scanCellBytes(alone, 0, alone.length, delimiter, decimal, out, 0);
  const withNl = bytesOf(`${cell}\n9,9\n`);
  const endNl = scanCellBytes(withNl, 0, withNl.length, delimiter, decimal, out, 1, 10);
  return { value: out[0]!, end, valueNl: out[1]!, endNl };
}

describe('scanCellBytes equals the string scanner and Number(cell.trim())', () => {
  it('on logger-style artefacts', () => {
    for (const cell of ARTEFACTS) {
      const want = parseCellReference(cell, DOT);
      if (cell.trim() !== '') expect(Object.is(want, Number(cell.trim())), cell).toBe(true);
      const out = new Float64Array(1);
      expect(scanCell(cell, 0, cell.length, 44, DOT, out, 0), cell).toBe(cell.length);
      expect(Object.is(out[0], want), cell).toBe(true);
      const got = readBytes(cell, 44, DOT);
      expect(got.end, cell).toBe(cell.length);
      expect(got.endNl, cell).toBe(cell.length);
      expect(Object.is(got.value, want), `${cell} → ${got.value}, want ${want}`).toBe(true);
      expect(Object.is(got.valueNl, want), `${cell} → ${got.valueNl}, want ${want}`).toBe(true);
    }
  });

  it('with a decimal comma', () => {
    for (const cell of ['1,5', '-0,25', ',5', '0,019926150997693796', '1,5e3', '1.5', '+3,0 ']) {
      const want = parseCellReference(cell, COMMA);
      expect(Object.is(want, Number(cell.trim().replace(',', '.'))), cell).toBe(true);
      const got = readBytes(cell, 59, COMMA);
      expect(got.end, cell).toBe(cell.length);
      expect(Object.is(got.value, want), cell).toBe(true);
      expect(Object.is(got.valueNl, want), cell).toBe(true);
    }
  });

  it('ends each cell at the delimiter, and at the newline when asked to find it', () => {
    const line = bytesOf(' 1.5 ,-0.019926150997693796,abc,,7\r\n8,9\n');
    const out = new Float64Array(5);
    const ends: number[] = [];
    let start = 0;
    for (let c = 0; c < 5; c++) {
      const end = scanCellBytes(line, start, line.length, 44, DOT, out, c, 10);
      ends.push(end);
      start = end + 1;
    }
    expect(ends).toEqual([5, 27, 31, 32, 35]);
    expect(line[35]).toBe(10);
    expect(Array.from(out)).toEqual([1.5, -0.019926150997693796, Number.NaN, Number.NaN, 7]);
    // With '\r' as the newline, a carriage return ends the line instead of being a trailing blank.
    const mac = bytesOf('7\r8\r');
    expect(scanCellBytes(mac, 0, mac.length, 44, DOT, out, 0, 13)).toBe(1);
    expect(out[0]).toBe(7);
  });

  it('on random doubles as JavaScript, C and loggers print them', () => {
    const printed = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => String(x)),
      fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), fc.integer({ min: 1, max: 21 })).map(([x, p]) => x.toPrecision(p)),
      fc.tuple(fc.double({ noNaN: true, noDefaultInfinity: true }), fc.integer({ min: 0, max: 20 })).map(([x, d]) => x.toExponential(d)),
      fc.tuple(fc.double({ noNaN: true, min: -1e3, max: 1e3 }), fc.integer({ min: 0, max: 24 })).map(([x, d]) => x.toFixed(d)),
    );
    fc.assert(
      fc.property(printed, fc.constantFrom('', ' ', '\t'), fc.constantFrom('', ' ', '\r', ' \r'), (text, lead, trail) => {
        const cell = lead + text + trail;
        const want = Number(text);
        const got = readBytes(cell, 44, DOT);
        expect(got.end).toBe(cell.length);
        expect(Object.is(got.value, want)).toBe(true);
        expect(Object.is(got.valueNl, want)).toBe(true);
      }),
      { seed: SEED, numRuns: 20000 },
    );
  });

  it('on random strings of digits, points, signs, exponents and blanks', () => {
    const chars = fc.constantFrom(...'0123456789012345678900.e-+ \t\rxE'.split(''));
    fc.assert(
      fc.property(fc.array(chars, { minLength: 1, maxLength: 30 }), fc.constantFrom(44, 59, 9), (list, delimiter) => {
        const cell = list.join('');
        const out = new Float64Array(1);
        const endText = scanCell(cell, 0, cell.length, delimiter, DOT, out, 0);
        const want = out[0]!;
        const got = readBytes(cell, delimiter, DOT);
        expect(got.end).toBe(endText);
        expect(Object.is(got.value, want)).toBe(true);
        if (!cell.includes('\n')) {
          expect(got.endNl).toBe(endText);
          expect(Object.is(got.valueNl, want)).toBe(true);
        }
      }),
      { seed: SEED, numRuns: 20000 },
    );
  });
});

describe('roundQuotient gives the correctly rounded 16–17 digit decimal', () => {
  /** The decimal digits (`sig` of them, truncated) and power of ten of num/den. */
  function decimalOf(num: bigint, den: bigint, sig: number): [bigint, number] {
    const lo = 10n ** BigInt(sig - 1);
    const hi = 10n ** BigInt(sig);
    let j = sig - (num.toString().length - den.toString().length) - 1;
    for (;;) {
      const v = j >= 0 ? (num * 10n ** BigInt(j)) / den : num / (den * 10n ** BigInt(-j));
      if (v < lo) j++;
      else if (v >= hi) j--;
      else return [v, j];
    }
  }

  it('next to the midpoints between doubles, where rounding is hardest', () => {
    const bits = new Float64Array(1);
    const words = new BigUint64Array(bits.buffer);
    fc.assert(
      fc.property(fc.double({ min: 1e-6, max: 1e15, noNaN: true }), fc.constantFrom(16, 17), fc.integer({ min: -1, max: 2 }), (x, sig, step) => {
        bits[0] = x;
        const b = words[0]!;
        const mantissa = (b & ((1n << 52n) - 1n)) | (1n << 52n);
        const e2 = Number((b >> 52n) & 0x7ffn) - 1075;
        // The midpoint between x and the next double up: (2·mantissa + 1) · 2^(e2 − 1).
        let num = 2n * mantissa + 1n;
        let den = 1n;
        if (e2 - 1 >= 0) num <<= BigInt(e2 - 1);
        else den <<= BigInt(1 - e2);
        const [d, j] = decimalOf(num, den, sig);
        const digits = (d + BigInt(step)).toString();
        const want = Number(`${digits}e${-j}`);
        const out = new Float64Array(1);
        const cell = `${digits}e${-j}`;
        const end = scanCellBytes(bytesOf(cell), 0, cell.length, 44, DOT, out, 0);
        expect(end).toBe(cell.length);
        expect(Object.is(out[0], want)).toBe(true);
        // roundQuotient itself, where it applies (the digits at least 2⁵³, 1 ≤ j ≤ 22).
        if (BigInt(digits) >= 2n ** 53n && j >= 1 && j <= 22 && digits.length <= 17) {
          const low = Number(BigInt(digits) % 10n ** BigInt(digits.length - 9));
          const top = Number(BigInt(digits) - BigInt(low));
          const q = roundQuotient(top, low, j);
          if (!Number.isNaN(q)) expect(Object.is(q, want)).toBe(true);
        }
      }),
      { seed: SEED, numRuns: 20000 },
    );
  });

  it('leaves exact ties to Number(), which rounds them to even', () => {
    // 2⁵³ + 1 = 9007199254740993.0 and 2⁵² + 0.5 = 4503599627370497.5 lie halfway between two
    // doubles (digits split as top = first 9 digits · 10⁸, low = last 8).
    expect(Number.isNaN(roundQuotient(900719925 * 1e8, 47409930, 1))).toBe(true);
    expect(Number.isNaN(roundQuotient(450359962 * 1e8, 73704975, 1))).toBe(true);
    // One digit off a tie is not a tie.
    expect(roundQuotient(900719925 * 1e8, 47409931, 1)).toBe(9007199254740994);
    expect(roundQuotient(900719925 * 1e8, 47409929, 1)).toBe(9007199254740992);
    for (const cell of ['9007199254740993.0', '4503599627370497.5', '9007199254740995.0']) {
      const out = new Float64Array(1);
      scanCellBytes(bytesOf(cell), 0, cell.length, 44, DOT, out, 0);
      expect(Object.is(out[0], Number(cell)), cell).toBe(true);
    }
  });

  it('agrees with Number() on typical 17-digit values', () => {
    // 0.019926150997693796 = 19926150997693796 / 10¹⁸.
    expect(roundQuotient(199261509 * 1e8, 97693796, 18)).toBe(0.019926150997693796);
    expect(roundQuotient(300000000 * 1e8, 3, 20)).toBe(0.00030000000000000003);
  });
});

// ---- whole files ---------------------------------------------------------------------------

/**
 * A comparable summary of a result: values as IEEE bits, drops, issues, source and dialect, less
 * the dialect's `encoding` ('string' for text input) and `bodyParser` (which path read the rows).
 */
function summary(result: IngestResult): unknown {
  const r = result.recording;
  const { encoding: _encoding, bodyParser: _bodyParser, ...dialect } = r.meta.dialect;
  const hex = (x: Float64Array): string => Buffer.from(x.buffer, x.byteOffset, x.byteLength).toString('hex');
  return {
    time: hex(r.time),
    channels: Object.fromEntries(Object.entries(r.channels).map(([k, v]) => [k, hex(v)])),
    extra: r.extra.map((e) => [e.name, hex(e.values)]),
    dropped: r.meta.rowsDropped,
    droppedByReason: r.meta.droppedByReason,
    rowsRead: r.meta.rowsRead,
    issues: r.meta.issues,
    dialect,
    source: r.meta.source,
  };
}

/** Pushes `data` into an ingestor in pieces of the given sizes (cycled), as bytes or as text. */
function pushInPieces(data: Uint8Array | string, sizes: number[], fileName: string): IngestResult {
  const ing = createIngestor({ fileName, sizeHint: data.length });
  let at = 0;
  for (let k = 0; at < data.length; k++) {
    const next = Math.min(data.length, at + sizes[k % sizes.length]!);
    ing.push(data.slice(at, next));
    at = next;
  }
  return ing.finish();
}

/** A logger file with artefacts in its rows; `rows` lines after the header, row `quoteAt` quoted. */
function loggerFile(rows: number, eol: string, quoteAt = -1): string {
  const lines = ['# bench logger, firmware 1.2', 'time [s],voltage [V],current [A],temperature [C]'];
  let t = 0;
  for (let k = 0; k < rows; k++) {
    t += 0.0001;
    const i = Math.sin(k / 7) * 0.05;
    let row = `${t},${k % 50 < 25 ? 12 : 0},${i},${(25 + i).toFixed(3)}`;
    if (k === 5) row = `${t.toExponential(12)},+12,.5,25.0 `;
    if (k === 6) row = `${t},-0,1.5e-3,2.5E1`;
    if (k === 7) row = `${t},12,abc,25`; // non-numeric: dropped with line and column
    if (k === 8) row = `${t},12,${'1'.repeat(30)}e-30,25`; // a very long digit string
    if (k === 9) row = `${t}, 12 ,0.019926150997693796   ,25`;
    if (k === 10) row = '';
    if (k === 11) row = '// a comment';
    if (k === 3000) row = `${t},12,n/a,25`;
    if (k === 3001) row = `${t},12,,25`;
    if (k === 3002) row = `${t},12,1e999,25`;
    if (k === 3003) row = `${t},12,0.5,25,`; // a trailing delimiter
    if (k === 3004) row = `${t},12,0.5`; // too few cells
    if (k === quoteAt) row = `${t},12,"0.25",25`;
    lines.push(row);
  }
  return lines.join(eol) + eol;
}

describe('reading bytes gives what reading text gives', () => {
  for (const eol of ['\n', '\r\n']) {
    const name = eol === '\n' ? 'LF' : 'CRLF';
    it(`for a logger file with artefacts (${name}), in pieces of any size`, () => {
      const text = loggerFile(6000, eol);
      expect(text.length).toBeGreaterThan(200_000);
      const bytes = new TextEncoder().encode(text);
      const want = summary(ingestText(text, { fileName: 'log.csv' }));
      for (const sizes of [[bytes.length], [1 << 20], [65536, 1000, 7], [70000, 3], [100_000, 1, 2, 40_000]]) {
        const fromBytes = pushInPieces(bytes, sizes, 'log.csv');
        expect(summary(fromBytes)).toEqual(want);
        expect(fromBytes.recording.meta.dialect.bodyParser).toBe('fast');
        expect(summary(pushInPieces(text, sizes, 'log.csv'))).toEqual(want);
      }
      const result = ingestText(text, { fileName: 'log.csv' });
      expect(pushInPieces(bytes, [bytes.length], 'log.csv').recording.meta.source.file).toBe('log.csv');
      const dropped = result.recording.meta.rowsDropped;
      // Line numbers count the comment line and the header: data row k is on line k + 3.
      expect(dropped).toContainEqual({ line: 10, reason: 'non-numeric', column: 'current [A]', detail: 'cell "abc"' });
      expect(dropped).toContainEqual({ line: 3003, reason: 'non-numeric', column: 'current [A]', detail: 'cell "n/a"' });
      expect(dropped).toContainEqual({ line: 3004, reason: 'blank-cell', column: 'current [A]', detail: 'blank cell' });
      expect(dropped).toContainEqual({ line: 3005, reason: 'non-finite', column: 'current [A]', detail: 'cell "1e999"' });
      expect(dropped).toContainEqual({ line: 3007, reason: 'column-count', detail: 'expected 4 cells, found 3' });
      const codes = result.issues.map((i) => i.code);
      expect(codes).toEqual(expect.arrayContaining(['rows-dropped', 'blank-line', 'comment-in-body', 'surplus-blank-cells']));
      const current = result.recording.channels.current!;
      const time = result.recording.time;
      const at = (k: number): number => current[Array.from(time).findIndex((x) => Math.abs(x - (k + 1) * 0.0001) < 2e-9)]!;
      expect(at(5)).toBe(0.5);
      expect(at(6)).toBe(1.5e-3);
      expect(at(8)).toBe(Number(`${'1'.repeat(30)}e-30`));
      expect(at(9)).toBe(0.019926150997693796);
    });
  }

  it('for errors thrown from inside a byte chunk, with file, line and column', () => {
    const text = loggerFile(6000, '\n').replace(/\n0\.4\d*,/, (m) => m.replace('0.4', '0.1'));
    const bytes = Buffer.from(text, 'latin1');
    const failure = (run: () => unknown): unknown => {
      try {
        run();
      } catch (e) {
        const error = e as { code: string; file: string; line: number; column: string; message: string };
        return { code: error.code, file: error.file, line: error.line, column: error.column, message: error.message };
      }
      return null;
    };
    const want = failure(() => ingestText(text, { fileName: 'log.csv' }));
    expect(want).toMatchObject({ code: 'time-not-increasing', file: 'log.csv', column: 'time [s]' });
    for (const sizes of [[bytes.length], [65536, 4096], [100_000, 5]]) {
      expect(failure(() => pushInPieces(bytes, sizes, 'log.csv'))).toEqual(want);
    }
  });

  it('for a line longer than maxLineLength inside a byte chunk, and a comment line that is', () => {
    const lines = loggerFile(6000, '\n').split('\n');
    for (const [at, long] of [[3500, `0.35,12,0.5,25${' '.repeat(2000)}`], [4200, `# ${'x'.repeat(2000)}`]] as const) {
      const text = [...lines.slice(0, at), long, ...lines.slice(at + 1)].join('\n');
      const bytes = Buffer.from(text, 'latin1');
      const failure = (run: () => unknown): unknown => {
        try {
          run();
        } catch (e) {
          const error = e as { code: string; line: number; message: string };
          return { code: error.code, line: error.line, message: error.message };
        }
        return null;
      };
      const want = failure(() => ingestText(text, { fileName: 'long.csv', maxLineLength: 1000 }));
      expect(want).toMatchObject({ code: 'line-too-long', line: at + 1 });
      for (const sizes of [[bytes.length], [65536, 4096]]) {
        expect(failure(() => {
          const ing = createIngestor({ fileName: 'long.csv', maxLineLength: 1000 });
          for (let p = 0, k = 0; p < bytes.length; k++) {
            ing.push(bytes.subarray(p, p + sizes[k % sizes.length]!));
            p += sizes[k % sizes.length]!;
          }
          return ing.finish();
        })).toEqual(want);
      }
    }
  });

  it('for a quoted cell, which sends its chunk to papaparse', () => {
    const text = loggerFile(4000, '\n', 2500);
    expect(text).toContain(',"0.25",');
    const bytes = new TextEncoder().encode(text);
    const want = summary(ingestText(text, { fileName: 'q.csv' }));
    for (const sizes of [[bytes.length], [65536, 1000], [80_000]]) {
      expect(summary(pushInPieces(bytes, sizes, 'q.csv'))).toEqual(want);
    }
    expect(['mixed', 'papaparse']).toContain(pushInPieces(bytes, [65536, 1000], 'q.csv').recording.meta.dialect.bodyParser);
  });

  it('for chunks with non-ASCII bytes between ASCII ones, in UTF-8 and in Windows-1252', () => {
    const text = loggerFile(5000, '\n').replace('// a comment', '// Temperatur in °C, Strom in µA');
    const utf8 = new TextEncoder().encode(text);
    const want = summary(ingestText(text, { fileName: 'u.csv' }));
    for (const sizes of [[70_000], [65536, 13], [utf8.length]]) {
      const got = summary(pushInPieces(utf8, sizes, 'u.csv')) as { source: unknown };
      expect(got).toEqual(want);
    }
    // Windows-1252: '°' is one byte 0xB0, not valid UTF-8, so the head is decoded as Windows-1252.
    const latin = Buffer.from(loggerFile(5000, '\n').replace('# bench logger', '# bench logger at 25°C'), 'latin1');
    const asText = latin.toString('latin1');
    const whole = pushInPieces(latin, [latin.length], 'w.csv');
    expect(whole.recording.meta.dialect.encoding).toBe('windows-1252');
    for (const sizes of [[65536, 100], [3, 70_000]]) {
      const got = pushInPieces(latin, sizes, 'w.csv');
      expect(summary(got)).toEqual(summary(whole));
    }
    expect(Array.from(whole.recording.channels.current!)).toEqual(Array.from(ingestText(asText).recording.channels.current!));
  });

  it('when the caller reuses its buffer after each push', () => {
    const bytes = Buffer.from(loggerFile(6000, '\n'), 'latin1');
    const want = summary(pushInPieces(bytes, [bytes.length], 'r.csv'));
    const ing = createIngestor({ fileName: 'r.csv', sizeHint: bytes.length });
    const scratch = Buffer.alloc(50_000);
    for (let at = 0; at < bytes.length; at += scratch.length) {
      const n = bytes.copy(scratch, 0, at, Math.min(bytes.length, at + scratch.length));
      ing.push(n === scratch.length ? scratch : scratch.subarray(0, n));
      scratch.fill(0x7a);
    }
    expect(summary(ing.finish())).toEqual(want);
  });

  it('hands each column over at its length, without a copy when its buffer was sized close to it', () => {
    const bytes = Buffer.from(loggerFile(6000, '\n'), 'latin1');
    const want = summary(pushInPieces(bytes, [bytes.length], 'r.csv'));
    // Sized from the file (a buffer at most a quarter too long: a view of it), and from a hint four
    // times the file (a copy at the column's length: the long buffer is not kept alive).
    for (const [hint, view] of [[bytes.length, true], [4 * bytes.length, false]] as const) {
      const ing = createIngestor({ fileName: 'r.csv', sizeHint: hint });
      ing.push(bytes);
      const got = ing.finish();
      expect(summary(got)).toEqual(want);
      for (const column of [got.recording.time, ...Object.values(got.recording.channels)]) {
        const n = got.recording.time.length;
        expect(column!.length).toBe(n);
        expect(column!.buffer.byteLength > 8 * n).toBe(view);
        expect(column!.buffer.byteLength).toBeLessThanOrEqual(8 * (n + (n >> 2)));
      }
    }
  });
});

describe('readRecording', () => {
  const dir = mkdtempSync(join(tmpdir(), 'motorprint-read-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('gives what ingestText gives for the same file, hash included, over several 1 MiB chunks', async () => {
    const small = loggerFile(3100, '\n');
    const big = loggerFile(60_000, '\r\n');
    expect(big.length).toBeGreaterThan(2 << 20);
    for (const [name, text] of [['small.csv', small], ['big.csv', big]] as const) {
      const path = join(dir, name);
      writeFileSync(path, text);
      const result = await readRecording(path);
      expect(summary(result)).toEqual(summary(ingestText(text, { fileName: path })));
      expect(result.recording.meta.source.bytes).toBe(Buffer.byteLength(text));
      expect(result.recording.meta.dialect.bodyParser).toBe('fast');
    }
  });

  it('reports a file it cannot find', async () => {
    await expect(readRecording(join(dir, 'missing.csv'))).rejects.toMatchObject({ code: 'file-unreadable' });
  });
});

describe('the head check for text that is not a CSV', () => {
  /** The check as a loop over the characters (the reference for the native searches). */
  function reference(text: string): string | null {
    const n = Math.min(text.length, 65536);
    let controls = 0;
    for (let i = 0; i < n; i++) {
      const c = text.charCodeAt(i);
      if (c === 0) return `NUL@${text.slice(0, i).split('\n').length}`;
      if (c < 32 && c !== 9 && c !== 10 && c !== 13 && c !== 12 && c !== 11 && c !== 26) controls++;
    }
    return controls > 0 && controls * 100 > n ? `controls ${controls} of ${n}` : null;
  }

  function actual(text: string): string | null {
    try {
      ingestText(text, { fileName: 'x.csv' });
      return null;
    } catch (e) {
      const error = e as { code?: string; line?: number; message: string };
      if (error.code !== 'not-text') return null;
      if (error.message.includes('NUL')) return `NUL@${error.line}`;
      const m = /\((\d+) control characters in the first (\d+) characters\)/.exec(error.message);
      return m ? `controls ${m[1]} of ${m[2]}` : error.message;
    }
  }

  it('finds NUL characters and counts control characters as a character loop does', () => {
    const body = 'time [s],voltage [V]\n' + Array.from({ length: 4000 }, (_, k) => `${k / 1000},${k % 13}`).join('\n') + '\n';
    const cases = [
      body,
      body.replace('\n2,', '\n2\u0000,'),
      'time [s],v\n0,1\n\u0000\n',
      body + '\u0000',
      body.slice(0, 300) + '\u0001\u0002\u0003'.repeat(10) + body.slice(300),
      body.slice(0, 300) + '\u0007'.repeat(700) + body.slice(300),
      body.slice(0, 300) + '\u001b\u0019\u000e\u0008'.repeat(200) + body.slice(300),
      body.slice(0, 300) + '\u000b\u000c\u001a\t'.repeat(500) + body.slice(300),
      body.slice(0, 300) + '\u0007'.repeat(20) + 'x'.repeat(70000) + '\u0000',
    ];
    for (const text of cases) {
      const want = reference(text);
      if (want !== null) expect(actual(text)).toBe(want);
      else expect(actual(text)).toBeNull();
    }
    expect(cases.map(reference).filter((r) => r !== null).length).toBeGreaterThanOrEqual(4);
  });
});
