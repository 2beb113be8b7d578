import { isAscii } from 'node:buffer';
import { createHash } from 'node:crypto';
import { StringDecoder } from 'node:string_decoder';
import { TextDecoder } from 'node:util';
import { Papa } from './csvParser.js';
import { IngestError } from './IngestError.js';
import { planColumns, ROLE_LIMITS } from './columns.js';
import { checkTimeBase } from './checkTimeBase.js';
import { deriveSpeed } from './deriveSpeed.js';
import { classifyBadCell, COMMA, DOT, scanCell, scanCellBytes } from './parseCell.js';
import {
  CELLS_SLOT, CONFIG_DOUBLES, KEPT_SLOT, KIND_EXTRA, KIND_ROLE, KIND_SPREAD, NEXT_SLOT, ROWS_AT, RUN_CHECK, RUN_DONE, START_SLOT, SURPLUS_SLOT, rowKernelRoom, rowKernelUse,
} from './scanRows.js';
import { settleDialect } from './settleDialect.js';
import type { SettledHead } from './settleDialect.js';
import type {
  ColumnMeta,
  DerivedCommandVoltage,
  DerivedChannel,
  Dialect,
  DropReason,
  DroppedRow,
  IngestIssue,
  IngestOptions,
  IngestResult,
  Recording,
  RecordingMeta,
  SignalRole,
} from './types.js';

/** A push-based CSV reader: feed it chunks, then ask for the result. Needs no file system. */
export interface Ingestor {
  /**
   * Feeds the next piece of the file: bytes (decoded as UTF-8, or Windows-1252 when the head is not
   * valid UTF-8) or text. Do not mix the two in one ingestor. No reference to the chunk is kept, so
   * the caller may refill its buffer once push() returns.
   * @throws IngestError as soon as the input is known to be unusable (e.g. time steps back)
   */
  push(chunk: Uint8Array | string): void;
  /**
   * Ends the input and returns the recording.
   * @throws IngestError for empty files, missing header or time column, too few rows, …
   */
  finish(): IngestResult;
}

/** Bytes gathered before the encoding is settled (readRecording's first read is this long). */
export const HEAD_BYTES = 65536;
/** Characters gathered before the dialect is settled. */
const HEAD_CHARS = 65536;
const LISTED_LINES = 20;

interface ResolvedOptions {
  file: string;
  engine: 'auto' | 'papaparse';
  maxDroppedListed: number;
  /** null when not given: 3 for a series, 2 for a table. */
  minRows: number | null;
  maxLineLength: number;
  deriveSpeed: boolean;
  driveGain: number;
}

function checkOptions(options: IngestOptions): ResolvedOptions {
  const file = options.fileName ?? '<text>';
  const bad = (message: string): never => {
    throw new IngestError('bad-option', file, message);
  };
  if (options.engine !== undefined && options.engine !== 'auto' && options.engine !== 'papaparse') bad(`options.engine must be 'auto' or 'papaparse' (got ${String(options.engine)})`);
  if (options.delimiter !== undefined && options.delimiter !== ',' && options.delimiter !== ';' && options.delimiter !== '\t') bad(`options.delimiter must be ',', ';' or '\\t' (got ${JSON.stringify(options.delimiter)})`);
  if (options.decimalSeparator !== undefined && options.decimalSeparator !== '.' && options.decimalSeparator !== ',') bad(`options.decimalSeparator must be '.' or ',' (got ${JSON.stringify(options.decimalSeparator)})`);
  if (options.decimalSeparator === ',' && options.delimiter === ',') bad("options.decimalSeparator ',' needs a ';' or tab delimiter");
  if (options.countsPerRevolution !== undefined && !(Number.isFinite(options.countsPerRevolution) && options.countsPerRevolution > 0)) bad(`options.countsPerRevolution must be > 0 (got ${options.countsPerRevolution})`);
  const maxDroppedListed = options.maxDroppedListed ?? 10000;
  if (!(Number.isInteger(maxDroppedListed) && maxDroppedListed >= 0)) bad(`options.maxDroppedListed must be an integer ≥ 0 (got ${maxDroppedListed})`);
  const minRows = options.minRows ?? null;
  if (minRows !== null && !(Number.isInteger(minRows) && minRows >= 2)) bad(`options.minRows must be an integer ≥ 2 (got ${minRows})`);
  const driveGain = options.driveGain ?? 1;
  if (!(typeof driveGain === 'number' && Number.isFinite(driveGain) && driveGain !== 0)) bad(`options.driveGain must be a finite number other than 0 (got ${String(options.driveGain)})`);
  if (options.supplyVoltage !== undefined && !(typeof options.supplyVoltage === 'number' && Number.isFinite(options.supplyVoltage) && options.supplyVoltage > 0)) bad(`options.supplyVoltage must be a voltage > 0 (got ${String(options.supplyVoltage)})`);
  if (options.pwmMax !== undefined && !(typeof options.pwmMax === 'number' && Number.isFinite(options.pwmMax) && options.pwmMax > 0)) bad(`options.pwmMax must be a count > 0 (got ${String(options.pwmMax)})`);
  const maxLineLength = options.maxLineLength ?? 1 << 20;
  if (!(Number.isInteger(maxLineLength) && maxLineLength >= 64)) bad(`options.maxLineLength must be an integer ≥ 64 (got ${maxLineLength})`);
  for (const [key, value] of Object.entries(options.units ?? {})) {
    if (typeof value !== 'string') bad(`options.units[${JSON.stringify(key)}] must be a string (got ${typeof value})`);
  }
  return { file, engine: options.engine ?? 'auto', maxDroppedListed, minRows, maxLineLength, deriveSpeed: options.deriveSpeed ?? true, driveGain };
}

/**
 * Creates a streaming CSV reader for bench recordings.
 *
 * ## Method
 * The head of the file (64 KiB) settles the encoding, the dialect and the header (papaparse splits
 * the header and the sampled rows). Body chunks without quote characters go through a hand-written
 * scanner that splits lines and cells exactly as papaparse does for quote-free text and parses
 * numbers bit-identically to `Number()` (pure-ASCII byte chunks are scanned as bytes, without
 * decoding them into a string first); chunks with quotes (or `engine: 'papaparse'`) go through
 * papaparse's own parser. Values stream into `Float64Array`s pre-sized from `options.sizeHint` that
 * grow (at most doubling; to an estimate from the bytes read so far when the size is known), so
 * memory stays near 8 bytes per kept cell.
 *
 * @param options - see {@link IngestOptions}
 * @returns an {@link Ingestor}
 * @throws IngestError `bad-option` for invalid options
 * @example
 * const ing = createIngestor({ fileName: 'run.csv' });
 * ing.push('time [ms],voltage [V]\n0,0\n1,12\n2,12\n');
 * ing.finish().recording.time // => Float64Array [0, 0.001, 0.002]
 */
