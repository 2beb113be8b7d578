import type { IngestFix } from '@motorprint/ingest';
import { fixFlags } from './ingestFixFlags.js';
import { fileErrorText, fsReason, InputFileError } from './inputFiles.js';

/** The errno-style code of an error or of its cause (`ENOENT`, …), when there is one. */
function fsCode(err: Error): string | undefined {
  for (const e of [err, (err as { cause?: unknown }).cause]) {
    const code = (e as { code?: unknown } | null | undefined)?.code;
    if (typeof code === 'string' && /^E[A-Z]+$/.test(code)) return code;
  }
  return undefined;
}

/**
 * Turns a thrown value into one line a person can act on. Typed errors from the packages carry a
 * `code` and, for data problems, the file, line and column; those are printed in that order. An
 * ingest error that names the options settling it gets the command-line flags that do so. A
 * file-system error becomes "file not found: PATH" and the like, never Node's raw text.
 */
export function describeFailure(err: unknown): string {
  if (err instanceof InputFileError) return err.message;
  if (isInternal(err)) {
    return `internal error in motorprint (a fault of the program, not of your files): ${err.message}. ` +
      'Please report it with the command line and the files that gave it.';
  }
  if (err instanceof Error) {
    const e = err as Error & { code?: unknown; file?: unknown; line?: unknown; column?: unknown; fix?: unknown; path?: unknown };
    const fs = fsCode(err);
    const file = typeof e.file === 'string' ? e.file : typeof e.path === 'string' ? e.path : undefined;
    if (fs !== undefined && file !== undefined) {
      return fs === 'ENOENT' || fs === 'EISDIR' || fs === 'EACCES' ? fileErrorText(file, { code: fs }) : `${file}: ${fsReason(fs) ?? fs}`;
    }
    const where = [
      typeof e.file === 'string' ? e.file : undefined,
      typeof e.line === 'number' ? `line ${e.line}` : undefined,
      typeof e.column === 'string' ? `column "${e.column}"` : undefined,
    ].filter((s): s is string => s !== undefined);
    const code = typeof e.code === 'string' ? ` [${e.code}]` : '';
    const already = where.length > 0 && where.every((w) => e.message.includes(w));
    // A message that starts with the file alone gets the full place (file, line, column) once.
    const message = !already && typeof e.file === 'string' && e.message.startsWith(`${e.file}: `) ? e.message.slice(e.file.length + 2) : e.message;
    return `${already || where.length === 0 ? '' : `${where.join(', ')}: `}${message}${withFlags(e.fix)}${code}`;
  }
  return String(err);
}

/** ` (use --map …)` for the fixes an error or issue names, or '' when no flag applies. */
export function withFlags(fix: unknown): string {
  if (!Array.isArray(fix)) return '';
  const flags = fixFlags(fix as IngestFix[]);
  return flags ? ` (use ${flags})` : '';
}

/**
 * A JavaScript fault rather than a stated refusal: the packages' own TypeErrors and RangeErrors
 * open with the function that refused (`fitMotor: options.fix …`) or carry a code; an error such
 * as "Cannot read properties of undefined" does neither.
 */
function isInternal(err: unknown): err is Error {
  if (!(err instanceof TypeError || err instanceof RangeError || err instanceof ReferenceError)) return false;
  if (typeof (err as { code?: unknown }).code === 'string') return false;
  return !/^[A-Za-z][\w.[\]]*: /.test(err.message);
}
