import { Papa } from './csvParser.js';
import { IngestError } from './IngestError.js';
import { COMMA, DOT, parseCellReference } from './parseCell.js';
import { isUnitToken } from './units.js';
import type { Dialect, IngestIssue, IngestOptions } from './types.js';

/** What the head of a file settles before the body is read. */
export interface SettledHead {
  dialect: Omit<Dialect, 'encoding' | 'bodyParser'>;
  /** Header cells as papaparse split them (untrimmed). */
  headers: string[];
  /** Cells of a units row directly under the header, or null. */
  unitsRow: string[] | null;
  /** Cells of a short-name row under the units row, or null. */
  shortNames: string[] | null;
  /** Cells of the first body rows (up to 50). */
  sampleRows: string[][];
  /** The line break the body is split on: `\n` (CRLF is read as `\n` plus a trimmed `\r`) or `\r`. */
  newline: '\n' | '\r';
  /** Index in the head text where the body starts (after the header's line break). */
  bodyStart: number;
  /** 1-based line number of the first body line. */
  bodyFirstLine: number;
  /** Mean length of the sampled body lines in characters (for pre-sizing buffers). */
  meanLineLength: number;
  issues: IngestIssue[];
}

const CANDIDATES = ['\t', ';', ','] as const;
const SAMPLE_LINES = 50;
const COMMA_NUMBER = /^\s*[+-]?(\d+,\d*|,\d+)([eE][+-]?\d+)?\s*$/;
const DOT_NUMBER = /^\s*[+-]?(\d+\.\d*|\.\d+)([eE][+-]?\d+)?\s*$/;

const CONTROL = /[\x01-\x08\x0e-\x19\x1b-\x1f]/g;

function isComment(line: string): boolean {
  return line.startsWith('#') || line.startsWith('//');
}

/**
 * Reports text that is not a CSV: NUL characters (binary files, UTF-16 text) or many other control
 * characters.
 */
function checkText(text: string, file: string): void {
  const n = Math.min(text.length, 65536);
  // Native searches rather than a loop over the characters: this runs once per file, before the
  // JIT has compiled anything, where a character loop is slow.
  const nul = text.indexOf('\0');
  if (nul >= 0 && nul < n) {
    throw new IngestError('not-text', file, 'the file contains NUL bytes: it is binary or UTF-16 text, not a UTF-8 CSV', { line: lineAt(text, nul) });
  }
  // Control characters other than tab, line feed, vertical tab, form feed, carriage return and
  // Ctrl-Z (26).
  const controls = (n < text.length ? text.slice(0, n) : text).match(CONTROL)?.length ?? 0;
  if (controls > 0 && controls * 100 > n) {
    throw new IngestError('not-text', file, `the file is not text (${controls} control characters in the first ${n} characters)`);
  }
}

function lineAt(text: string, index: number): number {
  let line = 1;
  for (let i = text.indexOf('\n'); i >= 0 && i < index; i = text.indexOf('\n', i + 1)) line++;
  return line;
}

/**
 * Settles the dialect and the header from the head of a file: BOM, line ending, comment lines
 * (`#`, `//`) and an Excel `sep=` line before the header, the delimiter (papaparse splits the
 * header and up to 50 rows with each of tab, `;` and `,`; the one giving the most rows with the
 * header's cell count wins), and the decimal separator (a comma only for `;`/tab files whose
 * numbers are written `1,5`).
 *
 * @param text - the head of the file as decoded text (BOM included if present)
 * @param final - true when `text` is the whole file
 * @returns the settled head, or `null` when more text is needed to see the whole header line
 * @throws IngestError `empty-file`, `not-text`, `no-header`, `line-too-long`
 */