export function createIngestor(options: IngestOptions = {}): Ingestor {
  const opts = checkOptions(options);
  const file = opts.file;
  const hash = createHash('sha256');
  let bytes = 0;
  let mode: 'bytes' | 'string' | undefined;
  let state: 'head' | 'body' | 'done' | 'failed' = 'head';
  let headChunks: Uint8Array[] = [];
  let headBytes = 0;
  let decoder: { decode(chunk?: Uint8Array): string } | undefined;
  let encoding: Dialect['encoding'] = 'string';
  let headText = '';
  /**
   * True when the decoder holds no part of a multi-byte character, i.e. the bytes it was last given
   * ended with an ASCII byte: an ASCII chunk then decodes to exactly its bytes, so the body reader
   * may scan it as bytes.
   */
  let decoderClean = false;
  const earlyIssues: IngestIssue[] = [];
  let body: BodyReader | undefined;

  function openDecoder(): void {
    const head = concat(headChunks, headBytes);
    headChunks = [];
    if (head.length >= 2 && ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff))) {
      throw new IngestError('not-text', file, 'the file is UTF-16 text; save it as UTF-8');
    }
    encoding = 'utf-8';
    // ASCII is valid UTF-8: only other heads need the (string-making) check.
    const asciiHead = isAscii(head);
    try {
      if (!asciiHead) new TextDecoder('utf-8', { fatal: true, ignoreBOM: true }).decode(head, { stream: true });
    } catch {
      encoding = 'windows-1252';
      earlyIssues.push({
        code: 'encoding-fallback',
        severity: 'info',
        message: 'The file is not valid UTF-8; it was read as Windows-1252 (Latin-1), e.g. for "°C" written by Windows tools.',
      });
    }
    if (encoding === 'utf-8') {
      // StringDecoder keeps the BOM (reported in the dialect) and is the fastest streaming UTF-8 decoder in Node.
      const sd = new StringDecoder('utf8');
      decoder = { decode: (chunk?: Uint8Array): string => (chunk ? sd.write(chunk as Buffer) : sd.end()) };
    } else {
      const td = new TextDecoder(encoding, { ignoreBOM: true });
      decoder = { decode: (chunk?: Uint8Array): string => (chunk ? td.decode(chunk, { stream: true }) : td.decode()) };
    }
    decoderClean = head.length === 0 || head[head.length - 1]! < 0x80;
    const ascii = decoderClean && asciiHead;
    feedText(decoder.decode(head), false, ascii ? toBuffer(head) : undefined);
  }

  /** `asBytes`, when given, holds `text` as ASCII bytes (one byte per character). */
  function feedText(text: string, final: boolean, asBytes?: Buffer): void {
    if (state === 'head') {
      const whole = headText === '';
      headText += text;
      if (!final && headText.length < HEAD_CHARS) return;
      const settled = settleDialect(headText, final, options, file, opts.maxLineLength);
      if (!settled) return;
      body = new BodyReader(settled, options, opts, encoding);
      state = 'body';
      const head = headText;
      headText = '';
      if (whole && asBytes && !final) body.feedBytes(asBytes.subarray(settled.bodyStart));
      else body.feed(head, settled.bodyStart, final);
    } else if (body) {
      body.feed(text, 0, final);
    }
  }

  function guard<T>(fn: () => T): T {
    if (state === 'done') throw new IngestError('bad-option', file, 'the ingestor has already finished');
    if (state === 'failed') throw new IngestError('bad-option', file, 'the ingestor stopped at an earlier error');
    try {
      return fn();
    } catch (error) {
      state = 'failed';
      throw error;
    }
  }

  return {
    push(chunk: Uint8Array | string): void {
      guard(() => {
        if (typeof chunk === 'string') {
          if (mode === 'bytes') throw new IngestError('bad-option', file, 'push() got text after bytes; use one kind per ingestor');
          mode = 'string';
          hash.update(chunk, 'utf8');
          bytes += Buffer.byteLength(chunk, 'utf8');
          feedText(chunk, false);
          return;
        }
        if (!(chunk instanceof Uint8Array)) throw new IngestError('bad-option', file, `push() takes a Uint8Array or a string (got ${typeof chunk})`);
        if (mode === 'string') throw new IngestError('bad-option', file, 'push() got bytes after text; use one kind per ingestor');
        mode = 'bytes';
        hash.update(chunk);
        bytes += chunk.byteLength;
        if (!decoder) {
          // A copy (Buffer#slice would share the memory): the caller may reuse its buffer.
          headChunks.push(Uint8Array.prototype.slice.call(chunk));
          headBytes += chunk.byteLength;
          if (headBytes >= HEAD_BYTES) openDecoder();
          return;
        }
        if (state === 'body' && body && decoderClean && isAscii(chunk)) {
          body.feedBytes(toBuffer(chunk));
          return;
        }
        if (chunk.byteLength > 0) decoderClean = chunk[chunk.byteLength - 1]! < 0x80;
        feedText(decoder.decode(chunk), false);
      });
    },
    finish(): IngestResult {
      return guard(() => {
        if (mode === 'bytes') {
          if (!decoder) openDecoder();
          feedText(decoder!.decode(), true);
        } else {
          feedText('', true);
        }
        if (!body) throw new IngestError('empty-file', file, 'the file is empty');
        const result = body.finish({ file, bytes, sha256: hash.digest('hex') }, earlyIssues);
        state = 'done';
        return result;
      });
    },
  };
}

