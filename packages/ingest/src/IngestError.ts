import type { IngestFix } from './types.js';

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
  | 'conflicting-units'
  | 'duplicate-column'
  | 'ambiguous-role'
  | 'missing-counts-per-revolution'
  | 'missing-pwm-max'
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
  /**
   * The options that would settle it, with concrete values where known (e.g. the `map` entries
   * that pick one motor). The message says the same in plain words; a command line adds its flags.
   */
  readonly fix?: IngestFix[];

  constructor(
    code: IngestErrorCode,
    file: string,
    message: string,
    where: { line?: number; column?: string; cause?: unknown; fix?: IngestFix[] } = {},
  ) {
    super(`${file}: ${message}`, where.cause !== undefined ? { cause: where.cause } : undefined);
    this.code = code;
    this.file = file;
    if (where.line !== undefined) this.line = where.line;
    if (where.column !== undefined) this.column = where.column;
    if (where.fix !== undefined) this.fix = where.fix;
  }
}
