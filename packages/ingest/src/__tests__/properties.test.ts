import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { COMMA, DOT, parseCellReference, scanCell } from '../parseCell.js';
import { createIngestor, ingestText, IngestError } from '../index.js';
import type { IngestOptions, IngestResult } from '../index.js';

// Property-based tests with fixed seeds (repeatable in CI). Inputs are bounded in size, so no run
// can hang; vitest's timeout is the backstop.

const SEED = 20240611;

/** Hex of the IEEE bits, so -0, NaN and every last bit count. */
function bits(x: Float64Array): string {
  return Buffer.from(x.buffer, x.byteOffset, x.byteLength).toString('hex');
}

type Outcome =
  | { ok: true; time: string; channels: Record<string, string>; extra: [string, string][]; dropped: string; kept: number; issues: string[] }
  | { ok: false; code: string; line: number | undefined; column: string | undefined };

function outcome(run: () => IngestResult): Outcome {
  try {
    const { recording } = run();
    return {
      ok: true,
      time: bits(recording.time),
      channels: Object.fromEntries(Object.entries(recording.channels).map(([k, v]) => [k, bits(v)])),
      extra: recording.extra.map((e) => [e.name, bits(e.values)]),
      dropped: JSON.stringify(recording.meta.rowsDropped),
      kept: recording.meta.rowsKept,
      issues: recording.meta.issues.map((i) => `${i.code}@${i.line ?? ''}`),
    };
  } catch (e) {
    if (!(e instanceof IngestError)) throw e;
    return { ok: false, code: e.code, line: e.line, column: e.column };
  }
}

/** Number spellings a bench tool may write, including the odd ones Number() accepts. */
const numberText = fc.oneof(
  fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }).map((x) => String(x)),
  fc.tuple(fc.double({ noNaN: true, min: -1e4, max: 1e4 }), fc.integer({ min: 0, max: 12 })).map(([x, d]) => x.toFixed(d)),
  fc.tuple(fc.double({ noNaN: true, min: -1e4, max: 1e4 }), fc.integer({ min: 0, max: 16 })).map(([x, d]) => x.toExponential(d)),
  fc.integer({ min: -1e9, max: 1e9 }).map(String),
  fc.constantFrom('-0', '+3', '.5', '5.', '-.25', '1e5', '1E-5', '007', '0.000', '1.50000000000000000001', '123456789012345678', ' 12 ', '\t7'),
);

const junkText = fc.constantFrom('', ' ', 'x', 'NaN', 'nan', 'Infinity', '-inf', '1e999', '0x1A', '1_000', '1.2.3', '--1', '1e', 'e5', '.', '+', '١٢', '\u00a01', '1,5', '1;5');

describe('the cell parser equals Number(cell.trim()) bit for bit', () => {
  it('for numeric spellings and junk, with either decimal separator', () => {
    fc.assert(
      fc.property(fc.oneof(numberText, junkText, fc.string({ maxLength: 12 })), fc.boolean(), (cell, comma) => {
        const decimal = comma ? COMMA : DOT;
        const text = comma ? cell.replace(/\./g, ',') : cell;
        const want = parseCellReference(text, decimal);
        const out = new Float64Array(1);
        // As papaparse cells are read: the whole string, no delimiter.
        expect(scanCell(text, 0, text.length, -1, decimal, out, 0)).toBe(text.length);
        expect(Object.is(out[0], want)).toBe(true);
        // As the fast scanner reads them: up to the delimiter.
        const end = scanCell(text, 0, text.length, comma ? 59 : 44, decimal, out, 0);
        const delimiterInCell = text.includes(comma ? ';' : ',');
        if (!delimiterInCell) {
          expect(end).toBe(text.length);
          expect(Object.is(out[0], want)).toBe(true);
        }
        // The reference itself is Number() on the trimmed text, blank cells excepted.
        if (text.trim() !== '') expect(Object.is(want, Number((comma ? text.replace(/,/g, '.') : text).trim()))).toBe(true);
      }),
      { seed: SEED, numRuns: 3000 },
    );
  });

  it('for 15 to 17 significant digits, around 2⁵³ where the exact fast path ends', () => {
    // Digit strings of 15–17 digits near 2⁵³ = 9007199254740992, with a decimal point, sign,
    // exponent and padding placed at random.
    const near = fc.oneof(
      fc.bigInt({ min: 9007199254740000n, max: 9007199254742000n }),
      fc.bigInt({ min: 100000000000000n, max: 99999999999999999n }),
    );
    fc.assert(
      fc.property(near, fc.integer({ min: 0, max: 17 }), fc.integer({ min: -30, max: 30 }), fc.boolean(), fc.boolean(), fc.boolean(), (m, point, exp, negative, withExp, pad) => {
        const digits = m.toString();
        const p = Math.min(point, digits.length);
        const body = p === 0 ? digits : `${digits.slice(0, p)}.${digits.slice(p)}`;
        const cell = `${pad ? ' ' : ''}${negative ? '-' : ''}${body}${withExp ? `e${exp}` : ''}${pad ? ' ' : ''}`;
        const out = new Float64Array(1);
        const line = `${cell},1`;
        expect(scanCell(line, 0, line.length, 44, DOT, out, 0)).toBe(cell.length);
        expect(Object.is(out[0], Number(cell.trim()))).toBe(true);
      }),
      { seed: SEED, numRuns: 5000 },
    );
  });

  it('inside a row, stopping at the delimiter', () => {
    fc.assert(
      fc.property(fc.array(fc.oneof(numberText, junkText), { minLength: 1, maxLength: 6 }), (cells) => {
        const clean = cells.map((c) => c.replace(/[,;\n\r]/g, ''));
        const line = clean.join(',');
        const out = new Float64Array(1);
        let start = 0;
        for (const cell of clean) {
          const end = scanCell(line, start, line.length, 44, DOT, out, 0);
          expect(end).toBe(start + cell.length);
          expect(Object.is(out[0], parseCellReference(cell, DOT))).toBe(true);
          start = end + 1;
        }
      }),
      { seed: SEED, numRuns: 1000 },
    );
  });
});

