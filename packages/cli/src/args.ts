import { parseArgs, type ParseArgsConfig } from 'node:util';

/** What {@link parseSubcommandArgs} returns for an options table `T`. */
export type ParsedSubcommandArgs<T extends NonNullable<ParseArgsConfig['options']>> = ReturnType<
  typeof parseArgs<{ args: string[]; options: T; allowPositionals: true; strict: true }>
>;
import { UsageError } from './UsageError.js';

/** Parses a subcommand's arguments with node:util parseArgs, turning its errors into UsageErrors. */
export function parseSubcommandArgs<T extends NonNullable<ParseArgsConfig['options']>>(
  subcommand: string,
  args: string[],
  options: T,
): ParsedSubcommandArgs<T> {
  try {
    return parseArgs({ args, options, allowPositionals: true, strict: true });
  } catch (err) {
    throw new UsageError((err as Error).message.replace(/\. To specify a positional.*$/s, '.'), subcommand);
  }
}

/** Reads a finite number from an option value; a UsageError names the option otherwise. */
export function numberOption(subcommand: string, name: string, raw: string | undefined, test: (x: number) => boolean = () => true, rule = 'a number'): number | undefined {
  if (raw === undefined) return undefined;
  const x = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(x) || !test(x)) {
    throw new UsageError(`--${name} must be ${rule} (got "${raw}")`, subcommand);
  }
  return x;
}

/** Splits repeated `KEY=VALUE` option values into pairs; a UsageError names the bad one. */
export function keyValuePairs(subcommand: string, name: string, raw: string[] | undefined): [string, string][] {
  return (raw ?? []).map((item) => {
    const at = item.indexOf('=');
    if (at <= 0 || at === item.length - 1) {
      throw new UsageError(`--${name} takes KEY=VALUE (got "${item}")`, subcommand);
    }
    return [item.slice(0, at).trim(), item.slice(at + 1).trim()];
  });
}
