/**
 * Error thrown by `readParameterSet` for text that is not a valid parameter set. A `TypeError`
 * (wrong shape) that also carries what is wrong and where.
 *
 * @example
 * try { readParameterSet('{}'); } catch (e) { (e as ParameterSetError).path; } // => 'schema'
 */
export class ParameterSetError extends TypeError {
  /** `invalid-json`: not JSON; `wrong-schema`: another document or version; `invalid-field`: a field is missing or wrong. */
  readonly code: 'invalid-json' | 'wrong-schema' | 'invalid-field';
  /** Dotted path of the offending field (`parameters.R.ci95[1]`), or '' for the whole text. */
  readonly path: string;

  /**
   * @param code - kind of problem
   * @param path - dotted path of the field
   * @param message - full message naming the function, path and value
   */
  constructor(code: ParameterSetError['code'], path: string, message: string) {
    super(message);
    this.name = 'ParameterSetError';
    this.code = code;
    this.path = path;
  }
}
