import type { IngestFix } from '@motorprint/ingest';
import { fixFlags } from './ingestFixFlags.js';

/**
 * Turns a thrown value into one line a person can act on. Typed errors from the packages carry a
 * `code` and, for data problems, the file, line and column; those are printed in that order. An
 * ingest error that names the options settling it gets the command-line flags that do so.
 */
export function describeFailure(err: unknown): string {
  if (err instanceof Error) {
    const e = err as Error & { code?: unknown; file?: unknown; line?: unknown; column?: unknown; fix?: unknown };
    const where = [
      typeof e.file === 'string' ? e.file : undefined,
      typeof e.line === 'number' ? `line ${e.line}` : undefined,
      typeof e.column === 'string' ? `column "${e.column}"` : undefined,
    ].filter((s): s is string => s !== undefined);
    const code = typeof e.code === 'string' ? ` [${e.code}]` : '';
    const already = where.length > 0 && where.every((w) => e.message.includes(w));
    return `${already || where.length === 0 ? '' : `${where.join(', ')}: `}${e.message}${withFlags(e.fix)}${code}`;
  }
  return String(err);
}

/** ` (use --map …)` for the fixes an error or issue names, or '' when no flag applies. */
export function withFlags(fix: unknown): string {
  if (!Array.isArray(fix)) return '';
  const flags = fixFlags(fix as IngestFix[]);
  return flags ? ` (use ${flags})` : '';
}