export function settleDialect(text: string, final: boolean, options: IngestOptions, file: string, maxLineLength: number): SettledHead | null {
  const bom = text.charCodeAt(0) === 0xfeff;
  const start = bom ? 1 : 0;
  if (final && text.slice(start).trim() === '') {
    throw new IngestError('empty-file', file, text.length === 0 ? 'the file is empty' : 'the file holds only blank lines');
  }
  checkText(text, file);

  const firstLf = text.indexOf('\n', start);
  const firstCr = text.indexOf('\r', start);
  let lineEnding: Dialect['lineEnding'] = 'none';
  if (firstCr >= 0 && (firstLf < 0 || firstCr < firstLf)) lineEnding = text.charCodeAt(firstCr + 1) === 10 ? 'CRLF' : 'CR';
  else if (firstLf >= 0) lineEnding = 'LF';
  if (!final && lineEnding === 'none') {
    if (text.length > maxLineLength) throw new IngestError('line-too-long', file, `no line break in the first ${text.length} characters`, { line: 1 });
    return null;
  }
  const newline: '\n' | '\r' = lineEnding === 'CR' ? '\r' : '\n';

  /** Reads the line at `pos`: its text (without `\r` before `\n`) and where the next one starts; null if incomplete. */
  const readLine = (pos: number): { line: string; next: number } | null => {
    const nl = text.indexOf(newline, pos);
    if (nl < 0) {
      if (!final) return null;
      if (pos >= text.length) return null;
      return { line: stripCr(text.slice(pos)), next: text.length };
    }
    return { line: stripCr(text.slice(pos, nl)), next: nl + 1 };
  };

  const comments: string[] = [];
  let commentLines = 0;
  let sepLine = false;
  let sepDelimiter: string | undefined;
  let pos = start;
  let lineNo = 1;
  let header: string | undefined;
  for (;;) {
    const r = readLine(pos);
    if (!r) {
      if (final) throw new IngestError('no-header', file, `no header row: the file holds only ${commentLines ? 'comment and ' : ''}blank lines`);
      if (text.length > 16 * maxLineLength) throw new IngestError('no-header', file, `no header row in the first ${text.length} characters (${commentLines} comment lines)`);
      if (text.length - pos > maxLineLength) throw new IngestError('line-too-long', file, `line ${lineNo} is longer than ${maxLineLength} characters`, { line: lineNo });
      return null;
    }
    const line = r.line;
    pos = r.next;
    if (line.trim() === '') {
      lineNo++;
      continue;
    }
    if (isComment(line)) {
      commentLines++;
      if (comments.length < 20) comments.push(line.slice(0, 200));
      lineNo++;
      continue;
    }
    const sep = /^\s*"?sep=(.)"?\s*$/i.exec(line);
    if (sep && !sepLine) {
      sepLine = true;
      sepDelimiter = sep[1];
      lineNo++;
      continue;
    }
    header = line;
    break;
  }
  const headerLine = lineNo;
  let bodyStart = pos;
  let bodyFirstLine = headerLine + 1;
  // The two lines under the header, whole, for a units row and a short-name row.
  const under1 = readLine(bodyStart);
  if (!under1 && !final) return null;
  const under2 = under1 ? readLine(under1.next) : null;
  if (under1 && !under2 && !final && under1.next < text.length) return null;

  // Sample body lines for delimiter and decimal detection.
  const takeSample = (from: number): { lines: string[]; chars: number } => {
    const lines: string[] = [];
    let chars = 0;
    for (let p = from; lines.length < SAMPLE_LINES; ) {
      const r = readLine(p);
      if (!r) break;
      p = r.next;
      if (r.line.trim() === '' || isComment(r.line)) continue;
      lines.push(r.line);
      chars += r.line.length + 1;
    }
    return { lines, chars };
  };
  let { lines: sample, chars: sampleChars } = takeSample(bodyStart);

  let delimiter: Dialect['delimiter'];
  if (options.delimiter) delimiter = options.delimiter;
  else if (sepDelimiter === ',' || sepDelimiter === ';' || sepDelimiter === '\t') delimiter = sepDelimiter;
  else delimiter = guessDelimiter(header, sample);

  const headers = splitRow(header, delimiter);
  const issues: IngestIssue[] = [];

  // A units row directly under the names row (DAQ exports), and maybe a short-name row under it.
  let unitsRow: string[] | null = null;
  let shortNames: string[] | null = null;
  let unitsLine: number | null = null;
  let shortNamesLine: number | null = null;
  if (under1 && under1.line.trim() !== '' && !isComment(under1.line)) {
    const cells = splitRow(under1.line, delimiter);
    if (cells.length <= headers.length && isUnitsRow(cells)) {
      unitsRow = cells;
      unitsLine = headerLine + 1;
      bodyStart = under1.next;
      bodyFirstLine = headerLine + 2;
      if (under2 && under2.line.trim() !== '' && !isComment(under2.line)) {
        const names = splitRow(under2.line, delimiter);
        if (names.length <= headers.length && isNamesRow(names)) {
          shortNames = names;
          shortNamesLine = headerLine + 2;
          bodyStart = under2.next;
          bodyFirstLine = headerLine + 3;
        }
      }
      ({ lines: sample, chars: sampleChars } = takeSample(bodyStart));
    }
  }
  if (sepLine && sepDelimiter !== delimiter) {
    issues.push({ code: 'sep-line-ignored', severity: 'warning', message: `The "sep=${sepDelimiter}" line names a delimiter that is not used (${JSON.stringify(delimiter)} is).` });
  }

  let decimalSeparator: Dialect['decimalSeparator'] = '.';
  if (options.decimalSeparator) decimalSeparator = options.decimalSeparator;
  else if (delimiter !== ',') {
    let commaCells = 0;
    let dotCells = 0;
    for (const line of sample) {
      for (const cell of splitRow(line, delimiter)) {
        if (COMMA_NUMBER.test(cell)) commaCells++;
        else if (DOT_NUMBER.test(cell)) dotCells++;
      }
    }
    if (commaCells > 0 && commaCells >= dotCells) decimalSeparator = ',';
    if (commaCells > 0 && dotCells > 0) {
      issues.push({
        code: 'mixed-decimal',
        severity: 'warning',
        message: `The first rows mix decimal commas (${commaCells} cells) and points (${dotCells} cells); "${decimalSeparator}" is used (give the decimal separator to choose).`,
        fix: [{ option: 'decimalSeparator' }],
      });
    }
  }

  // A header whose every cell is a number is data, not a header.
  const decimal = decimalSeparator === ',' ? COMMA : DOT;
  if (headers.every((h) => Number.isFinite(parseCellReference(h, decimal)))) {
    throw new IngestError('no-header', file, `line ${headerLine} looks like data (${JSON.stringify(header.slice(0, 60))}); the file needs a header row naming the columns, e.g. "time [s],voltage [V]"`, { line: headerLine });
  }

  return {
    dialect: {
      delimiter,
      decimalSeparator,
      lineEnding,
      bom,
      commentLines,
      comments,
      sepLine,
      headerLine,
      unitsLine,
      shortNamesLine,
      quoted: header.includes('"'),
    },
    headers,
    unitsRow,
    shortNames,
    sampleRows: sample.map((line) => splitRow(line, delimiter)),
    newline,
    bodyStart,
    bodyFirstLine,
    meanLineLength: sample.length ? sampleChars / sample.length : header.length + 1,
    issues,
  };
}

