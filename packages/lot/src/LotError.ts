/** Codes carried by {@link LotError}. */
export type LotErrorCode = 'spec-not-json' | 'spec-invalid' | 'runs-table-invalid' | 'store-invalid';

/**
 * The one error class of `@motorprint/lot` for bad input: a spec that is not JSON or breaks the
 * format, a `runs.csv` that cannot be used, a store file that is not a lot store. The message starts
 * with the file name and says where (JSON path, or line and column) and what to do.
 *
 * @example
 * try { parseLotSpec('{', 'spec.json'); } catch (e) { if (e instanceof LotError) e.code; } // => 'spec-not-json'
 */
export class LotError extends Error {
  override name = 'LotError';
  /** What kind of problem. */
  readonly code: LotErrorCode;
  /** The file concerned, as the caller named it. */
  readonly file: string;
  /** JSON path inside the file (e.g. `limits.R.tolerancePercent`), when it applies. */
  readonly path?: string;
  /** 1-based line, when known. */
  readonly line?: number;
  /** 1-based column (character position in the line), when known. */
  readonly column?: number;

  constructor(code: LotErrorCode, file: string, message: string, where: { path?: string; line?: number; column?: number; cause?: unknown } = {}) {
    const at = [where.path !== undefined ? where.path : undefined, where.line !== undefined ? `line ${where.line}` : undefined,
      where.column !== undefined ? `column ${where.column}` : undefined].filter((s) => s !== undefined).join(', ');
    super(`${file}${at ? ` (${at})` : ''}: ${message}`, where.cause !== undefined ? { cause: where.cause } : undefined);
    this.code = code;
    this.file = file;
    if (where.path !== undefined) this.path = where.path;
    if (where.line !== undefined) this.line = where.line;
    if (where.column !== undefined) this.column = where.column;
  }
}
