/**
 * Parser for the NIST StRD nonlinear-regression `.dat` format (test support, not package API).
 * The format: a header giving the 1-based line ranges of the starting/certified values and of
 * the data block; parameter lines `bN = start1 start2 certified sd`; the certified residual sum of
 * squares, residual standard deviation, degrees of freedom and number of observations; then the
 * data block with the response in the first column and one or more predictors after it.
 */

/** One parsed StRD nonlinear dataset. */
export interface StrdDataset {
  /** File name the text came from. */
  name: string;
  /** Start 1 values. */
  start1: number[];
  /** Start 2 values. */
  start2: number[];
  /** Certified parameter values. */
  certified: number[];
  /** Certified standard deviations of the parameters. */
  certifiedSd: number[];
  /** Certified residual sum of squares. */
  certifiedRss: number;
  /** Certified residual standard deviation. */
  certifiedResidualSd: number;
  /** Degrees of freedom as stated in the file (Rat43 states 9 where n − p = 11). */
  statedDegreesOfFreedom: number;
  /** Number of observations as stated in the file. */
  observations: number;
  /** Response column (first data column). */
  y: Float64Array;
  /** Predictor columns. */
  x: Float64Array[];
}

/** Error raised on a malformed file, naming the file and line. */
export class StrdFormatError extends Error {
  constructor(
    readonly file: string,
    readonly line: number,
    message: string,
  ) {
    super(`${file}:${line}: ${message}`);
    this.name = 'StrdFormatError';
  }
}

const NUMBER = String.raw`[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?`;

function headerNumber(lines: string[], file: string, label: string): number {
  const re = new RegExp(String.raw`^\s*${label}:\s*(${NUMBER})\s*$`);
  for (let i = 0; i < lines.length; i++) {
    const m = re.exec(lines[i]!);
    if (m) return Number(m[1]);
  }
  throw new StrdFormatError(file, 0, `missing "${label}:" line`);
}

/**
 * Parses the text of one StRD nonlinear `.dat` file.
 *
 * @param text - file content (CRLF or LF)
 * @param file - file name for messages
 * @returns the dataset
 * @throws StrdFormatError when a required line is missing or a count disagrees
 */
export function parseStrdNonlinear(text: string, file: string): StrdDataset {
  const lines = text.split(/\r?\n/);
  const range = /Data\s*\(lines\s+(\d+)\s+to\s+(\d+)\)/.exec(text);
  if (!range) throw new StrdFormatError(file, 0, 'missing "Data (lines A to B)" in the header');
  const first = Number(range[1]);
  const last = Number(range[2]);
  const paramRe = new RegExp(
    String.raw`^\s*b(\d+)\s*=\s*(${NUMBER})\s+(${NUMBER})\s+(${NUMBER})\s+(${NUMBER})\s*$`,
  );
  const start1: number[] = [];
  const start2: number[] = [];
  const certified: number[] = [];
  const certifiedSd: number[] = [];
  for (let i = 0; i < first - 1; i++) {
    const m = paramRe.exec(lines[i]!);
    if (!m) continue;
    const index = Number(m[1]) - 1;
    if (index !== start1.length) throw new StrdFormatError(file, i + 1, `parameter b${index + 1} out of order`);
    start1.push(Number(m[2]));
    start2.push(Number(m[3]));
    certified.push(Number(m[4]));
    certifiedSd.push(Number(m[5]));
  }
  if (start1.length === 0) throw new StrdFormatError(file, 0, 'no "bN = ..." parameter lines');
  const observations = headerNumber(lines, file, 'Number of Observations');
  const columns: number[][] = [];
  for (let i = first - 1; i < last; i++) {
    const line = lines[i];
    if (line === undefined) throw new StrdFormatError(file, i + 1, 'file ends inside the data block');
    const fields = line.trim().split(/\s+/).map(Number);
    if (fields.length < 2 || fields.some((v) => !Number.isFinite(v))) {
      throw new StrdFormatError(file, i + 1, `expected numbers, got "${line.trim()}"`);
    }
    if (columns.length === 0) for (let c = 0; c < fields.length; c++) columns.push([]);
    if (fields.length !== columns.length) {
      throw new StrdFormatError(file, i + 1, `expected ${columns.length} columns, got ${fields.length}`);
    }
    fields.forEach((v, c) => columns[c]!.push(v));
  }
  for (let i = last; i < lines.length; i++) {
    if (lines[i]!.trim() !== '') throw new StrdFormatError(file, i + 1, 'content after the stated data block');
  }
  if (columns[0]!.length !== observations) {
    throw new StrdFormatError(file, first, `data block has ${columns[0]!.length} rows, header says ${observations}`);
  }
  return {
    name: file,
    start1,
    start2,
    certified,
    certifiedSd,
    certifiedRss: headerNumber(lines, file, 'Residual Sum of Squares'),
    certifiedResidualSd: headerNumber(lines, file, 'Residual Standard Deviation'),
    statedDegreesOfFreedom: headerNumber(lines, file, 'Degrees of Freedom'),
    observations,
    y: Float64Array.from(columns[0]!),
    x: columns.slice(1).map((c) => Float64Array.from(c)),
  };
}
