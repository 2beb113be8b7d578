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
    throw new UsageError(parseErrorText((err as Error).message, Object.keys(options), subcommand), subcommand);
  }
}

/**
 * node:util parseArgs's error in our words: a near miss of a known option gets "did you mean
 * --check?" (edit distance ≤ 2, ≤ 1 for short names), any other unknown option the list of this subcommand's options, a
 * missing value "--id needs a value".
 */
function parseErrorText(raw: string, known: string[], subcommand: string): string {
  const typed = /Unknown option '(--?[^']+)'/.exec(raw)?.[1];
  if (typed !== undefined) {
    const name = typed.replace(/^-+/, '').replace(/=.*$/, '');
    // Up to 2 edits (1 for a name of 3 letters or fewer, where 2 would match almost anything).
    let best: string | null = null, bestD = name.length <= 3 ? 2 : 3;
    for (const k of known) {
      const d = editDistance(name, k);
      if (d < bestD) { bestD = d; best = k; }
    }
    if (best !== null) return `unknown option ${typed}; did you mean --${best}?`;
    return `unknown option ${typed}; the options of ${subcommand} are ${known.map((k) => `--${k}`).join(', ')}`;
  }
  const missing = /Option '(--[\w-]+)(?: <value>)?' argument missing/.exec(raw)?.[1];
  if (missing !== undefined) return `${missing} needs a value`;
  const noValue = /Option '(--[\w-]+)' does not take an argument/.exec(raw)?.[1];
  if (noValue !== undefined) return `${noValue} takes no value`;
  const ambiguous = /Option '(--[\w-]+)' argument is ambiguous/.exec(raw)?.[1];
  if (ambiguous !== undefined) return `${ambiguous} needs a value (the next word starts with "-"; write ${ambiguous}=VALUE for a value that does)`;
  return raw.replace(/\. To specify a positional.*$/s, '.');
}

/** Levenshtein distance (small strings: option names). */
function editDistance(a: string, b: string): number {
  const d = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0]![j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      d[i]![j] = Math.min(d[i - 1]![j]! + 1, d[i]![j - 1]! + 1, d[i - 1]![j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1));
    }
  }
  return d[a.length]![b.length]!;
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
