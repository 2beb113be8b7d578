import { createKernel } from '@motorprint/model/kernels';
import type { KernelRoom } from '@motorprint/model/kernels';
import { wasm } from './scanRows.wasm.js';

/** The function of the row kernel (scanRows.wat, where its arguments and results are described). */
export interface RowKernel {
  run(
    pos: number, end: number, maxRows: number, nCols: number, delimiter: number, decimal: number, newline: number, maxLine: number,
    config: number, timeCol: number, haveLast: number, lastTime: number,
  ): number;
}

/** Byte address where the caller puts the bytes to scan (below it: the kernel's powers of ten and its results). */
export const ROWS_AT = 256;
/**
 * Indexes in the f64 view of the kernel's results: where to go on, lines kept, the number of cells
 * and the start of the line it stopped at, and how many kept lines had blank cells past the header's.
 */
export const NEXT_SLOT = 23;
export const KEPT_SLOT = 24;
export const CELLS_SLOT = 25;
export const START_SLOT = 26;
export const SURPLUS_SLOT = 27;
/** `run` statuses: stopped at the end or after maxRows lines; at a line left to the scanner; at a row left to commit(). */
export const RUN_DONE = 0;
export const RUN_SCAN = 1;
export const RUN_CHECK = 2;
/** Kinds of column in the kernel's config. */
export const KIND_ROLE = 0;
export const KIND_EXTRA = 1;
export const KIND_SPREAD = 2;
/** Doubles per column in the config (kind, dest, factor, offset, min, max, then the kernel's count of blank cells and the row of the first). */
export const CONFIG_DOUBLES = 8;

const kernel = createKernel<RowKernel>(wasm);
let enabled = true;

/** Lines kept by the kernel so far in this process (for tests, which check that it ran). */
export const rowKernelUse = { lines: 0 };

/**
 * Turns the kernel on or off (on by default; off, every byte chunk is read by the JavaScript
 * scanner, which the tests compare the kernel with). Not exported from the package.
 */
export function setRowKernel(on: boolean): void {
  enabled = on;
}

/**
 * Lines per `run` call for `nCols` columns: output arrays of at most 1 MiB in all, and calls short
 * enough that the engine can swap in its optimised code for `run` between them.
 */
export function rowsPerCall(nCols: number): number {
  return Math.max(16, Math.min(4096, Math.floor((1 << 20) / (8 * nCols))));
}

/** Where the kernel's areas lie for `length` bytes of input and `nCols` columns (byte addresses). */
export interface RowLayout {
  /** The config: CONFIG_DOUBLES doubles per column. */
  config: number;
  /** The scratch row: nCols doubles. */
  scratch: number;
  /** The output arrays: nCols of them, `maxRows` doubles each. */
  out: number;
  maxRows: number;
}

/**
 * A kernel instance whose memory holds `length` bytes at {@link ROWS_AT} and the areas of
 * {@link RowLayout} after them; null when the kernel is off or cannot run (the JavaScript scanner
 * then reads the bytes).
 */
export function rowKernelRoom(length: number, nCols: number): { room: KernelRoom<RowKernel>; layout: RowLayout } | null {
  if (!enabled) return null;
  const maxRows = rowsPerCall(nCols);
  const config = (ROWS_AT + length + 7) & ~7;
  const scratch = config + 8 * CONFIG_DOUBLES * nCols;
  const out = scratch + 8 * nCols;
  const room = kernel.room(out + 8 * nCols * maxRows);
  return room === null ? null : { room, layout: { config, scratch, out, maxRows } };
}

/**
 * Runs the kernel over the lines of `bytes[from…end)` (`end` just after a newline) with every
 * column taken as an extra one (stored as read, no check), and returns its verdict on each line:
 * the values of the lines it read, null for the lines it leaves to the JavaScript scanner. For
 * tests; null when the kernel cannot run.
 */
export function scanRowsOf(bytes: Uint8Array, from: number, end: number, nCols: number, delimiter: number, decimal: number, newline: number, maxLine: number): (number[] | null)[] | null {
  const got = rowKernelRoom(end - from, nCols);
  if (got === null) return null;
  const { room, layout } = got;
  room.u8.set(bytes.subarray(from, end), ROWS_AT);
  const mem = room.f64;
  for (let c = 0; c < nCols; c++) mem.set([KIND_EXTRA, c, 1, 0, 0, 0, 0, 0], layout.config / 8 + CONFIG_DOUBLES * c);
  const rows: (number[] | null)[] = [];
  const stop = ROWS_AT + end - from;
  for (let at = ROWS_AT; at < stop; ) {
    const status = room.exports.run(at, stop, layout.maxRows, nCols, delimiter, decimal, newline, maxLine, layout.config, -1, 0, 0);
    const kept = mem[KEPT_SLOT]!;
    for (let r = 0; r < kept; r++) {
      const row: number[] = [];
      for (let c = 0; c < nCols; c++) row.push(mem[layout.out / 8 + c * layout.maxRows + r]!);
      rows.push(row);
    }
    if (status !== RUN_DONE) rows.push(null);
    at = mem[NEXT_SLOT]!;
  }
  return rows;
}