/** A Buffer view of the bytes (no copy). */
function toBuffer(bytes: Uint8Array): Buffer {
  return Buffer.isBuffer(bytes) ? bytes : Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

function concat(chunks: Uint8Array[], length: number): Uint8Array {
  if (chunks.length === 1) return chunks[0]!;
  const out = new Uint8Array(length);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

/** Cuts a cell for a message. */
function show(cell: string): string {
  const s = cell.trim();
  return JSON.stringify(s.length > 40 ? `${s.slice(0, 40)}…` : s);
}

function listLines(lines: readonly number[], total: number): string {
  const shown = lines.slice(0, LISTED_LINES).join(', ');
  return total > lines.length || lines.length > LISTED_LINES ? `${shown}, … (${total} in all)` : shown;
}

/** Reads body rows, validates them and stores the values column by column. */
class BodyReader {
  private readonly file: string;
  private readonly columns: ColumnMeta[];
  private readonly issues: IngestIssue[];
  private readonly dialect: Omit<Dialect, 'encoding' | 'bodyParser'>;
  private readonly encoding: Dialect['encoding'];
  private readonly delimiter: string;
  private readonly newline: '\n' | '\r';
  private readonly decimal: number;
  private readonly nCols: number;
  private readonly opts: ResolvedOptions;
  /** Role columns: column index, factor, offset, min, max. */
  private readonly roleCol: Int32Array;
  private readonly roleFactor: Float64Array;
  private readonly roleOffset: Float64Array;
  private readonly roleMin: Float64Array;
  private readonly roleMax: Float64Array;
  /** Slot of the time column among the role columns; −1 for a table (no time column). */
  private readonly timeSlot: number;
  private readonly layout: 'series' | 'table';
  private readonly extraCol: Int32Array;
  /** Spread (SD) columns: stored converted, NaN for blank or bad cells (the row is kept). */
  private readonly spreadCol: Int32Array;
  private readonly spreadFactor: Float64Array;
  private spreadBuffers: Float64Array[];
  private readonly spreadBad: Float64Array;
  private readonly spreadFirstBad: Float64Array;
  private roleBuffers: Float64Array[];
  private extraBuffers: Float64Array[];
  private readonly extraBad: Float64Array;
  private readonly extraFirstBad: Float64Array;
  /** 1 once an extra column has shown a non-blank cell that is not a number. */
  private readonly extraText: Uint8Array;
  private capacity: number;
  /** Scratch for one row: raw values, converted role values, cell bounds. */
  private readonly vals: Float64Array;
  private readonly conv: Float64Array;
  private readonly starts: Int32Array;
  private readonly ends: Int32Array;
  private rowText = '';
  /** The chunk being scanned by {@link readFastBytes}, for the text of a bad cell. */
  private rowBytes: Buffer | null = null;
  /** Bytes given to {@link feedBytes} so far, and the file offset of the line being scanned there. */
  private fed = 0;
  private scanAt = 0;
  private readonly sizeHint: number | undefined;
  private rowCells: string[] | null = null;
  /** Per column, what the row kernel does with it (see scanRows.wat); null when the kernel is not used. */
  private readonly kernelConfig: Float64Array | null;

  private pending = '';
  /** 1-based line number of `pending[0]`. */
  private line: number;
  private rowsRead = 0;
  private kept = 0;
  private lastTime = Number.NaN;
  private lastKeptLine = 0;
  private readonly dropped: DroppedRow[] = [];
  private droppedCount = 0;
  private readonly droppedByReason: Partial<Record<DropReason, number>> = {};
  private readonly duplicateLines: number[] = [];
  private duplicateCount = 0;
  private pendingBlank: number[] = [];
  private readonly blankLines: number[] = [];
  private blankCount = 0;
  private readonly commentLines: number[] = [];
  private commentCount = 0;
  private surplusBlankRows = 0;
  private fastRows = 0;
  private papaRows = 0;
  private quoted: boolean;
  private readonly quoteErrors: number[] = [];

  private readonly supplyVoltage: number | undefined;

  constructor(head: SettledHead, options: IngestOptions, opts: ResolvedOptions, encoding: Dialect['encoding']) {
    this.file = opts.file;
    this.supplyVoltage = options.supplyVoltage;
    this.opts = opts;
    this.dialect = head.dialect;
    this.encoding = encoding;
    this.delimiter = head.dialect.delimiter;
    this.newline = head.newline;
    this.decimal = head.dialect.decimalSeparator === ',' ? COMMA : DOT;
    this.line = head.bodyFirstLine;
    this.quoted = head.dialect.quoted;
    const plan = planColumns(
      {
        headers: head.headers, headerLine: head.dialect.headerLine, unitsRow: head.unitsRow, unitsLine: head.dialect.unitsLine,
        shortNames: head.shortNames, sampleRows: head.sampleRows, decimal: this.decimal,
      },
      options,
      opts.file,
    );
    this.columns = plan.columns;
    this.layout = plan.layout;
    this.issues = [...head.issues, ...plan.issues];
    this.nCols = this.columns.length;

    const roleCols = this.columns.filter((c) => c.role !== 'extra' && c.role !== 'spread');
    const extraCols = this.columns.filter((c) => c.role === 'extra');
    const spreadCols = this.columns.filter((c) => c.role === 'spread');
    this.roleCol = Int32Array.from(roleCols, (c) => c.index);
    this.roleFactor = Float64Array.from(roleCols, (c) => c.factor);
    this.roleOffset = Float64Array.from(roleCols, (c) => c.offset);
    this.roleMin = Float64Array.from(roleCols, (c) => ROLE_LIMITS[c.role as SignalRole | 'time'].min * (c.role === 'commandVoltage' ? Math.abs(opts.driveGain) : 1));
    this.roleMax = Float64Array.from(roleCols, (c) => ROLE_LIMITS[c.role as SignalRole | 'time'].max * (c.role === 'commandVoltage' ? Math.abs(opts.driveGain) : 1));
    this.extraCol = Int32Array.from(extraCols, (c) => c.index);
    this.timeSlot = roleCols.findIndex((c) => c.role === 'time');
    this.spreadCol = Int32Array.from(spreadCols, (c) => c.index);
    this.spreadFactor = Float64Array.from(spreadCols, (c) => c.factor);

    const hint = options.sizeHint;
    this.sizeHint = hint;
    this.fed = head.bodyStart;
    // 10 % to spare: the head's lines can be longer than the rest (time stamps such as
    // 0.00030000000000000003 near the start), and a growth copies every column once more.
    this.capacity = hint !== undefined && hint > 0 ? Math.ceil((hint / Math.max(head.meanLineLength, 2)) * 1.1) + 16 : 4096;
    this.roleBuffers = roleCols.map(() => new Float64Array(this.capacity));
    this.extraBuffers = extraCols.map(() => new Float64Array(this.capacity));
    this.spreadBuffers = spreadCols.map(() => new Float64Array(this.capacity));
    this.spreadBad = new Float64Array(spreadCols.length);
    this.spreadFirstBad = new Float64Array(spreadCols.length);
    this.extraBad = new Float64Array(extraCols.length);
    this.extraFirstBad = new Float64Array(extraCols.length);
    this.extraText = new Uint8Array(extraCols.length);
    this.vals = new Float64Array(this.nCols + 1);
    this.conv = new Float64Array(roleCols.length);
    this.starts = new Int32Array(this.nCols);
    this.ends = new Int32Array(this.nCols);
    this.kernelConfig = this.makeKernelConfig();
  }

  /** The row kernel's config: kind, output array, factor, offset, min, max per column. */
  private makeKernelConfig(): Float64Array | null {
    const config = new Float64Array(CONFIG_DOUBLES * this.nCols).fill(Number.NaN);
    const set = (c: number, values: number[]): void => config.set(values, CONFIG_DOUBLES * c);
    const nRoles = this.roleCol.length;
    const nExtra = this.extraCol.length;
    this.roleCol.forEach((c, k) => set(c, [KIND_ROLE, k, this.roleFactor[k]!, this.roleOffset[k]!, this.roleMin[k]!, this.roleMax[k]!, 0, 0]));
    this.extraCol.forEach((c, e) => set(c, [KIND_EXTRA, nRoles + e, 1, 0, 0, 0, 0, 0]));
    this.spreadCol.forEach((c, e) => set(c, [KIND_SPREAD, nRoles + nExtra + e, this.spreadFactor[e]!, 0, 0, 0, 0, 0]));
    // Every column must be one of the three (it is, by planColumns); otherwise the scanner reads all.
    return config.some((x) => x !== x) ? null : config;
  }

  /**
   * Reads `text` from index `from` on, after the unread tail of the previous piece. The fast path
   * scans the chunk string in place (no copy of the body); only the line that straddles two
   * chunks is joined into a small string.
   */
  feed(text: string, from: number, final: boolean): void {
    const quoted = this.opts.engine === 'papaparse' || this.pending.includes('"') || text.indexOf('"', from) >= 0;
    if (quoted) {
      this.pending = this.pending + (from > 0 ? text.slice(from) : text);
      this.readWithPapaparse(final);
      return;
    }
    if (this.pending.length) {
      const nl = text.indexOf(this.newline, from);
      if (nl < 0 && !final) {
        this.pending += from > 0 ? text.slice(from) : text;
        if (this.pending.length > this.opts.maxLineLength) this.tooLong();
        return;
      }
      const joint = this.pending + (nl < 0 ? text.slice(from) : text.slice(from, nl + 1));
      this.pending = '';
      this.readFast(joint, 0, final && nl < 0);
      if (nl < 0) return;
      from = nl + 1;
    }
    this.readFast(text, from, final);
  }

  /**
   * Reads a chunk of pure-ASCII bytes (not the last piece: {@link feed} with `final` ends the
   * input). It is read exactly as {@link feed} reads the same characters as text; without quote
   * characters the lines are scanned in the bytes themselves.
   */
  feedBytes(bytes: Buffer): void {
    this.fed += bytes.length;
    if (this.opts.engine === 'papaparse' || this.pending.includes('"') || bytes.indexOf(34) >= 0) {
      this.feed(bytes.toString('latin1'), 0, false);
      return;
    }
    let from = 0;
    if (this.pending.length) {
      const nl = bytes.indexOf(this.newline.charCodeAt(0));
      if (nl < 0) {
        this.pending += bytes.toString('latin1');
        if (this.pending.length > this.opts.maxLineLength) this.tooLong();
        return;
      }
      const joint = this.pending + bytes.toString('latin1', 0, nl + 1);
      this.pending = '';
      this.readFast(joint, 0, false);
      from = nl + 1;
    }
    const nlCode = this.newline.charCodeAt(0);
    const end = bytes.lastIndexOf(nlCode) + 1;
    if (end <= from) {
      this.pending = bytes.toString('latin1', from);
      if (this.pending.length > this.opts.maxLineLength) this.tooLong();
      return;
    }
    this.rowCells = null;
    this.rowBytes = bytes;
    if (!this.readKernelBytes(bytes, from, end, nlCode)) this.readFastBytes(bytes, from, end, nlCode);
    // Here rather than at the end of readFastBytes: its loop is compiled while it runs (on-stack
    // replacement), before any code after the loop has run, and V8 would leave that compiled code
    // at such code on every later chunk.
    this.rowBytes = null;
    this.pending = bytes.toString('latin1', end);
  }

  // ---- fast path ---------------------------------------------------------------------------

  /**
   * {@link readFast} for ASCII bytes: scans the complete lines of `bytes[from…end)`, `end` being just
   * after a newline (`nlCode`).
   */
  private readFastBytes(bytes: Buffer, from: number, end: number, nlCode: number): void {
    const delimCode = this.delimiter.charCodeAt(0);
    const nCols = this.nCols;
    const decimal = this.decimal;
    const vals = this.vals;
    const starts = this.starts;
    const ends = this.ends;
    const maxLineLength = this.opts.maxLineLength;
    const base = this.fed - bytes.length;
    let pos = from;
    while (pos < end) {
      // Every line up to `end` ends with a newline; the cell scanner finds it.
      const line = this.line++;
      this.scanAt = base + pos;
      const first = bytes[pos]!;
      if (first === 35 || (first === 47 && bytes[pos + 1] === 47)) {
        const lineEnd = bytes.indexOf(nlCode, pos);
        if (lineEnd - pos > maxLineLength) this.lineTooLong(line);
        this.comment(line);
        pos = lineEnd + 1;
        continue;
      }
      let c = 0;
      let cellStart = pos;
      let surplus = false;
      let lineEnd: number;
      for (;;) {
        const slot = c < nCols ? c : nCols;
        const cellEnd = scanCellBytes(bytes, cellStart, end, delimCode, decimal, vals, slot, nlCode);
        if (c < nCols) {
          starts[c] = cellStart;
          ends[c] = cellEnd;
        } else if (!surplus && !(vals[nCols] !== vals[nCols] && bytes.toString('latin1', cellStart, cellEnd).trim() === '')) {
          surplus = true;
        }
        c++;
        if (bytes[cellEnd] !== delimCode) {
          lineEnd = cellEnd;
          break;
        }
        cellStart = cellEnd + 1;
      }
      // Checked once the line is scanned: scanning only filled the scratch arrays.
      if (lineEnd - pos > maxLineLength) this.lineTooLong(line);
      const next = lineEnd + 1;
      if (c === 1 && vals[0] !== vals[0] && bytes.toString('latin1', pos, lineEnd).trim() === '') {
        this.blank(line);
      } else {
        this.fastRows++;
        this.commit(line, c, surplus);
      }
      pos = next;
    }
  }

  /**
   * {@link readFastBytes} with the numbers scanned by the WebAssembly kernel (scanRows.wat), which
   * reads a fresh process's first chunks as fast as warmed-up JavaScript would. The bytes are
   * copied into the kernel's memory once; it reads every line whose cells are all plain numbers
   * (exactly as {@link scanCellBytes} reads them, bit for bit) and has as many cells as the header
   * (and perhaps blank ones after them), and marks any other line (comments, blanks, text, quirks its fast path leaves to `Number()`),
   * which {@link readFastBytes} then reads on its own, in order. Returns false (having read
   * nothing) when the kernel cannot run.
   */
  private readKernelBytes(bytes: Buffer, from: number, end: number, nlCode: number): boolean {
    const config = this.kernelConfig;
    if (config === null) return false;
    const nCols = this.nCols;
    const length = end - from;
    const got = rowKernelRoom(length, nCols);
    if (got === null) return false;
    const { room, layout } = got;
    const mem = room.f64;
    room.u8.set(bytes.subarray(from, end), ROWS_AT);
    mem.set(config, layout.config >> 3);
    const run = room.exports.run;
    const delimCode = this.delimiter.charCodeAt(0);
    const decimal = this.decimal;
    const maxLine = Math.min(this.opts.maxLineLength, 0x7fffffff);
    const maxRows = layout.maxRows;
    const timeCol = this.timeSlot >= 0 ? this.roleCol[this.timeSlot]! : -1;
    const scratch = layout.scratch >> 3;
    const out = layout.out >> 3;
    const vals = this.vals;
    // Byte index in `bytes` = kernel address + shift; file offset = byte index + base.
    const shift = from - ROWS_AT;
    const base = this.fed - bytes.length;
    const stopAt = ROWS_AT + length;
    let lines = 0;
    let stops = 0;
    for (let at = ROWS_AT; at < stopAt; ) {
      const status = run(at, stopAt, maxRows, nCols, delimCode, decimal, nlCode, maxLine, layout.config, timeCol, this.kept > 0 ? 1 : 0, this.lastTime);
      const next = mem[NEXT_SLOT]!;
      const kept = mem[KEPT_SLOT]!;
      if (kept > 0) {
        this.countBlanks(mem, layout.config >> 3);
        this.keepBatch(mem, out, maxRows, kept, base + shift + (status === RUN_DONE ? next : mem[START_SLOT]!));
        this.surplusBlankRows += mem[SURPLUS_SLOT]!;
      }
      if (status !== RUN_DONE) {
        const start = mem[START_SLOT]!;
        if (status === RUN_CHECK) {
          // A row of numbers that commit() does not simply keep: it drops it, or stops the input.
          const line = this.line++;
          this.scanAt = base + shift + start;
          // Its only NaN cells are blank ones: an empty text stands for each.
          for (let c = 0; c < nCols; c++) {
            vals[c] = mem[scratch + c]!;
            this.starts[c] = 0;
            this.ends[c] = 0;
          }
          this.fastRows++;
          this.commit(line, mem[CELLS_SLOT]!, false);
        } else {
          this.readFastBytes(bytes, shift + start, shift + next, nlCode);
        }
        // When the kernel leaves most lines to JavaScript (a column of blanks or text, say), a call
        // per line costs more than it saves: the JavaScript scanner reads the rest of the chunk.
        stops++;
        if (stops >= 64 && 4 * stops > lines + stops) {
          if (next < stopAt) this.readFastBytes(bytes, shift + next, end, nlCode);
          return true;
        }
      }
      lines += kept;
      at = next;
    }
    return true;
  }

  /**
   * Counts the blank cells of extra and spread columns in the rows the row kernel has just kept (its
   * counts in the config at `config` in `mem`, in doubles), as {@link commit} counts them row by
   * row; call before {@link keepBatch}, which moves the line number past those rows.
   */
  private countBlanks(mem: Float64Array, config: number): void {
    this.extraCol.forEach((c, e) => {
      const blanks = mem[config + CONFIG_DOUBLES * c + 6]!;
      if (blanks === 0) return;
      if (this.extraBad[e] === 0) this.extraFirstBad[e] = this.line + mem[config + CONFIG_DOUBLES * c + 7]!;
      this.extraBad[e] = this.extraBad[e]! + blanks;
    });
    this.spreadCol.forEach((c, e) => {
      const blanks = mem[config + CONFIG_DOUBLES * c + 6]!;
      if (blanks === 0) return;
      if (this.spreadBad[e] === 0) this.spreadFirstBad[e] = this.line + mem[config + CONFIG_DOUBLES * c + 7]!;
      this.spreadBad[e] = this.spreadBad[e]! + blanks;
    });
  }

  /**
   * Stores `n` rows that the row kernel read and checked (its output arrays at `out` in `mem`, in
   * doubles, `stride` apart), as {@link commit} would store them one by one; `scanAt` is the file
   * offset just after them.
   */
  private keepBatch(mem: Float64Array, out: number, stride: number, n: number, scanAt: number): void {
    this.rowsRead += n;
    this.fastRows += n;
    rowKernelUse.lines += n;
    if (this.pendingBlank.length) {
      this.blankCount += this.pendingBlank.length;
      for (const b of this.pendingBlank) if (this.blankLines.length < LISTED_LINES) this.blankLines.push(b);
      this.pendingBlank = [];
    }
    const at = this.kept;
    this.kept = at + n;
    this.scanAt = scanAt;
    while (this.kept > this.capacity) this.grow();
    let array = 0;
    for (const buffers of [this.roleBuffers, this.extraBuffers, this.spreadBuffers]) {
      for (const b of buffers) {
        const from = out + stride * array++;
        b.set(mem.subarray(from, from + n), at);
      }
    }
    this.lastTime = this.timeSlot >= 0 ? this.roleBuffers[this.timeSlot]![this.kept - 1]! : this.kept - 1;
    this.line += n;
    this.lastKeptLine = this.line - 1;
  }

  /** {@link tooLong} for line `line` of a byte chunk being scanned. */
  private lineTooLong(line: number): never {
    this.line = line;
    this.rowBytes = null;
    this.tooLong();
  }

  /** Scans the complete lines of `text[from…]` (all of it when `final`); keeps the rest in `pending`. */
  private readFast(text: string, from: number, final: boolean): void {
    const nl = this.newline;
    let end: number;
    if (final) end = text.length;
    else {
      end = text.lastIndexOf(nl) + 1;
      if (end <= from) {
        this.pending = text.slice(from);
        if (this.pending.length > this.opts.maxLineLength) this.tooLong();
        return;
      }
    }
    const delimCode = this.delimiter.charCodeAt(0);
    const nCols = this.nCols;
    const decimal = this.decimal;
    const vals = this.vals;
    const starts = this.starts;
    const ends = this.ends;
    this.rowCells = null;
    this.rowText = text;
    let pos = from;
    while (pos < end) {
      let lineEnd = text.indexOf(nl, pos);
      const next = lineEnd < 0 || lineEnd >= end ? end : lineEnd + 1;
      if (lineEnd < 0 || lineEnd >= end) lineEnd = end;
      const line = this.line++;
      if (lineEnd - pos > this.opts.maxLineLength) {
        this.line = line;
        this.tooLong();
      }
      const first = text.charCodeAt(pos);
      if (first === 35 || (first === 47 && text.charCodeAt(pos + 1) === 47)) {
        this.comment(line);
        pos = next;
        continue;
      }
      let c = 0;
      let cellStart = pos;
      let surplus = false;
      for (;;) {
        const slot = c < nCols ? c : nCols;
        const cellEnd = scanCell(text, cellStart, lineEnd, delimCode, decimal, vals, slot);
        if (c < nCols) {
          starts[c] = cellStart;
          ends[c] = cellEnd;
        } else if (!surplus && !(vals[nCols] !== vals[nCols] && text.slice(cellStart, cellEnd).trim() === '')) {
          surplus = true;
        }
        c++;
        if (cellEnd >= lineEnd) break;
        cellStart = cellEnd + 1;
      }
      if (c === 1 && vals[0] !== vals[0] && text.slice(pos, lineEnd).trim() === '') {
        this.blank(line);
      } else {
        this.fastRows++;
        this.commit(line, c, surplus);
      }
      pos = next;
    }
    this.rowText = '';
    this.pending = text.slice(end);
  }

  // ---- papaparse path ----------------------------------------------------------------------

  private readWithPapaparse(final: boolean): void {
    const text = this.pending;
    if (text.includes('"')) this.quoted = true;
    const nl = this.newline;
    let rowStart = 0;
    const onRow = (results: { data: string[][]; errors: { row?: number }[]; meta: { cursor: number } }): void => {
      const cells = results.data[0] ?? [''];
      const cursor = results.meta.cursor;
      const line = this.line;
      // Count the line breaks this row spans, so the next row's line number is right.
      for (let i = text.indexOf(nl, rowStart); i >= 0 && i < cursor; i = text.indexOf(nl, i + 1)) this.line++;
      const start = rowStart;
      rowStart = cursor;
      if (cursor - start > this.opts.maxLineLength) {
        this.line = line;
        this.tooLong();
      }
      if (results.errors.length && this.quoteErrors.length < LISTED_LINES) this.quoteErrors.push(line);
      const first = text.charCodeAt(start);
      if (first === 35 || (first === 47 && text.charCodeAt(start + 1) === 47)) {
        this.comment(line);
        return;
      }
      if (cells.length === 1 && cells[0]!.trim() === '') {
        this.blank(line);
        return;
      }
      this.rowCells = cells;
      const nCols = this.nCols;
      let surplus = false;
      for (let c = 0; c < cells.length; c++) {
        const cell = cells[c]!;
        if (c < nCols) scanCell(cell, 0, cell.length, -1, this.decimal, this.vals, c);
        else if (!surplus && cell.trim() !== '') surplus = true;
      }
      this.papaRows++;
      this.commit(line, cells.length, surplus);
    };
    const parser = new Papa.Parser({
      delimiter: this.delimiter,
      newline: nl,
      quoteChar: '"',
      escapeChar: '"',
      comments: false,
      step: onRow as never,
    });
    const result = parser.parse(text, 0, !final) as { meta: { cursor: number } };
    this.rowCells = null;
    const consumed = final ? text.length : result.meta.cursor;
    this.pending = text.slice(consumed);
    if (!final && this.pending.length > this.opts.maxLineLength) this.tooLong();
  }

  private tooLong(): never {
    throw new IngestError(
      'line-too-long',
      this.file,
      `line ${this.line} (or a quoted field starting there) is longer than ${this.opts.maxLineLength} characters${this.pending.includes('"') ? '; is a quote left open?' : ''}`,
      { line: this.line },
    );
  }

  // ---- rows --------------------------------------------------------------------------------

  private cellText(c: number): string {
    if (this.rowCells) return this.rowCells[c] ?? '';
    if (this.rowBytes) return this.rowBytes.toString('latin1', this.starts[c]!, this.ends[c]!);
    return this.rowText.slice(this.starts[c]!, this.ends[c]!);
  }

  private comment(line: number): void {
    this.commentCount++;
    if (this.commentLines.length < LISTED_LINES) this.commentLines.push(line);
  }

  private blank(line: number): void {
    if (this.pendingBlank.length < 1000) this.pendingBlank.push(line);
  }

  private drop(line: number, reason: DropReason, column: string | undefined, detail: string): void {
    this.droppedCount++;
    this.droppedByReason[reason] = (this.droppedByReason[reason] ?? 0) + 1;
    if (this.dropped.length < this.opts.maxDroppedListed) {
      const row: DroppedRow = { line, reason, detail };
      if (column !== undefined) row.column = column;
      this.dropped.push(row);
    }
  }

  /** Validates the row held in `vals` and stores it, or records why it was dropped. */
  private commit(line: number, nCells: number, surplus: boolean): void {
    this.rowsRead++;
    if (this.pendingBlank.length) {
      this.blankCount += this.pendingBlank.length;
      for (const b of this.pendingBlank) if (this.blankLines.length < LISTED_LINES) this.blankLines.push(b);
      this.pendingBlank = [];
    }
    const nCols = this.nCols;
    if (nCells < nCols || surplus) {
      this.drop(line, 'column-count', undefined, `expected ${nCols} cells, found ${nCells}`);
      return;
    }
    if (nCells > nCols) this.surplusBlankRows++;
    const vals = this.vals;
    const conv = this.conv;
    const nRoles = this.roleCol.length;
    for (let k = 0; k < nRoles; k++) {
      const c = this.roleCol[k]!;
      const v = vals[c]!;
      if (v !== v) {
        const cell = this.cellText(c);
        const reason = classifyBadCell(cell, this.decimal);
        this.drop(line, reason, this.columns[c]!.header, reason === 'blank-cell' ? 'blank cell' : `cell ${show(cell)}`);
        return;
      }
      const s = v * this.roleFactor[k]! + this.roleOffset[k]!;
      if (!(s >= this.roleMin[k]! && s <= this.roleMax[k]!)) {
        const col = this.columns[c]!;
        if (v === Number.POSITIVE_INFINITY || v === Number.NEGATIVE_INFINITY) {
          this.drop(line, 'non-finite', col.header, `cell ${show(this.cellText(c))}`);
        } else {
          this.drop(line, 'out-of-range', col.header, `${s} ${col.siUnit} is outside [${this.roleMin[k]}, ${this.roleMax[k]}] for ${col.role}`);
        }
        return;
      }
      conv[k] = s;
    }
    const t = this.timeSlot >= 0 ? conv[this.timeSlot]! : this.kept;
    if (this.timeSlot >= 0 && this.kept > 0 && !(t > this.lastTime)) {
      const timeHeader = this.columns[this.roleCol[this.timeSlot]!]!.header;
      if (t === this.lastTime) {
        this.drop(line, 'duplicate-time', timeHeader, `time ${t} s repeats line ${this.lastKeptLine}`);
        if (this.duplicateCount++ < LISTED_LINES) this.duplicateLines.push(line);
        return;
      }
      throw new IngestError(
        'time-not-increasing',
        this.file,
        `time steps back at line ${line}: ${t} s after ${this.lastTime} s at line ${this.lastKeptLine}; time must strictly increase (split the file at the restart)`,
        { line, column: timeHeader },
      );
    }
    if (this.kept === this.capacity) this.grow();
    const n = this.kept;
    for (let k = 0; k < nRoles; k++) this.roleBuffers[k]![n] = conv[k]!;
    const nExtra = this.extraCol.length;
    for (let e = 0; e < nExtra; e++) {
      const v = vals[this.extraCol[e]!]!;
      if (v !== v) {
        if (this.extraBad[e]!++ === 0) this.extraFirstBad[e] = line;
        if (this.extraText[e] === 0 && this.cellText(this.extraCol[e]!).trim() !== '') this.extraText[e] = 1;
      }
      this.extraBuffers[e]![n] = v;
    }
    const nSpread = this.spreadCol.length;
    for (let e = 0; e < nSpread; e++) {
      const v = vals[this.spreadCol[e]!]!;
      if (v !== v && this.spreadBad[e]!++ === 0) this.spreadFirstBad[e] = line;
      this.spreadBuffers[e]![n] = v * this.spreadFactor[e]!;
    }
    this.kept = n + 1;
    this.lastTime = t;
    this.lastKeptLine = line;
  }

  private grow(): void {
    let capacity = this.capacity * 2;
    const hint = this.sizeHint;
    if (hint !== undefined && this.scanAt > 0 && this.scanAt < hint) {
      // Rows per byte so far, over the whole file, with 3 % to spare (a growth of at least 1/8).
      const estimate = Math.ceil(this.kept * (hint / this.scanAt) * 1.03) + 16;
      capacity = Math.min(capacity, Math.max(estimate, Math.ceil(this.capacity * 1.125)));
    }
    const grow = (b: Float64Array): Float64Array => {
      const out = new Float64Array(capacity);
      out.set(b);
      return out;
    };
    this.roleBuffers = this.roleBuffers.map(grow);
    this.extraBuffers = this.extraBuffers.map(grow);
    this.spreadBuffers = this.spreadBuffers.map(grow);
    this.capacity = capacity;
  }

  // ---- result ------------------------------------------------------------------------------

  finish(source: { file: string; bytes: number; sha256: string }, earlyIssues: IngestIssue[]): IngestResult {
    const file = this.file;
    const issues: IngestIssue[] = [...earlyIssues, ...this.issues];
    if (this.rowsRead === 0) {
      throw new IngestError('no-data-rows', file, `the file has a header (line ${this.dialect.headerLine}) but no data rows`, { line: this.dialect.headerLine });
    }
    const minRows = this.opts.minRows ?? (this.layout === 'table' ? 2 : 3);
    if (this.kept < minRows) {
      const why = Object.entries(this.droppedByReason).map(([r, n]) => `${n} ${r}`).join(', ');
      const firstDrop = this.dropped[0];
      throw new IngestError(
        'too-few-rows',
        file,
        `only ${this.kept} of ${this.rowsRead} data rows are usable (at least ${minRows} needed${this.layout === 'table' ? ' for a table of operating points' : ''})` +
          (why ? `; dropped: ${why}` : '') +
          (firstDrop ? `; first at line ${firstDrop.line}${firstDrop.column ? ` column "${firstDrop.column}"` : ''}: ${firstDrop.detail}` : ''),
        firstDrop ? { line: firstDrop.line, ...(firstDrop.column ? { column: firstDrop.column } : {}) } : {},
      );
    }
    const n = this.kept;
    // A column whose buffer is at most a quarter longer than its rows is handed over as a view of
    // its first n values, without the copy (the buffer was sized from the file; the view keeps at
    // most a quarter more alive); a longer one is copied to its length.
    const trim = (b: Float64Array): Float64Array => (b.length === n ? b : b.length <= n + (n >> 2) ? b.subarray(0, n) : b.slice(0, n));
    const roleBuffers = this.roleBuffers.map(trim);
    this.roleBuffers = [];
    const extraBuffers = this.extraBuffers.map(trim);
    this.extraBuffers = [];
    const spreadBuffers = this.spreadBuffers.map(trim);
    this.spreadBuffers = [];

    // Issues gathered while scanning.
    if (this.droppedCount > 0) {
      const why = Object.entries(this.droppedByReason).map(([r, k]) => `${k} ${r}`).join(', ');
      issues.push({
        code: 'rows-dropped',
        severity: 'warning',
        message: `${this.droppedCount} of ${this.rowsRead} data rows were dropped (${why}); each is listed in meta.rowsDropped with its line and reason.`,
      });
    }
    if (this.duplicateCount) {
      issues.push({
        code: 'duplicate-time',
        severity: 'warning',
        line: this.duplicateLines[0]!,
        message: `${this.duplicateCount} ${this.duplicateCount === 1 ? 'row repeats' : 'rows repeat'} the time stamp of the row before and ${this.duplicateCount === 1 ? 'was' : 'were'} dropped (the first row with a given time is kept): ${this.duplicateCount === 1 ? 'line' : 'lines'} ${listLines(this.duplicateLines, this.duplicateCount)}.`,
      });
    }
    if (this.droppedCount > this.dropped.length) {
      issues.push({
        code: 'dropped-list-truncated',
        severity: 'info',
        message: `${this.droppedCount} rows were dropped; the first ${this.dropped.length} are listed (raise the listing limit to see more).`,
        fix: [{ option: 'maxDroppedListed' }],
      });
    }
    if (this.blankCount) {
      issues.push({ code: 'blank-line', severity: 'info', line: this.blankLines[0]!, message: `Blank lines inside the data were skipped: lines ${listLines(this.blankLines, this.blankCount)}.` });
    }
    if (this.commentCount) {
      issues.push({ code: 'comment-in-body', severity: 'info', line: this.commentLines[0]!, message: `Comment lines inside the data were skipped: lines ${listLines(this.commentLines, this.commentCount)}.` });
    }
    if (this.surplusBlankRows) {
      issues.push({ code: 'surplus-blank-cells', severity: 'info', message: `${this.surplusBlankRows} rows end with blank cells beyond the header's ${this.nCols} columns (a trailing delimiter); they were ignored.` });
    }
    if (this.quoteErrors.length) {
      issues.push({ code: 'quote-error', severity: 'warning', line: this.quoteErrors[0]!, message: `papaparse found malformed quotes at lines ${listLines(this.quoteErrors, this.quoteErrors.length)}; check those rows.` });
    }

    let time: Float64Array;
    if (this.timeSlot >= 0) time = roleBuffers[this.timeSlot]!;
    else {
      time = new Float64Array(n);
      for (let k = 0; k < n; k++) time[k] = k;
    }
    const channels: Recording['channels'] = {};
    this.roleCol.forEach((c, k) => {
      const role = this.columns[c]!.role;
      if (role !== 'time' && role !== 'extra' && role !== 'spread') channels[role] = roleBuffers[k]!;
    });
    const extra: Recording['extra'] = [];
    this.extraCol.forEach((c, e) => {
      const col = this.columns[c]!;
      const bad = this.extraBad[e]!;
      if (bad === n) {
        const empty = this.extraText[e] === 0;
        col.ignored = empty ? 'every cell is blank' : 'no cell is a number';
        issues.push({
          code: empty ? 'empty-column' : 'non-numeric-column',
          severity: empty ? 'info' : 'warning',
          column: col.header || `column ${c + 1}`,
          message: `Column "${col.header || `column ${c + 1}`}" ${empty ? 'is empty' : 'holds no numbers'}; it is not kept in recording.extra.`,
        });
        return;
      }
      if (bad > 0) {
        issues.push({
          code: 'extra-non-numeric',
          severity: 'warning',
          line: this.extraFirstBad[e]!,
          column: col.header,
          message: `Column "${col.header}" (kept in extra) has ${bad} blank or non-numeric cells, stored as NaN; the first is at line ${this.extraFirstBad[e]}. Rows are not dropped for cells of unrecognised columns.`,
        });
      }
      extra.push({ name: col.header || `column ${c + 1}`, values: extraBuffers[e]!, reason: col.reason ?? 'not a measured channel' });
    });
    const spread: Recording['spread'] = {};
    this.spreadCol.forEach((c, e) => {
      const col = this.columns[c]!;
      const of = col.spreadOf!;
      if (spread[of]) {
        issues.push({ code: 'duplicate-role', severity: 'warning', column: col.header, message: `Column "${col.header}" is a second spread of ${of}; the first is kept and this one is left out.` });
        col.ignored = `a second spread of ${of}`;
        return;
      }
      spread[of] = spreadBuffers[e]!;
      const bad = this.spreadBad[e]!;
      if (bad > 0) {
        issues.push({
          code: 'spread-blank', severity: 'info', line: this.spreadFirstBad[e]!, column: col.header,
          message: `Column "${col.header}" (spread of ${of}) has ${bad} blank or non-numeric cells, stored as NaN (the rows are kept); the first is at line ${this.spreadFirstBad[e]}.`,
        });
      }
    });
    if (Object.keys(channels).length === 0) {
      issues.push({ code: 'no-channels', severity: 'warning', message: 'Only a time column was recognised; name the channels (e.g. "voltage [V]") or map the roles to columns.', fix: [{ option: 'map' }] });
    }

    let timeBase: RecordingMeta['timeBase'] = null;
    if (this.layout === 'series') {
      const checked = checkTimeBase(time);
      timeBase = checked.timeBase;
      issues.push(...checked.issues);
    }

    const derived: DerivedChannel[] = [];
    const commandFromDuty = this.deriveCommand(channels, issues);
    if (commandFromDuty) derived.push(commandFromDuty);
    const position = channels.position;
    if (this.opts.deriveSpeed && position && !channels.speed && timeBase) {
      const positionColumn = this.columns.find((c) => c.role === 'position')!;
      const quantum = positionColumn.canonicalUnit === 'counts' ? positionColumn.factor : undefined;
      const d = deriveSpeed(time, position, timeBase.sampleInterval, quantum);
      channels.speed = d.speed;
      derived.push(d.derived);
      issues.push({
        code: 'derived-speed',
        severity: 'info',
        column: positionColumn.header,
        message: `Speed was derived from "${positionColumn.header}" by ${d.derived.description} Quantisation noise ≈ ${d.derived.speedNoiseSigma.toPrecision(3)} rad/s (1σ).`,
      });
    }

    const hasQuotesPath = this.papaRows > 0;
    const dialect: Dialect = {
      ...this.dialect,
      encoding: this.encoding,
      quoted: this.quoted,
      bodyParser: this.fastRows && hasQuotesPath ? 'mixed' : hasQuotesPath ? 'papaparse' : this.fastRows ? 'fast' : 'none',
    };
    const recording: Recording = {
      time,
      layout: this.layout,
      channels,
      spread,
      extra,
      meta: {
        source,
        dialect,
        columns: this.columns,
        rowsRead: this.rowsRead,
        rowsKept: n,
        driveGain: this.opts.driveGain,
        rowsDropped: this.dropped,
        rowsDroppedCount: this.droppedCount,
        droppedByReason: this.droppedByReason,
        timeBase,
        derived,
        issues,
      },
    };
    return { recording, issues };
  }

  /**
   * commandVoltage = duty · supply, when a duty is logged and no command column is: with the
   * logged supply channel sample by sample, else with the supply voltage option; without either an
   * issue says what is missing.
   */
  private deriveCommand(channels: Recording['channels'], issues: IngestIssue[]): DerivedCommandVoltage | null {
    const duty = channels.duty;
    if (!duty || channels.commandVoltage) return null;
    const dutyColumn = this.columns.find((c) => c.role === 'duty')!;
    const supplyChannel = channels.supplyVoltage;
    const supplyOption = this.supplyVoltage;
    if (!supplyChannel && supplyOption === undefined) {
      issues.push({
        code: 'duty-needs-supply', severity: 'warning', column: dutyColumn.header,
        message: `Column "${dutyColumn.header}" is a PWM duty, but no supply voltage is logged or given, so it cannot be turned into a voltage; give the supply voltage of the bridge.`,
        fix: [{ option: 'supplyVoltage' }],
      });
      return null;
    }
    const n = duty.length;
    const command = new Float64Array(n);
    if (supplyChannel) for (let k = 0; k < n; k++) command[k] = duty[k]! * supplyChannel[k]!;
    else for (let k = 0; k < n; k++) command[k] = duty[k]! * supplyOption!;
    channels.commandVoltage = command;
    const supplyColumn = supplyChannel ? this.columns.find((c) => c.role === 'supplyVoltage')! : undefined;
    const description = supplyColumn
      ? `duty "${dutyColumn.header}" times the logged supply "${supplyColumn.header}", sample by sample`
      : `duty "${dutyColumn.header}" times the given supply of ${supplyOption} V`;
    issues.push({ code: 'derived-command', severity: 'info', column: dutyColumn.header, message: `The command voltage was computed as the ${description}.` });
    return { role: 'commandVoltage', from: 'duty', method: 'duty-times-supply', supplySource: supplyColumn ? 'channel' : 'option', supplyVoltage: supplyColumn ? null : supplyOption!, description };
  }
}