interface Table {
  text: string;
  quoted: boolean;
}

const dialect = fc.record({
  delimiter: fc.constantFrom(',', ';', '\t'),
  comma: fc.boolean(),
  crlf: fc.boolean(),
  bom: fc.boolean(),
  comments: fc.integer({ min: 0, max: 2 }),
  trailingBlank: fc.integer({ min: 0, max: 2 }),
  quoting: fc.constantFrom('none', 'none', 'header', 'cells'),
});

const tableArb = fc
  .tuple(
    dialect,
    fc.subarray(['voltage [V]', 'current [mA]', 'speed [rpm]', 'temp [°C]', 'aux'], { minLength: 1 }),
    fc.array(fc.double({ min: 1e-6, max: 10, noNaN: true }), { minLength: 3, maxLength: 30 }),
    fc.constantFrom('toString', 'toFixed', 'toExponential'),
    fc.array(fc.array(fc.oneof({ weight: 8, arbitrary: numberText }, { weight: 1, arbitrary: junkText }), { minLength: 5, maxLength: 5 }), { minLength: 30, maxLength: 30 }),
    fc.array(fc.nat(99), { maxLength: 4 }),
  )
  .map(([d, cols, steps, timeFormat, cells, quoteAt]): Table => {
    const delimiter = d.delimiter;
    const comma = d.comma && delimiter !== ',';
    const eol = d.crlf ? '\r\n' : '\n';
    const q = (s: string, force: boolean): string => (force ? `"${s.replace(/"/g, '""')}"` : s);
    const header = ['time [s]', ...cols].map((h) => q(h, d.quoting === 'header')).join(delimiter);
    const lines: string[] = [];
    for (let k = 0; k < d.comments; k++) lines.push(k % 2 ? '// comment' : '# comment');
    lines.push(header);
    let t = 0;
    steps.forEach((dt, k) => {
      t += dt;
      const time = timeFormat === 'toFixed' ? t.toFixed(4) : timeFormat === 'toExponential' ? t.toExponential(6) : String(t);
      const row = [time, ...cols.map((_, c) => cells[k]![c]!)].map((cell) => {
        const s = (comma ? cell.replace(/\./g, ',') : cell).replace(/[\r\n"]/g, '').split(delimiter).join('');
        return q(s, d.quoting === 'cells' && quoteAt.includes(k));
      });
      lines.push(row.join(delimiter));
    });
    for (let k = 0; k < d.trailingBlank; k++) lines.push('');
    return { text: (d.bom ? '\uFEFF' : '') + lines.join(eol) + eol, quoted: d.quoting !== 'none' };
  });

describe('the fast scanner and the papaparse path give bit-identical recordings', () => {
  it('on random numeric tables in random dialects', () => {
    fc.assert(
      fc.property(tableArb, ({ text, quoted }) => {
        const fast = outcome(() => ingestText(text));
        const papa = outcome(() => ingestText(text, { engine: 'papaparse' }));
        expect(fast).toEqual(papa);
        if (fast.ok && !quoted) expect(ingestText(text).recording.meta.dialect.bodyParser).toBe('fast');
      }),
      { seed: SEED, numRuns: 400 },
    );
  });

  it('on tables long enough to stream, cut into random chunks of bytes or text', () => {
    fc.assert(
      fc.property(tableArb, fc.array(fc.integer({ min: 1, max: 40000 }), { minLength: 1, maxLength: 8 }), fc.boolean(), ({ text }, cuts, asBytes) => {
        // Repeat the body (with rising time) until the text is beyond the 64 KiB head.
        const eol = text.includes('\r\n') ? '\r\n' : '\n';
        const lines = text.split(eol);
        const headerAt = lines.findIndex((l) => !l.startsWith('#') && !l.startsWith('//') && l.replace('\uFEFF', '') !== '');
        const body = lines.slice(headerAt + 1).filter((l) => l !== '');
        const parts = lines.slice(0, headerAt + 1);
        for (let rep = 0; parts.join(eol).length < 100_000; rep++) {
          for (const row of body) parts.push(row.replace(/^"?[^,;\t"]*/, (m) => (m.startsWith('"') ? `"${rep + 1}${m.slice(1)}` : `${rep + 1}${m}`)));
        }
        const big = parts.join(eol) + eol;
        const whole = outcome(() => ingestText(big));
        const papa = outcome(() => ingestText(big, { engine: 'papaparse' }));
        expect(whole).toEqual(papa);
        const chunked = outcome(() => {
          const ing = createIngestor();
          const data: Uint8Array | string = asBytes ? new TextEncoder().encode(big) : big;
          let at = 0;
          for (const cut of cuts) {
            const next = Math.min(data.length, at + cut);
            ing.push(data.slice(at, next));
            at = next;
          }
          if (at < data.length) ing.push(data.slice(at));
          return ing.finish();
        });
        expect(chunked).toEqual(whole);
      }),
      { seed: SEED, numRuns: 25 },
    );
  });
});

describe('no input makes ingest throw anything but an IngestError', () => {
  const check = (run: () => unknown): void => {
    try {
      run();
    } catch (e) {
      if (!(e instanceof IngestError)) throw e;
    }
  };

  it('random bytes (up to 2 KiB)', () => {
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 2048 }), (bytes) => {
        check(() => {
          const ing = createIngestor();
          ing.push(bytes);
          return ing.finish();
        });
      }),
      { seed: SEED, numRuns: 500 },
    );
  });

  it('random text (up to 2000 characters)', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 2000, unit: 'binary' }), (text) => check(() => ingestText(text))),
      { seed: SEED, numRuns: 500 },
    );
  });

  it('randomly mutated valid CSVs', () => {
    const mutation = fc.tuple(fc.nat(), fc.constantFrom('delete', 'insert', 'replace', 'duplicate-line', 'swap-lines'), fc.constantFrom(',', ';', '\t', '"', '\n', '\r', '#', 'x', '-', '.', ' ', '[', ']', '\u0000', '\uFEFF', 'é'));
    fc.assert(
      fc.property(tableArb, fc.array(mutation, { minLength: 1, maxLength: 6 }), fc.constantFrom<IngestOptions>({}, { engine: 'papaparse' }, { maxLineLength: 64 }), ({ text }, mutations, options) => {
        let s = text;
        for (const [pos, kind, ch] of mutations) {
          const i = s.length ? pos % s.length : 0;
          if (kind === 'delete') s = s.slice(0, i) + s.slice(i + 1);
          else if (kind === 'insert') s = s.slice(0, i) + ch + s.slice(i);
          else if (kind === 'replace') s = s.slice(0, i) + ch + s.slice(i + 1);
          else {
            const lines = s.split('\n');
            const a = pos % lines.length;
            if (kind === 'duplicate-line') lines.splice(a, 0, lines[a]!);
            else [lines[a], lines[lines.length - 1 - a]] = [lines[lines.length - 1 - a]!, lines[a]!];
            s = lines.join('\n');
          }
        }
        check(() => ingestText(s, options));
      }),
      { seed: SEED, numRuns: 500 },
    );
  });
});
