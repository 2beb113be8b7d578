/** Codes carried by {@link IngestError}. Stable; listed in the package README. */
export type IngestErrorCode =
  | 'empty-file'
  | 'not-text'
  | 'no-header'
  | 'no-data-rows'
  | 'too-few-rows'
  | 'no-time-column'
  | 'time-not-increasing'
  | 'unknown-unit'
  | 'missing-counts-per-revolution'
  | 'line-too-long'
  | 'bad-option'
  | 'file-unreadable';

/**
 * The one error class thrown by `@motorprint/ingest` for bad input. `line` is 1-based in the file
 * (as an editor shows it); `column` is the header text of the column concerned. The message starts
 * with the file name and says what to do.
 *
 * @example
 * try { ingestText('time,v\n') } catch (e) { if (e instanceof IngestError) e.code } // => 'no-data-rows'
 */
export class IngestError extends Error {
  override name = 'IngestError';
  readonly code: IngestErrorCode;
  readonly file: string;
  readonly line?: number;
  readonly column?: string;

  constructor(
    code: IngestErrorCode,
    file: string,
    message: string,
    where: { line?: number; column?: string; cause?: unknown } = {},
  ) {
    super(`${file}: ${message}`, where.cause !== undefined ? { cause: where.cause } : undefined);
    this.code = code;
    this.file = file;
    if (where.line !== undefined) this.line = where.line;
    if (where.column !== undefined) this.column = where.column;
  }
}