/** A cell with surrounding brackets removed, `-` read as blank. */
function bare(cell: string): string {
  const t = cell.trim().replace(/^\[(.*)\]$/, '$1').replace(/^\((.*)\)$/, '$1').trim();
  return t === '-' || t === '—' ? '' : t;
}

/**
 * A units row: no cell is a number, and at least half of the non-blank cells (and at least one)
 * read as bench units (`ms`, `rad/s`, `A`, `%`…).
 */
function isUnitsRow(cells: readonly string[]): boolean {
  const filled = cells.map(bare).filter((c) => c !== '');
  if (filled.length === 0) return false;
  if (filled.some((c) => Number.isFinite(parseCellReference(c, DOT)) || Number.isFinite(parseCellReference(c, COMMA)))) return false;
  const units = filled.filter((c) => isUnitToken(c)).length;
  return units >= 1 && 2 * units >= filled.length;
}

/** A short-name row: every non-blank cell is text that is neither a number nor a unit. */
function isNamesRow(cells: readonly string[]): boolean {
  const filled = cells.map((c) => c.trim()).filter((c) => c !== '');
  if (filled.length === 0) return false;
  return filled.every((c) => !Number.isFinite(parseCellReference(c, DOT)) && !Number.isFinite(parseCellReference(c, COMMA)) && !isUnitToken(c));
}

function stripCr(line: string): string {
  return line.endsWith('\r') ? line.slice(0, -1) : line;
}

/** Splits one line with papaparse (quotes honoured). */
function splitRow(line: string, delimiter: string): string[] {
  const parsed = Papa.parse<string[]>(line, { delimiter, newline: '\n', header: false, dynamicTyping: false });
  return parsed.data[0] ?? [''];
}

function guessDelimiter(header: string, sample: readonly string[]): Dialect['delimiter'] {
  let best: Dialect['delimiter'] = ',';
  let bestScore = -1;
  let bestWidth = 1;
  for (const candidate of CANDIDATES) {
    const width = splitRow(header, candidate).length;
    if (width < 2) continue;
    let consistent = 0;
    for (const line of sample) if (splitRow(line, candidate).length === width) consistent++;
    if (consistent > bestScore || (consistent === bestScore && width > bestWidth)) {
      best = candidate;
      bestScore = consistent;
      bestWidth = width;
    }
  }
  return best;
}
